// How far the ranking can be trusted, from the reviewers themselves (issue 14 §1). Pure: the
// board runs it on the normalised grades; the panel simulation (panel-simulation.ts) checks it.
//
// Bootstrap: each draw resamples every ranked proposal's own normalised grades (z-scores) with
// replacement, all proposals jointly, ranks the means and walks the allocation line. The line is
// the one fill by rank draws for offered hours: down the order, a proposal lies above it when every
// telescope × moon category of the call's semester it asks for still holds its request within the
// offered hours, and then its hours join the running totals; a proposal that does not fit adds
// nothing, so one too large for the call does not push everyone below it under the line.
//
// Reproducibility: the proposal's reviewers are split in two random halves many times; each half
// ranks the call and walks the same line. The estimate is the mean (and standard deviation) over
// the splits of the fraction of the first half's accepted list that the second half accepts too.
// A proposal with a single grade cannot be split: it keeps that grade in both halves (so it still
// takes its place on the line) but is not counted in the agreement.
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";
import type { RandomGenerator } from "pure-rand/types/RandomGenerator";

export const DEFAULT_DRAWS = 2000;
export const DEFAULT_SPLITS = 1000;
/** Proposals whose probability of lying above the line falls strictly between these form the coin-flip band. */
export const COIN_FLIP = { low: 0.2, high: 0.8 } as const;
/** The rank interval's coverage: the 16th to 84th percentile of the bootstrap ranks. */
export const INTERVAL = { low: 0.16, high: 0.84 } as const;

export type LineCell = { key: string; hours: number };
export type RankedInput = {
  proposalId: number;
  /** its reviewers' normalised grades */
  z: readonly number[];
  /** hours it requests in the call's semester per telescope × moon cell */
  requested: readonly LineCell[];
};
/** How the accepted list is drawn: the hours line of the call, or simply the best `count`. */
export type AcceptRule = { kind: "hours"; offered: readonly LineCell[] } | { kind: "top"; count: number };

export type RankUncertainty = {
  proposalId: number;
  rankInterval: { low: number; high: number };
  medianRank: number;
  /** null when the proposal asks no hours of the call's semester under an hours line */
  probabilityAboveLine: number | null;
};

export type Reproducibility = {
  /** mean over the splits of |accepted by both| / |accepted by the first half| */
  expectedAgreement: number | null;
  /** standard deviation of that fraction over the splits */
  spread: number | null;
  /** per quartile of the first half's order (best first): the fraction the second half puts in the same quartile */
  quartileAgreement: [number, number, number, number] | null;
  draws: number;
  seed: number;
  /** proposals counted in the estimate (two grades or more) and not counted (fewer: they keep their place on the line) */
  proposals: number;
  leftOut: number;
};

const EPS = 1e-9;

/** Uniform in [0, 1) from one 32-bit step (the draws pick among a handful of grades: 32 bits are plenty). */
const unit = (rng: RandomGenerator) => (rng.next() >>> 0) * 2.3283064365386963e-10;

/** 32-bit FNV-1a over the inputs, so the same inputs give the same draws. */
export function seedOf(inputs: readonly RankedInput[], rule: AcceptRule): number {
  let h = 0x811c9dc5;
  const mix = (s: string) => {
    for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193);
  };
  for (const p of inputs) {
    mix(`${p.proposalId}:`);
    for (const z of p.z) mix(`${z.toFixed(9)},`);
    for (const c of p.requested) mix(`${c.key}=${c.hours.toFixed(6)};`);
  }
  if (rule.kind === "top") mix(`top${rule.count}`);
  else for (const c of rule.offered) mix(`${c.key}<${c.hours.toFixed(6)};`);
  return h >>> 0;
}

/** The requests as dense arrays over the cells the line knows, for the walk in every draw. */
function lineOf(inputs: readonly RankedInput[], rule: AcceptRule) {
  if (rule.kind === "top") return { kind: "top" as const, count: rule.count };
  const index = new Map(rule.offered.map((c, i) => [c.key, i]));
  const C = rule.offered.length;
  const offered = Float64Array.from(rule.offered, (c) => c.hours);
  // hours on a cell the call does not offer never fit: they sit on an extra cell offered 0
  const req = new Float64Array(inputs.length * (C + 1));
  const asks = new Uint8Array(inputs.length);
  inputs.forEach((p, i) => {
    for (const c of p.requested) {
      if (!(c.hours > 0)) continue;
      req[i * (C + 1) + (index.get(c.key) ?? C)] += c.hours;
      asks[i] = 1;
    }
  });
  return { kind: "hours" as const, C, offered, req, asks };
}
type Line = ReturnType<typeof lineOf>;

/** Marks `above[i] = 1` for the proposals above the line when ranked in `order` (best first). */
function walkLine(line: Line, order: Int32Array, n: number, above: Uint8Array, running: Float64Array) {
  above.fill(0);
  if (line.kind === "top") {
    for (let r = 0; r < Math.min(line.count, n); r++) above[order[r]] = 1;
    return;
  }
  const { C, offered, req } = line;
  running.fill(0);
  for (let r = 0; r < n; r++) {
    const i = order[r];
    const base = i * (C + 1);
    let fits = true;
    for (let c = 0; c <= C && fits; c++) {
      const h = req[base + c];
      if (h !== 0 && running[c] + h > (c < C ? offered[c] : 0) + EPS) fits = false;
    }
    if (!fits) continue;
    above[i] = 1;
    for (let c = 0; c < C; c++) running[c] += req[base + c];
  }
}

/** 0..n-1, the starting order for a ranking. */
const identity = (n: number) => Int32Array.from({ length: n }, (_, i) => i);

/**
 * Ranks by score, best first, ties by index. Score and index are packed into one unsigned 32-bit
 * key — ⌈log₂ n⌉ bits for the index, the rest for the score quantised within [lowest, highest]
 * (23 bits at 300 proposals: steps of 10⁻⁷ of the grades' range; two means closer than that
 * count as tied) — and sorted by the engine's numeric sort, several times faster than a sort with
 * a comparator. Above 4 096 proposals it falls back to a comparator sort.
 */
function ranker(n: number, lowest: number, highest: number) {
  const indexBits = Math.max(1, Math.ceil(Math.log2(Math.max(2, n))));
  if (indexBits > 12) return (order: Int32Array, score: Float64Array) => void order.sort((a, b) => score[b] - score[a] || a - b);
  const slots = 2 ** indexBits;
  const levels = 2 ** (32 - indexBits) - 1;
  const scale = highest > lowest ? levels / (highest - lowest) : 0;
  const keys = new Uint32Array(n);
  return (order: Int32Array, score: Float64Array) => {
    for (let i = 0; i < n; i++) keys[i] = Math.round((highest - score[i]) * scale) * slots + i;
    keys.sort();
    for (let r = 0; r < n; r++) order[r] = keys[r] & (slots - 1);
  };
}

function flatten(inputs: readonly RankedInput[]) {
  const start = new Int32Array(inputs.length + 1);
  inputs.forEach((p, i) => (start[i + 1] = start[i] + p.z.length));
  const z = new Float64Array(start[inputs.length]);
  inputs.forEach((p, i) => z.set(p.z, start[i]));
  let lowest = Infinity;
  let highest = -Infinity;
  for (const v of z) {
    if (v < lowest) lowest = v;
    if (v > highest) highest = v;
  }
  // a mean of any resample or half of a proposal's grades lies within the grades' range
  return { start, z, lowest, highest };
}

/**
 * The bootstrap of the ranking: each proposal's 68 % rank interval, median rank and probability
 * of lying above the line. Proposals without grades must be left out by the caller.
 */
export function bootstrapRanks(inputs: readonly RankedInput[], rule: AcceptRule, options: { draws?: number; seed?: number } = {}) {
  const n = inputs.length;
  const draws = Math.max(1, Math.floor(options.draws ?? DEFAULT_DRAWS));
  const seed = (options.seed ?? seedOf(inputs, rule)) >>> 0;
  const line = lineOf(inputs, rule);
  const { start, z, lowest, highest } = flatten(inputs);
  const rankInto = ranker(n, lowest, highest);
  const rng = xoroshiro128plus(seed);
  const score = new Float64Array(n);
  const order = identity(n);
  const above = new Uint8Array(n);
  const running = new Float64Array(line.kind === "hours" ? line.C + 1 : 0);
  const rankCounts = new Uint32Array(n * n);
  const aboveCounts = new Uint32Array(n);
  for (let d = 0; d < draws; d++) {
    for (let i = 0; i < n; i++) {
      const s = start[i];
      const k = start[i + 1] - s;
      let sum = 0;
      for (let j = 0; j < k; j++) sum += z[s + Math.floor(unit(rng) * k)];
      score[i] = k > 0 ? sum / k : lowest;
    }
    rankInto(order, score);
    for (let r = 0; r < n; r++) rankCounts[order[r] * n + r]++;
    walkLine(line, order, n, above, running);
    for (let i = 0; i < n; i++) aboveCounts[i] += above[i];
  }
  const quantile = (i: number, q: number) => {
    const target = q * draws;
    let cumulative = 0;
    for (let r = 0; r < n; r++) {
      cumulative += rankCounts[i * n + r];
      if (cumulative >= target - EPS) return r + 1;
    }
    return n;
  };
  const rows: RankUncertainty[] = inputs.map((p, i) => ({
    proposalId: p.proposalId,
    rankInterval: { low: quantile(i, INTERVAL.low), high: quantile(i, INTERVAL.high) },
    medianRank: quantile(i, 0.5),
    probabilityAboveLine: line.kind === "hours" && !line.asks[i] ? null : aboveCounts[i] / draws,
  }));
  return { rows, draws, seed };
}

/** Split-half reproducibility of the accepted list (see the head of this file). */
export function splitHalfReproducibility(inputs: readonly RankedInput[], rule: AcceptRule, options: { splits?: number; seed?: number } = {}): Reproducibility {
  const all = inputs.filter((p) => p.z.length >= 1);
  const N = all.length;
  const splittable = Uint8Array.from(all, (p) => (p.z.length >= 2 ? 1 : 0));
  const n = splittable.reduce((s, v) => s + v, 0);
  const draws = Math.max(1, Math.floor(options.splits ?? DEFAULT_SPLITS));
  const seed = (options.seed ?? seedOf(inputs, rule)) >>> 0;
  const empty = { expectedAgreement: null, spread: null, quartileAgreement: null, draws, seed, proposals: n, leftOut: inputs.length - n };
  if (n < 2) return empty;
  const line = lineOf(all, rule);
  const { start, z, lowest, highest } = flatten(all);
  const rankInto = ranker(N, lowest, highest);
  const rng = xoroshiro128plus(seed);
  const scoreA = new Float64Array(N);
  const scoreB = new Float64Array(N);
  const orderA = identity(N);
  const orderB = identity(N);
  const aboveA = new Uint8Array(N);
  const aboveB = new Uint8Array(N);
  const running = new Float64Array(line.kind === "hours" ? line.C + 1 : 0);
  const quartileOfB = new Uint8Array(N);
  const perm = new Float64Array(start[N]);
  const agreements: number[] = [];
  const quartileSums = [0, 0, 0, 0];
  const quartileSeen = [0, 0, 0, 0];
  const quartile = (r: number) => Math.min(3, Math.floor((4 * r) / N));
  for (let d = 0; d < draws; d++) {
    for (let i = 0; i < N; i++) {
      const s = start[i];
      const k = start[i + 1] - s;
      if (k === 1) {
        scoreA[i] = scoreB[i] = z[s];
        continue;
      }
      // Fisher–Yates shuffle of the proposal's grades, then the first ⌊k/2⌋ or ⌈k/2⌉ (at random) form half A
      for (let j = 0; j < k; j++) perm[s + j] = z[s + j];
      for (let j = k - 1; j > 0; j--) {
        const t = Math.floor(unit(rng) * (j + 1));
        const tmp = perm[s + j];
        perm[s + j] = perm[s + t];
        perm[s + t] = tmp;
      }
      const half = k % 2 === 0 ? k / 2 : (k - 1) / 2 + (unit(rng) < 0.5 ? 1 : 0);
      let a = 0;
      let b = 0;
      for (let j = 0; j < half; j++) a += perm[s + j];
      for (let j = half; j < k; j++) b += perm[s + j];
      scoreA[i] = a / half;
      scoreB[i] = b / (k - half);
    }
    rankInto(orderA, scoreA);
    rankInto(orderB, scoreB);
    walkLine(line, orderA, N, aboveA, running);
    walkLine(line, orderB, N, aboveB, running);
    let accepted = 0;
    let both = 0;
    for (let i = 0; i < N; i++) {
      if (!aboveA[i] || !splittable[i]) continue;
      accepted++;
      both += aboveB[i];
    }
    if (accepted > 0) agreements.push(both / accepted);
    for (let r = 0; r < N; r++) quartileOfB[orderB[r]] = quartile(r);
    const same = [0, 0, 0, 0];
    const size = [0, 0, 0, 0];
    for (let r = 0; r < N; r++) {
      const i = orderA[r];
      if (!splittable[i]) continue;
      const q = quartile(r);
      size[q]++;
      if (quartileOfB[i] === q) same[q]++;
    }
    for (let q = 0; q < 4; q++) {
      if (!size[q]) continue;
      quartileSums[q] += same[q] / size[q];
      quartileSeen[q]++;
    }
  }
  if (agreements.length === 0) return empty;
  let m = 0;
  for (const a of agreements) m += a;
  m /= agreements.length;
  let v = 0;
  for (const a of agreements) v += (a - m) ** 2;
  return {
    expectedAgreement: m,
    spread: Math.sqrt(v / agreements.length),
    quartileAgreement: quartileSums.map((s, q) => (quartileSeen[q] ? s / quartileSeen[q] : 0)) as [number, number, number, number],
    draws,
    seed,
    proposals: n,
    leftOut: inputs.length - n,
  };
}

/** Coin-flip band membership: neither likely in nor likely out. */
export const inCoinFlipBand = (p: number | null) => p !== null && p > COIN_FLIP.low && p < COIN_FLIP.high;
