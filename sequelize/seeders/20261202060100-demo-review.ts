// Demo review: the call whose deadline has passed most recently (found by query, whatever dates the
// earlier seeders chose) is put in review with a panel of the demo reviewers, the suggested
// assignment committed, and most reviews submitted: every proposal's first, and all of them for
// three proposals in four (so the board can show how firm its ranking is). Scores differ per reviewer: the
// first demo reviewer is lenient, the third harsh; each reviewer also has an opinion of their own
// of each proposal (up to ±1). Comments are written for the demo.
// Idempotent: a call whose review is already committed is left alone.
import { Op, type Sequelize } from "sequelize";
import { callFacts } from "~/lib/review/facts.server";
import { pairKey } from "~/lib/review/conflicts";
import { suggestAssignments } from "~/lib/review/suggest";
import { Call, CallReview, Proposal, ReviewAssignment, ReviewerProfile, ReviewPanelMember, RoleGrant, User } from "~/models/index.server";
import { demoReviewGrades } from "../demo-review-grades";

const categoriesByEmail: Record<string, string[]> = {
  "reviewer@kestrel-ridge.example": ["clusters-astrometry", "stellar-populations", "stellar-physics"],
  "reviewer2@kestrel-ridge.example": ["exoplanets", "transients", "stellar-physics"],
  "reviewer3@kestrel-ridge.example": ["galaxies", "stellar-populations", "solar-system"],
  "reviewer4@kestrel-ridge.example": ["clusters-astrometry", "transients", "other"],
};
/** added to a proposal's base merit: one lenient and one harsh reviewer */
const biasByEmail: Record<string, number> = {
  "reviewer@kestrel-ridge.example": 1.5,
  "reviewer2@kestrel-ridge.example": 0,
  "reviewer3@kestrel-ridge.example": -2,
  "reviewer4@kestrel-ridge.example": 0.5,
};

const openings = [
  "The question is clearly stated and the sample is well matched to it.",
  "This is a focused programme with a sensible observing strategy.",
  "The case is interesting, although the link between the measurements and the stated goal could be sharper.",
  "The proposal addresses a question that the community has raised for some time.",
];
const middles = [
  "The feasibility sheet shows enough usable hours in the requested moon conditions, and the exposure times reach the signal-to-noise the analysis needs without saturating the brightest stars.",
  "The technical case is mostly convincing, but the airmass limit leaves little margin late in the semester, and the team should say what happens if the first epochs are lost to weather.",
  "The requested time looks right for the number of fields, though the overheads per epoch deserve a second look, and a short justification of the chosen filter would help readers outside the field.",
];
const closings = [
  "I would encourage the team to describe how the data will be released, since a clean catalogue would be useful well beyond this programme. Overall a worthwhile use of the telescope.",
  "A clearer plan for the analysis and a sentence on earlier results from the same team would strengthen a resubmission. I would still support a share of the requested time.",
  "With the points above addressed this would be a strong programme; as it stands it is competitive but not among the very best in this round.",
];
const committeeNotes = [
  "Solid but not exceptional; I would rank it in the middle of my set.",
  "One of the stronger proposals I read this round.",
  "",
  "The team has a good record with similar data; the time request seems padded by about 10 %.",
];


export async function up({ context: sequelize }: { context: Sequelize }) {
  const now = new Date();
  // the most recent call past its deadline that holds proposals to review
  const candidates = await Call.findAll({ where: { deadlineAt: { [Op.lt]: now } }, order: [["deadlineAt", "DESC"]] });
  let call: Call | null = null;
  for (const c of candidates) {
    if (await Proposal.count({ where: { callId: c.id, status: { [Op.in]: ["submitted", "in_review"] } } })) {
      call = c;
      break;
    }
  }
  if (!call) return;
  const existing = await CallReview.findOne({ where: { callId: call.id } });
  if (existing?.committedAt) return;

  const reviewers = await User.findAll({ include: [{ model: RoleGrant, as: "roleGrants", where: { role: "reviewer" } }], order: [["id", "ASC"]] });
  await sequelize.transaction(async (transaction) => {
    for (const r of reviewers) {
      const categories = categoriesByEmail[r.email] ?? [];
      const [profile, created] = await ReviewerProfile.findOrCreate({ where: { userId: r.id }, defaults: { userId: r.id, categories }, transaction });
      if (!created && profile.categories.length === 0) await profile.update({ categories }, { transaction });
      await ReviewPanelMember.findOrCreate({ where: { callId: call.id, reviewerId: r.id }, defaults: { callId: call.id, reviewerId: r.id, listMailedAt: now }, transaction });
    }
    await Proposal.update({ status: "in_review" }, { where: { callId: call.id, status: "submitted" }, transaction });
    const perProposal = reviewers.length >= 6 ? 3 : 2;
    const reviewDeadlineAt = new Date(now.getTime() + 10 * 86_400_000);
    if (existing) await existing.update({ reviewDeadlineAt, perProposal, startedAt: existing.startedAt ?? now, committedAt: now }, { transaction });
    else await CallReview.create({ callId: call.id, reviewDeadlineAt, perProposal, startedAt: now, committedAt: now }, { transaction });

    const facts = await callFacts({ callId: call.id, transaction });
    if (!facts) return;
    const suggestion = suggestAssignments({
      proposals: facts.proposals.map((p) => ({ proposalId: p.proposalId, category: p.category })),
      reviewers: facts.panel.map((r) => ({ reviewerId: r.reviewerId, categories: r.categories })),
      perProposal,
      isConflict: (p, r) => facts.conflicts.has(pairKey(p, r)),
    });
    const emailOf = new Map(reviewers.map((r) => [r.id, r.email]));
    let n = 0;
    const reviewsSeen = new Map<number, number>();
    for (const [i, pair] of suggestion.assignments.entries()) {
      if (await ReviewAssignment.findOne({ where: { proposalId: pair.proposalId, reviewerId: pair.reviewerId }, transaction })) continue;
      // every proposal's first review is in, and its others for three proposals in four; of the
      // reviews still out, every other one is a draft
      const nth = reviewsSeen.get(pair.proposalId) ?? 0;
      reviewsSeen.set(pair.proposalId, nth + 1);
      const submitted = nth === 0 || pair.proposalId % 4 !== 3;
      const draft = !submitted && i % 2 === 0;
      // 5 … 7 per proposal, and the reviewer's own view of it: −1 … +1 in half steps (invented)
      const base = 5 + ((pair.proposalId * 7) % 5) / 2 + (((pair.proposalId * 13 + pair.reviewerId * 7) % 5) - 2) / 2;
      const bias = biasByEmail[emailOf.get(pair.reviewerId) ?? ""] ?? 0;
      const comment = [openings[pair.proposalId % openings.length], middles[(pair.proposalId + pair.reviewerId) % middles.length], closings[(pair.reviewerId + n) % closings.length]].join(" ");
      await ReviewAssignment.create(
        {
          callId: call.id,
          proposalId: pair.proposalId,
          reviewerId: pair.reviewerId,
          committedAt: now,
          ...demoReviewGrades({ submitted, draft, merit: base + bias, now }),
          commentToPi: submitted ? comment : draft ? openings[n % openings.length] : null,
          commentToCommittee: submitted ? committeeNotes[n % committeeNotes.length] || null : null,
        },
        { transaction },
      );
      n++;
    }
  });
}

export async function down() {}
