// A call whose chair is conflicted on three of its four proposals in review, each in its own way:
// programme 1 has the chair as a Co-I, programme 2 has the chair's declared conflict (the chair is
// a reviewer too), programme 3 is the chair's own (PI). Another chair of the same call is
// conflicted on none. Three reviewers graded all four, with comments; the review has started.
import { CallReview, Proposal, ProposalMember, ReviewAssignment, ReviewPanelMember, User } from "~/models/index.server";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

export const DECLARED_REASON = "I supervised the PI's thesis";
/** Overall merits per reviewer (rows) and programme (columns). Invented. */
export const MERITS = [
  [8, 7.5, 6, 5],
  [7, 6.5, 9, 4],
  [9, 5.5, 7, 6],
];
export const committeeNote = (programme: number, reviewer: number) => `Committee note ${programme}-${reviewer} on the calibration plan`;

export async function conflictedCall(prefix = "Conflict") {
  const chair = await newUser({ roles: ["chair", "reviewer"], name: `${prefix} Conflicted Chair` });
  const other = await newUser({ roles: ["chair"], name: `${prefix} Other Chair` });
  const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `${prefix} Reviewer ${i}` })));
  // institutions of their own: the teams are all at newUser's "Test Institute"
  for (const [i, r] of reviewers.entries()) await User.update({ institution: `${prefix} Reviewing Institute ${i}` }, { where: { id: r.user.id } });
  const call = await testCall();
  const proposals: Proposal[] = [];
  for (let i = 0; i < 4; i++) {
    const owner = i === 3 ? chair : await newUser({ name: `${prefix} PI ${i}` });
    const { proposal } = await readyProposal({ user: owner.user, callId: call.id, title: `${prefix} programme ${i}` });
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposals.push((await Proposal.findByPk(proposal.id))!);
  }
  await ProposalMember.create({ proposalId: proposals[1].id, userId: chair.user.id, email: chair.email, role: "coi", acceptedAt: new Date() });
  await ReviewAssignment.create({ callId: call.id, proposalId: proposals[2].id, reviewerId: chair.user.id, status: "conflict", conflictReason: DECLARED_REASON, committedAt: new Date() });
  await CallReview.create({ callId: call.id, reviewDeadlineAt: new Date(Date.now() + 30 * 86_400_000), perProposal: 3, startedAt: new Date(), committedAt: new Date() });
  for (const [r, rev] of reviewers.entries()) {
    await ReviewPanelMember.create({ callId: call.id, reviewerId: rev.user.id });
    for (const [c, p] of proposals.entries()) {
      const overall = MERITS[r][c];
      await ReviewAssignment.create({
        callId: call.id, proposalId: p.id, reviewerId: rev.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall,
        commentToCommittee: committeeNote(c, r), commentToPi: `Note to the PI ${c}-${r}`, submittedAt: new Date(), committedAt: new Date(),
      });
    }
  }
  return { chair, other, reviewers, call, proposals };
}
