// Per-reviewer normalisation of the overall merits of a call (SPEC §3.4).
//
// Each reviewer's submitted overall merits become z-scores within that reviewer's own set
// (population mean and standard deviation of the set: the set is all that reviewer graded in the
// call). A reviewer with fewer than MIN_GRADES grades, or whose grades are all equal, cannot be
// normalised on their own: their grades are placed on the panel's scale instead (z against the
// mean and standard deviation of every submitted grade in the call), and the rows say so.
// A proposal's normalised score is the mean of its reviewers' z-scores, also mapped back to the
// 1–10 merit scale around the panel's mean and spread.

export const MIN_GRADES = 3;
/** Reviewers disagree when their z-scores for one proposal span more than this. */
export const DISAGREEMENT_SPAN = 1.5;

export type Grade = { proposalId: number; reviewerId: number; overall: number };

export type ReviewerScale = { reviewerId: number; grades: number; mean: number; sd: number; fallback: boolean };

export type NormalisedProposal = {
  proposalId: number;
  reviews: number;
  rawMean: number;
  /** Its reviewers' z-scores (the rank bootstrap resamples them). */
  zScores: number[];
  /** Mean of the reviewers' z-scores. */
  normalisedZ: number;
  /** The same, mapped back to the 1–10 scale around the panel's mean and spread. */
  normalisedScore: number;
  /** Largest minus smallest z-score among its reviewers (0 with one review). */
  spread: number;
  disagreement: boolean;
  /** Reviewers of this proposal whose grades fell back to the panel's scale. */
  fallbackReviewerIds: number[];
  computedRank: number;
};

export function mean(values: readonly number[]) {
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

/** Population standard deviation. */
export function populationSd(values: readonly number[]) {
  const m = mean(values);
  let sum = 0;
  for (const v of values) sum += (v - m) ** 2;
  return Math.sqrt(sum / values.length);
}

const clampMerit = (value: number) => Math.min(10, Math.max(1, value));

export function normaliseGrades(grades: readonly Grade[]) {
  if (grades.length === 0) return { panel: { mean: NaN, sd: NaN }, reviewers: [] as ReviewerScale[], proposals: [] as NormalisedProposal[] };
  const all = grades.map((g) => g.overall);
  const panel = { mean: mean(all), sd: populationSd(all) };

  const byReviewer = new Map<number, number[]>();
  for (const g of grades) byReviewer.set(g.reviewerId, [...(byReviewer.get(g.reviewerId) ?? []), g.overall]);
  const reviewers = new Map<number, ReviewerScale>();
  for (const [reviewerId, own] of byReviewer) {
    const sd = populationSd(own);
    const fallback = own.length < MIN_GRADES || sd === 0;
    reviewers.set(reviewerId, fallback
      ? { reviewerId, grades: own.length, mean: panel.mean, sd: panel.sd, fallback }
      : { reviewerId, grades: own.length, mean: mean(own), sd, fallback });
  }

  const z = (g: Grade) => {
    const scale = reviewers.get(g.reviewerId)!;
    return scale.sd > 0 ? (g.overall - scale.mean) / scale.sd : 0;
  };

  const byProposal = new Map<number, Grade[]>();
  for (const g of grades) byProposal.set(g.proposalId, [...(byProposal.get(g.proposalId) ?? []), g]);
  const proposals: Omit<NormalisedProposal, "computedRank">[] = [];
  for (const [proposalId, own] of byProposal) {
    const zs = own.map(z);
    const normalisedZ = mean(zs);
    const spread = Math.max(...zs) - Math.min(...zs);
    proposals.push({
      proposalId,
      reviews: own.length,
      rawMean: mean(own.map((g) => g.overall)),
      zScores: zs,
      normalisedZ,
      normalisedScore: clampMerit(panel.mean + normalisedZ * (panel.sd > 0 ? panel.sd : 0)),
      spread,
      disagreement: spread > DISAGREEMENT_SPAN,
      fallbackReviewerIds: own.filter((g) => reviewers.get(g.reviewerId)!.fallback).map((g) => g.reviewerId),
    });
  }
  // Rank by normalised score, then raw mean, then proposal id for a stable order.
  proposals.sort((a, b) => b.normalisedZ - a.normalisedZ || b.rawMean - a.rawMean || a.proposalId - b.proposalId);
  return {
    panel,
    reviewers: [...reviewers.values()],
    proposals: proposals.map((p, i) => ({ ...p, computedRank: i + 1 })),
  };
}
