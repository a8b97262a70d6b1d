// Helpfulness of reviewers' comments: once the decision is sent, each team member (PI or Co-I)
// rates every comment to the PI from 1 to 5, one rating per member and review, changeable. The
// rater is never shown: the reviewer sees nothing, the chair sees per reviewer only the mean and
// how many ratings there are. No audit entry names the rater for the same reason.
import { Refusal } from "~/lib/forms";
import { Op } from "sequelize";
import { anonymisedOrder } from "~/lib/decisions/anonymise";
import { getProposalForUser, type Actor } from "~/lib/proposals/proposals.server";
import { DecisionLetter, ReviewAssignment, ReviewHelpfulness, sequelize } from "~/models/index.server";
import { HELPFULNESS_MAX, HELPFULNESS_MIN } from "./vocabulary";

/** The same fixed order and labels as the decision letter. */
const labelled = (proposalId: number, reviews: { id: number; commentToPi: string | null }[]) =>
  anonymisedOrder(proposalId, reviews).map(({ review, label }) => ({ assignmentId: review.id, label }));

async function rateableReviews(proposalId: number) {
  return ReviewAssignment.findAll({ where: { proposalId, status: "submitted" }, attributes: ["id", "commentToPi"] });
}

/** The team's view: which assignment each labelled comment is, and the caller's own rating. */
export async function myHelpfulness({ user, proposalId }: { user: Actor; proposalId: number }) {
  await getProposalForUser({ proposalId, user });
  if (!(await DecisionLetter.count({ where: { proposalId } }))) return [];
  const list = labelled(proposalId, await rateableReviews(proposalId));
  const mine = list.length ? await ReviewHelpfulness.findAll({ where: { raterId: user.id, assignmentId: list.map((l) => l.assignmentId) } }) : [];
  return list.map((l) => ({ ...l, rating: mine.find((m) => m.assignmentId === l.assignmentId)?.rating ?? null }));
}

/** Saves (or changes) the caller's rating of one comment on their own proposal. */
export async function rateComment({ user, proposalId, assignmentId, rating }: { user: Actor; proposalId: number; assignmentId: number; rating: number }) {
  return sequelize.transaction(async (transaction) => {
    await getProposalForUser({ proposalId, user, transaction }); // anyone off the team: 404
    if (!(await DecisionLetter.count({ where: { proposalId }, transaction }))) throw new Refusal("Comments can be rated once the decision has been sent.", { status: 409, field: "rating" });
    if (!Number.isInteger(rating) || rating < HELPFULNESS_MIN || rating > HELPFULNESS_MAX) throw new Refusal(`Rate from ${HELPFULNESS_MIN} (not helpful) to ${HELPFULNESS_MAX} (very helpful).`, { status: 400, field: "rating" });
    const review = await ReviewAssignment.findOne({ where: { id: assignmentId, proposalId, status: "submitted", commentToPi: { [Op.ne]: null } }, attributes: ["id", "commentToPi"], transaction });
    if (!review || (review.commentToPi ?? "").trim() === "") throw new Refusal("There is no such comment on this proposal.", { status: 400, field: "assignmentId" });
    const [row, created] = await ReviewHelpfulness.findOrCreate({ where: { assignmentId, raterId: user.id }, defaults: { assignmentId, raterId: user.id, rating }, transaction });
    if (!created) await row.update({ rating }, { transaction });
    return { rating };
  });
}

export type ReviewerHelpfulness = { reviewerId: number; mean: number; ratings: number };

/** The chair's figures for a call: per reviewer the mean helpfulness over all ratings of their comments and how many. */
export async function helpfulnessByReviewer({ callId }: { callId: number }): Promise<ReviewerHelpfulness[]> {
  const rows = (await ReviewHelpfulness.findAll({
    attributes: [
      [sequelize.col("assignment.reviewerId"), "reviewerId"],
      [sequelize.fn("AVG", sequelize.col("rating")), "mean"],
      [sequelize.fn("COUNT", sequelize.col("ReviewHelpfulness.id")), "ratings"],
    ],
    include: [{ model: ReviewAssignment, as: "assignment", attributes: [], where: { callId }, required: true }],
    group: [sequelize.col("assignment.reviewerId")],
    raw: true,
  })) as unknown as { reviewerId: number; mean: string | number; ratings: string | number }[];
  return rows.map((r) => ({ reviewerId: Number(r.reviewerId), mean: Number(r.mean), ratings: Number(r.ratings) }));
}
