// Demo decisions: the running semester's call (locked by 20261202070100-demo-allocation) gets the
// reviews its letters quote (invented comments to the PI, and to the committee, which no letter
// shows), the office's templates, and its decisions sent through the real path (sendDecisions):
// letters recorded, access fees raised, mails queued. The app's mail worker drains the queue when
// it starts, so the letters are in the mail catcher after a fresh start; the office can re-send.
// Idempotent: a call whose letters are recorded is left alone.
import { Op, type Sequelize } from "sequelize";
import { sendDecisions } from "~/lib/decisions/send.server";
import { DEFAULT_TEMPLATES } from "~/lib/decisions/template";
import { decisionOutcomes } from "~/lib/decisions/vocabulary";
import { Call, CallAllocation, DecisionLetter, DecisionTemplate, Proposal, ProposalMember, ReviewAssignment, User } from "~/models/index.server";
import { demoCallPlan } from "./20261201000100-demo-observatory";

const REVIEWERS = ["reviewer@kestrel-ridge.example", "reviewer2@kestrel-ridge.example", "reviewer3@kestrel-ridge.example", "reviewer4@kestrel-ridge.example"];

// Invented comments, combined per proposal and reviewer.
const TO_PI = [
  "The science case is clear and the targets are well chosen; the feasibility sheet supports the time requested.",
  "The epochs are spread well over the baseline, but the case for the faintest field needs a sharper argument.",
  "A strong programme. Please say in a future proposal how the reference frame will be tied to the astrometric catalogue.",
  "The exposure times look generous for the signal-to-noise asked for; a shorter set would free time for a second field.",
  "The team has the experience to deliver, and the data-release plan is welcome.",
];
const TO_COMMITTEE = [
  "Ranked mid-table for me; the earlier programme of this team has not published yet.",
  "I would give this filler time at most.",
  "Clear top-quartile proposal.",
];

export async function up({ context: sequelize }: { context: Sequelize }) {
  for (const outcome of decisionOutcomes) {
    await DecisionTemplate.findOrCreate({ where: { outcome }, defaults: { outcome, ...DEFAULT_TEMPLATES[outcome], updatedById: null } });
  }
  const plan = demoCallPlan(new Date());
  const call = await Call.findOne({ where: { semesterCode: plan.running.semesterCode } });
  const admin = await User.findOne({ where: { email: "admin@kestrel-ridge.example" } });
  const allocation = call ? await CallAllocation.findOne({ where: { callId: call.id } }) : null;
  if (!call || !admin || !allocation?.lockedAt || (await DecisionLetter.count({ where: { callId: call.id } }))) return;

  const reviewers = await User.findAll({ where: { email: { [Op.in]: REVIEWERS } }, order: [["email", "ASC"]] });
  const proposals = await Proposal.findAll({ where: { callId: call.id, status: { [Op.in]: [...decisionOutcomes] } }, order: [["serial", "ASC"]] });
  const reviewedAt = new Date(allocation.lockedAt.getTime() - 10 * 86_400_000);
  await sequelize.transaction(async (transaction) => {
    for (const [i, p] of proposals.entries()) {
      if (await ReviewAssignment.count({ where: { proposalId: p.id }, transaction })) continue;
      const team = new Set((await ProposalMember.findAll({ where: { proposalId: p.id }, transaction })).map((m) => m.email.toLowerCase()));
      const panel = reviewers.filter((r) => !team.has(r.email.toLowerCase())).slice(0, 3);
      for (const [r, reviewer] of panel.entries()) {
        const merit = 5 + ((p.id * 3 + r) % 8) / 2;
        await ReviewAssignment.create(
          {
            callId: call.id, proposalId: p.id, reviewerId: reviewer.id, committedAt: reviewedAt, status: "submitted",
            science: merit, feasibility: merit, legacy: Math.max(1, merit - 1), overall: merit,
            commentToPi: `${TO_PI[(i + r) % TO_PI.length]} ${TO_PI[(i + 2 * r + 1) % TO_PI.length]}`,
            commentToCommittee: TO_COMMITTEE[(i + r) % TO_COMMITTEE.length], submittedAt: reviewedAt,
          },
          { transaction },
        );
      }
    }
  });
  await sendDecisions({ actor: admin, callId: call.id, now: new Date(allocation.lockedAt.getTime() + 2 * 86_400_000) });
}

export async function down() {}
