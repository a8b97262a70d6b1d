import { describe, expect, it } from "vitest";
import { bootstrapRanks, inCoinFlipBand, seedOf, splitHalfReproducibility, type RankedInput } from "./rank-uncertainty";

// Invented z-scores. The expected values come from an exhaustive enumeration written here, apart
// from the module: every resample of each proposal's grades, not random draws.
const a: RankedInput = { proposalId: 1, z: [0.9, 0.1, -0.2], requested: [] };
const b: RankedInput = { proposalId: 2, z: [0.5, 0.3, -0.6], requested: [] };

/** P(mean of a resample of x > mean of a resample of y), ties to x (the first input wins ties). */
function exactProbabilityFirstWins(x: readonly number[], y: readonly number[]) {
  const means = (v: readonly number[]) => {
    const out: number[] = [];
    const k = v.length;
    for (let code = 0; code < k ** k; code++) {
      let sum = 0;
      for (let j = 0, c = code; j < k; j++, c = Math.floor(c / k)) sum += v[c % k];
      out.push(sum / k);
    }
    return out;
  };
  const mx = means(x);
  const my = means(y);
  let wins = 0;
  for (const p of mx) for (const q of my) if (p >= q) wins++;
  return wins / (mx.length * my.length);
}

describe("rank bootstrap", () => {
  it("gives the probability of lying above a one-place line that exhaustive enumeration gives", () => {
    const exact = exactProbabilityFirstWins(a.z, b.z); // 729 pairs of resamples
    const draws = 20_000;
    const { rows } = bootstrapRanks([a, b], { kind: "top", count: 1 }, { draws });
    const sigma = Math.sqrt((exact * (1 - exact)) / draws);
    expect(Math.abs(rows[0].probabilityAboveLine! - exact)).toBeLessThan(4 * sigma);
    expect(rows[0].probabilityAboveLine! + rows[1].probabilityAboveLine!).toBeCloseTo(1, 12);
  });

  it("walks the hours line per telescope × moon cell as fill by rank does for offered hours", () => {
    // no spread within a proposal: every draw gives the same order 1, 2, 3, 4
    const cell = (key: string, hours: number) => ({ key, hours });
    const inputs: RankedInput[] = [
      { proposalId: 11, z: [1, 1], requested: [cell("7|dark", 10)] },
      { proposalId: 12, z: [0.5, 0.5], requested: [cell("7|dark", 10), cell("7|grey", 2)] },
      { proposalId: 13, z: [0, 0], requested: [cell("7|dark", 10)] }, // 30 > 25: below, and adds nothing
      { proposalId: 14, z: [-0.5], requested: [cell("7|grey", 3)] }, // grey 5 ≤ 5: above although 13 is not
      { proposalId: 15, z: [-1], requested: [] },
      { proposalId: 16, z: [-2], requested: [cell("9|bright", 1)] }, // a cell the call does not offer
      { proposalId: 17, z: [-3], requested: [cell("7|dark", 5)] }, // 25 ≤ 25: fits beside 11 and 12
      { proposalId: 18, z: [-4], requested: [cell("7|dark", 0.5)] }, // dark is full now
    ];
    const { rows } = bootstrapRanks(inputs, { kind: "hours", offered: [cell("7|dark", 25), cell("7|grey", 5)] }, { draws: 50 });
    expect(rows.map((r) => r.probabilityAboveLine)).toEqual([1, 1, 0, 1, null, 0, 1, 0]);
    expect(rows.map((r) => r.rankInterval)).toEqual([1, 2, 3, 4, 5, 6, 7, 8].map((r) => ({ low: r, high: r })));
  });

  it("widens the interval with the reviewers' disagreement and keeps the order of the means", () => {
    const inputs: RankedInput[] = Array.from({ length: 12 }, (_, i) => ({ proposalId: i + 1, z: [1 - i / 6 + 1.2, 1 - i / 6, 1 - i / 6 - 1.2], requested: [] }));
    const { rows } = bootstrapRanks(inputs, { kind: "top", count: 3 });
    for (const [i, r] of rows.entries()) {
      expect(r.rankInterval.low).toBeLessThanOrEqual(i + 1);
      expect(r.rankInterval.high).toBeGreaterThanOrEqual(i + 1);
    }
    expect(rows[5].rankInterval.high - rows[5].rankInterval.low).toBeGreaterThan(2);
    expect(rows[0].probabilityAboveLine!).toBeGreaterThan(rows[5].probabilityAboveLine!);
  });

  it("gives the same answer for the same inputs and another for other inputs", () => {
    const rule = { kind: "top" as const, count: 1 };
    expect(bootstrapRanks([a, b], rule)).toEqual(bootstrapRanks([a, b], rule));
    const moved = { ...b, z: [0.5, 0.3, -0.5] };
    expect(seedOf([a, moved], rule)).not.toBe(seedOf([a, b], rule));
    expect(bootstrapRanks([a, b], rule).draws).toBe(2000);
  });

  it("puts 0.2 < p < 0.8 in the coin-flip band", () => {
    expect([0.2, 0.21, 0.5, 0.79, 0.8, null].map(inCoinFlipBand)).toEqual([false, true, true, true, false, false]);
  });
});

describe("split-half reproducibility", () => {
  it("does not count proposals with one grade and says how many", () => {
    const r = splitHalfReproducibility([a, b, { proposalId: 3, z: [0.4], requested: [] }], { kind: "top", count: 1 }, { splits: 200 });
    expect(r.proposals).toBe(2);
    expect(r.leftOut).toBe(1);
    expect(r.expectedAgreement).not.toBeNull();
  });

  it("keeps a single-graded proposal's place on the line", () => {
    // two places: the single-graded first takes one, so a and b compete for the other; without its
    // place both would always be accepted and the agreement would be 1
    const single = { proposalId: 3, z: [5], requested: [] };
    const r = splitHalfReproducibility([a, b, single], { kind: "top", count: 2 }, { splits: 500 });
    expect(r.expectedAgreement!).toBeLessThan(0.9);
    expect(splitHalfReproducibility([a, b], { kind: "top", count: 2 }, { splits: 500 }).expectedAgreement).toBe(1);
  });

  it("has nothing to say about fewer than two splittable proposals", () => {
    expect(splitHalfReproducibility([a], { kind: "top", count: 1 }).expectedAgreement).toBeNull();
  });
});
