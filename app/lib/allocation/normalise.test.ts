import { mean as ssMean, standardDeviation, zScore } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { DISAGREEMENT_SPAN, normaliseGrades, type Grade } from "./normalise";

// Reference: simple-statistics 7.8.8 from the npm registry — `mean`, `standardDeviation`
// (population) and `zScore(x, mean, sd)`. Nothing below is checked against this module's own
// arithmetic. The grades are invented.
const grades: Grade[] = [
  // reviewer 1 grades generously
  { reviewerId: 1, proposalId: 10, overall: 9 },
  { reviewerId: 1, proposalId: 11, overall: 8.5 },
  { reviewerId: 1, proposalId: 12, overall: 7 },
  { reviewerId: 1, proposalId: 13, overall: 9.5 },
  // reviewer 2 grades harshly
  { reviewerId: 2, proposalId: 10, overall: 6 },
  { reviewerId: 2, proposalId: 11, overall: 3 },
  { reviewerId: 2, proposalId: 12, overall: 4.5 },
  { reviewerId: 2, proposalId: 14, overall: 2 },
  // reviewer 3 has too few grades: falls back to the panel's scale
  { reviewerId: 3, proposalId: 13, overall: 5 },
  { reviewerId: 3, proposalId: 14, overall: 7 },
  // reviewer 4 gives the same grade to everything: zero spread, falls back too
  { reviewerId: 4, proposalId: 10, overall: 6 },
  { reviewerId: 4, proposalId: 12, overall: 6 },
  { reviewerId: 4, proposalId: 14, overall: 6 },
];

function referenceZ(g: Grade) {
  const own = grades.filter((x) => x.reviewerId === g.reviewerId).map((x) => x.overall);
  const sd = standardDeviation(own);
  if (own.length >= 3 && sd > 0) return zScore(g.overall, ssMean(own), sd);
  const all = grades.map((x) => x.overall);
  return zScore(g.overall, ssMean(all), standardDeviation(all));
}

describe("per-reviewer normalisation (SPEC §3.4)", () => {
  const result = normaliseGrades(grades);
  const byId = new Map(result.proposals.map((p) => [p.proposalId, p]));

  it("matches simple-statistics' mean, standard deviation and z-score for every proposal", () => {
    for (const proposalId of [10, 11, 12, 13, 14]) {
      const own = grades.filter((g) => g.proposalId === proposalId);
      const zs = own.map(referenceZ);
      const p = byId.get(proposalId)!;
      expect(p.rawMean).toBeCloseTo(ssMean(own.map((g) => g.overall)), 12);
      expect(p.normalisedZ).toBeCloseTo(ssMean(zs), 12);
      expect(p.spread).toBeCloseTo(Math.max(...zs) - Math.min(...zs), 12);
      expect(p.disagreement).toBe(Math.max(...zs) - Math.min(...zs) > DISAGREEMENT_SPAN);
      const all = grades.map((g) => g.overall);
      const mapped = Math.min(10, Math.max(1, ssMean(all) + ssMean(zs) * standardDeviation(all)));
      expect(p.normalisedScore).toBeCloseTo(mapped, 12);
    }
  });

  it("marks the reviewers that fell back to the panel's scale, and only those", () => {
    const fallback = result.reviewers.filter((r) => r.fallback).map((r) => r.reviewerId).sort();
    expect(fallback).toEqual([3, 4]);
    expect(byId.get(14)!.fallbackReviewerIds.sort()).toEqual([3, 4]);
    expect(byId.get(11)!.fallbackReviewerIds).toEqual([]);
  });

  it("orders the proposals by the reference z-scores", () => {
    const ref = (id: number) => ssMean(grades.filter((g) => g.proposalId === id).map(referenceZ));
    const expectedOrder = [10, 11, 12, 13, 14].sort((a, b) => ref(b) - ref(a));
    expect(result.proposals.map((p) => p.proposalId)).toEqual(expectedOrder);
    expect(result.proposals.map((p) => p.computedRank)).toEqual([1, 2, 3, 4, 5]);
  });

  it("flags a 1.5-sigma disagreement and not a small one", () => {
    const two: Grade[] = [
      ...[7, 8, 9, 10].map((overall, i) => ({ reviewerId: 1, proposalId: 100 + i, overall })),
      ...[10, 9, 8, 7].map((overall, i) => ({ reviewerId: 2, proposalId: 100 + i, overall })),
    ];
    const out = new Map(normaliseGrades(two).proposals.map((p) => [p.proposalId, p]));
    // z of 7 and 10 in {7,8,9,10}: ∓1.3416 (population sd √1.25): span 2.68 → flagged.
    expect(out.get(100)!.disagreement).toBe(true);
    // 8 and 9: ∓0.4472, span 0.894 → not flagged.
    expect(out.get(101)!.disagreement).toBe(false);
    expect(out.get(101)!.spread).toBeCloseTo(2 * zScore(9, 8.5, standardDeviation([7, 8, 9, 10])), 12);
  });

  it("answers an empty call with no rows", () => {
    expect(normaliseGrades([]).proposals).toEqual([]);
  });
});
