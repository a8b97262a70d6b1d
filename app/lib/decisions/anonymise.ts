// Reviewers' comments to the PI without who wrote them.
import { createHash } from "node:crypto";
import type { LetterComment } from "./vocabulary";

/**
 * The reviews with a comment to the PI in a fixed random order: each review is ordered by a hash
 * of the proposal id and the review's own id, so the order is the same on every send and preview
 * but says nothing about who reviewed first. Labels are Reviewer 1, 2, 3 in that order.
 */
export function anonymisedOrder<R extends { id: number; commentToPi: string | null }>(proposalId: number, reviews: R[]): { review: R; label: string }[] {
  const key = (id: number) => createHash("sha256").update(`nightshare-decision|${proposalId}|${id}`).digest("hex");
  return reviews
    .filter((r) => (r.commentToPi ?? "").trim() !== "")
    .map((r) => ({ r, k: key(r.id) }))
    .sort((a, b) => (a.k < b.k ? -1 : a.k > b.k ? 1 : 0))
    .map(({ r }, i) => ({ review: r, label: `Reviewer ${i + 1}` }));
}

export function anonymisedComments(proposalId: number, reviews: { id: number; commentToPi: string | null }[]): LetterComment[] {
  return anonymisedOrder(proposalId, reviews).map(({ review, label }) => ({ label, text: (review.commentToPi ?? "").trim() }));
}
