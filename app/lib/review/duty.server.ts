// Distributed review: what each proposal's team owes. The team's designated reviewer owes the
// reviews of their committed assignments in the call (k for each team that designated them, so a
// reviewer two teams named owes 2k, and both teams are measured against that); after the review
// deadline a team whose reviewer has not delivered all of them is late. The call decides what the board does with that: flag it
// ("flag"), or flag it and give it no computed rank ("unranked", sorted last with the reason).
import { Op } from "sequelize";
import { Call, CallReview, Proposal, ReviewAssignment } from "~/models/index.server";
import type { UnreviewedPolicy } from "./vocabulary";

/** `teams`: how many teams designated this reviewer (owed and delivered are the reviewer's, for all of them). */
export type ReviewDuty = { reviewerId: number | null; owed: number; delivered: number; late: boolean; teams: number };

/** Duties of the call's proposals (empty for a panel-reviewed call). */
export async function reviewDuties({ callId, now = new Date() }: { callId: number; now?: Date }): Promise<{ policy: UnreviewedPolicy; duties: Map<number, ReviewDuty> } | null> {
  const call = await Call.findByPk(callId, { attributes: ["id", "reviewMode", "unreviewedPolicy"] });
  if (!call || call.reviewMode !== "distributed") return null;
  const [review, proposals, assignments] = await Promise.all([
    CallReview.findOne({ where: { callId }, attributes: ["reviewDeadlineAt"] }),
    Proposal.findAll({ where: { callId, status: { [Op.in]: ["in_review", "accepted", "waitlisted", "declined"] } }, attributes: ["id", "designatedReviewerId"], raw: true }),
    ReviewAssignment.findAll({ where: { callId, committedAt: { [Op.ne]: null }, status: { [Op.ne]: "conflict" } }, attributes: ["reviewerId", "status"], raw: true }),
  ]);
  const deadlinePassed = review?.reviewDeadlineAt ? now >= review.reviewDeadlineAt : false;
  const perReviewer = new Map<number, { owed: number; delivered: number }>();
  for (const a of assignments) {
    const row = perReviewer.get(a.reviewerId as number) ?? { owed: 0, delivered: 0 };
    row.owed++;
    if (a.status === "submitted") row.delivered++;
    perReviewer.set(a.reviewerId as number, row);
  }
  const teamsOf = new Map<number, number>();
  for (const p of proposals) if (p.designatedReviewerId) teamsOf.set(p.designatedReviewerId as number, (teamsOf.get(p.designatedReviewerId as number) ?? 0) + 1);
  const duties = new Map<number, ReviewDuty>();
  for (const p of proposals) {
    const reviewerId = (p.designatedReviewerId as number | null) ?? null;
    const got = reviewerId ? perReviewer.get(reviewerId) : undefined;
    const owed = got?.owed ?? 0;
    const delivered = got?.delivered ?? 0;
    // a team without a reviewer (a proposal submitted before the call became distributed) owes nothing we can count
    duties.set(p.id, { reviewerId, owed, delivered, late: deadlinePassed && delivered < owed, teams: reviewerId ? (teamsOf.get(reviewerId) ?? 1) : 0 });
  }
  return { policy: call.unreviewedPolicy, duties };
}

export type DutyRow = { proposalId: number; computedRank: number | null; reviewDuty: ReviewDuty | null; rankWithheld: string | null; zScores?: readonly number[] };

/**
 * Puts each row's duty on it; under "unranked" a late team's proposal loses its computed rank
 * (with the reason; its z-scores leave the rank bootstrap) and the others are renumbered 1, 2, 3 …
 * in their order. Rows change in place.
 */
export function applyReviewDuty(rows: DutyRow[], duty: { policy: UnreviewedPolicy; duties: Map<number, ReviewDuty> } | null) {
  for (const row of rows) {
    row.reviewDuty = duty?.duties.get(row.proposalId) ?? null;
    row.rankWithheld = null;
    if (duty?.policy === "unranked" && row.reviewDuty?.late) {
      row.computedRank = null;
      // nor a place in the rank bootstrap, which draws from the row's z-scores
      if (row.zScores) row.zScores = [];
      const d = row.reviewDuty;
      row.rankWithheld = d.teams > 1
        ? `not ranked: the team's reviewer, designated by ${d.teams} teams, delivered ${d.delivered} of their ${d.owed} reviews by the review deadline`
        : `not ranked: the team delivered ${d.delivered} of its ${d.owed} reviews by the review deadline`;
    }
  }
  if (duty?.policy === "unranked") {
    const ranked = rows.filter((r) => r.computedRank !== null).sort((a, b) => (a.computedRank as number) - (b.computedRank as number));
    ranked.forEach((r, i) => (r.computedRank = i + 1));
  }
  return rows;
}
