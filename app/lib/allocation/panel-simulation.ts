// Simulated review panels, to check the reproducibility estimator against what two independent
// panels really do (issue 14 §1). Pure and seeded.
//
// The model (a common one for referee grades; the numbers are ours): each proposal has a true
// merit m ~ N(0, 1); each reviewer a harshness h ~ N(0, harshnessSd²) that shifts every grade they
// give; each grade adds independent noise e ~ N(0, noiseSd²). The grade on the 1–10 scale is
// 5.5 + 1.5 (m + h + e), not clamped (clamping would add a distortion of its own). Reviewers are
// dealt round-robin from a shuffled pool, so every reviewer grades about as many proposals.
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";
import type { RandomGenerator } from "pure-rand/types/RandomGenerator";
import { normaliseGrades, type Grade } from "./normalise";
import type { RankedInput } from "./rank-uncertainty";

export type PanelModel = { noiseSd: number; harshnessSd: number };

function normal(rng: RandomGenerator) {
  // Box–Muller; 1 − u keeps the logarithm finite
  const u = 1 - uniformFloat64(rng);
  const v = uniformFloat64(rng);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

export function simulateMerits(count: number, seed: number) {
  const rng = xoroshiro128plus(seed >>> 0);
  return Float64Array.from({ length: count }, () => normal(rng));
}

/** One call's grades: `perProposal` reviewers for every proposal from a pool of `reviewers`. */
export function simulateGrades(input: { merits: Float64Array; perProposal: number; reviewers: number; model: PanelModel; seed: number }): Grade[] {
  const { merits, perProposal, reviewers, model } = input;
  if (perProposal > reviewers) throw new Error("A proposal cannot have more distinct reviewers than the pool holds.");
  const rng = xoroshiro128plus(input.seed >>> 0);
  const harshness = Float64Array.from({ length: reviewers }, () => model.harshnessSd * normal(rng));
  const pool = Array.from({ length: reviewers }, (_, i) => i);
  for (let i = pool.length - 1; i > 0; i--) {
    const j = Math.floor(uniformFloat64(rng) * (i + 1));
    [pool[i], pool[j]] = [pool[j], pool[i]];
  }
  const grades: Grade[] = [];
  let next = 0;
  merits.forEach((m, p) => {
    for (let k = 0; k < perProposal; k++) {
      const reviewer = pool[(next + k) % reviewers];
      grades.push({ proposalId: p + 1, reviewerId: reviewer + 1, overall: 5.5 + 1.5 * (m + harshness[reviewer] + model.noiseSd * normal(rng)) });
    }
    next = (next + perProposal) % reviewers;
  });
  return grades;
}

/** The estimator's input from a call's grades, with nothing requested (for a top-`count` rule). */
export function rankedInputsOf(grades: readonly Grade[]): RankedInput[] {
  return normaliseGrades(grades).proposals.map((p) => ({ proposalId: p.proposalId, z: p.zScores, requested: [] }));
}

/** The proposals (ids) in the best `fraction` of a call by its normalised score. */
export function acceptedTop(grades: readonly Grade[], fraction: number) {
  const ranked = normaliseGrades(grades).proposals; // best first
  return new Set(ranked.slice(0, Math.round(ranked.length * fraction)).map((p) => p.proposalId));
}

/**
 * What the estimator stands in for: two independent panels of `panelSize` (fresh reviewers,
 * fresh noise) grade the same proposals; the mean over `repeats` pairs of the fraction of the first
 * panel's top `fraction` that the second panel also puts there.
 */
export function independentPanelAgreement(input: { merits: Float64Array; panelSize: number; reviewers: number; model: PanelModel; fraction: number; repeats: number; seed: number }) {
  let sum = 0;
  for (let r = 0; r < input.repeats; r++) {
    const common = { merits: input.merits, perProposal: input.panelSize, reviewers: input.reviewers, model: input.model };
    const a = acceptedTop(simulateGrades({ ...common, seed: input.seed + 2 * r }), input.fraction);
    const b = acceptedTop(simulateGrades({ ...common, seed: input.seed + 2 * r + 1 }), input.fraction);
    let both = 0;
    for (const id of a) if (b.has(id)) both++;
    sum += both / a.size;
  }
  return sum / input.repeats;
}
