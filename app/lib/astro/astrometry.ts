// Astrometric precision and epoch planning (SPEC §3.3).
//
// - Per frame, the centroid precision of a well-sampled Gaussian PSF: σ ≈ FWHM / (2.355 · SNR),
//   i.e. σ_PSF / SNR, the usual photon-noise approximation (cf. King 1983, PASP 95, 163; the
//   Cramér–Rao bound of Lindegren 1978 differs by a factor of order unity). Combined over N frames
//   as σ/√N; the instrument's systematic floor is added in quadrature.
// - Parallax factors from the Earth's barycentric position b = (X, Y, Z) in au (astronomy-engine
//   BaryState, J2000 equator), the apparent shift being −ϖ times b's component across the line
//   of sight:  f_α* = X sin α − Y cos α,  f_δ = X cos α sin δ + Y sin α sin δ − Z cos δ.
// - Five-parameter weighted least squares (Δα*, Δδ, μα*, μδ, ϖ); the covariance (AᵀWA)⁻¹ gives
//   σ(μα*), σ(μδ), σ(ϖ). Times are Julian years from the weighted mean epoch.

import * as Astro from "astronomy-engine";
import { DEG, type Target } from "./coordinates";
import { prepareSiteNights, targetNights, limitAltitude, type Limit, type Site } from "./visibility";
import { DAY_MS, addDays, dayNumber, utDays } from "./time";
import { semesterOf, type SemesterSpan } from "../semesters";

/** km/s per (arcsec/yr · pc): 1 au per Julian year. v_t = K · μ · d. */
export const KM_S_PER_ARCSEC_YR_PC = 4.74047;

export function tangentialVelocityKmS(muMasPerYr: number, distancePc: number): number {
  return (KM_S_PER_ARCSEC_YR_PC * muMasPerYr * distancePc) / 1000;
}

export function properMotionForVelocity(vKmS: number, distancePc: number): number {
  return (1000 * vKmS) / (KM_S_PER_ARCSEC_YR_PC * distancePc);
}

export function centroidPrecisionMas(fwhmArcsec: number, snr: number): number {
  return (1000 * fwhmArcsec) / (2.3548 * snr);
}

export function epochPrecisionMas(a: { fwhmArcsec: number; snr: number; frames: number; floorMas: number }): number {
  const perEpoch = centroidPrecisionMas(a.fwhmArcsec, a.snr) / Math.sqrt(a.frames);
  return Math.hypot(perEpoch, a.floorMas);
}

const sunOffsetCache = new Map<number, [number, number, number]>();
const NODE_DAYS = 16;

/** The Sun's offset from the solar-system barycentre (au, EQJ) at a node of a 16-day grid. */
function sunOffsetAt(node: number): [number, number, number] {
  let v = sunOffsetCache.get(node);
  if (!v) {
    const s = Astro.BaryState(Astro.Body.Sun, new Astro.AstroTime(node * NODE_DAYS));
    v = [s.x, s.y, s.z];
    if (sunOffsetCache.size > 5000) sunOffsetCache.clear();
    sunOffsetCache.set(node, v);
  }
  return v;
}

/**
 * Earth's barycentric position (au, EQJ): heliocentric Earth (VSOP87, astronomy-engine) plus the
 * Sun's barycentric offset, the latter interpolated linearly between 16-day nodes of BaryState
 * (it moves ~0.01 au in Jupiter's 12 years: the interpolation error is below 1e-7 au).
 */
export function earthBarycentric(t: number): [number, number, number] {
  const ut = utDays(t);
  const e = Astro.HelioVector(Astro.Body.Earth, new Astro.AstroTime(ut));
  const x = ut / NODE_DAYS;
  const n = Math.floor(x);
  const f = x - n;
  const a = sunOffsetAt(n);
  const b = sunOffsetAt(n + 1);
  return [e.x + a[0] + f * (b[0] - a[0]), e.y + a[1] + f * (b[1] - a[1]), e.z + a[2] + f * (b[2] - a[2])];
}

export function parallaxFactors(raDeg: number, decDeg: number, t: number): { ra: number; dec: number } {
  const [bx, by, bz] = earthBarycentric(t);
  const a = raDeg * DEG;
  const d = decDeg * DEG;
  return {
    ra: bx * Math.sin(a) - by * Math.cos(a),
    dec: bx * Math.cos(a) * Math.sin(d) + by * Math.sin(a) * Math.sin(d) - bz * Math.cos(d),
  };
}

export type Epoch = { time: number; sigmaMas: number; factors?: { ra: number; dec: number } };

export type FitPrecision = {
  properMotionPrecisionMasPerYr: { ra: number; dec: number };
  parallaxPrecisionMas: number | null;
  positionPrecisionMas: { ra: number; dec: number };
  referenceEpoch: number;
  /** false when the epochs cannot determine the parameters (too few, or degenerate) */
  determined: boolean;
};

const YEAR_MS = 365.25 * DAY_MS;

function invert(m: number[][]): number[][] | null {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  const scale = Math.max(...m.map((r, i) => Math.abs(r[i])), 1e-300);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    if (Math.abs(a[p][c]) < 1e-12 * scale) return null;
    [a[c], a[p]] = [a[p], a[c]];
    const piv = a[c][c];
    for (let j = 0; j < 2 * n; j++) a[c][j] /= piv;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c];
      if (f !== 0) for (let j = 0; j < 2 * n; j++) a[r][j] -= f * a[c][j];
    }
  }
  return a.map((row) => row.slice(n));
}

/**
 * Covariance of the astrometric fit over epochs. `parameters: 5` fits position, proper motion and
 * parallax; `4` holds the parallax known (no parallax column), which gives the textbook
 * straight-line result.
 */
export function fitPrecision(raDeg: number, decDeg: number, epochs: Epoch[], parameters: 4 | 5 = 5): FitPrecision {
  const weights = epochs.map((e) => 1 / (e.sigmaMas * e.sigmaMas));
  const wsum = weights.reduce((s, w) => s + w, 0);
  const ref = epochs.reduce((s, e, i) => s + e.time * weights[i], 0) / (wsum || 1);
  const n = parameters;
  const N = Array.from({ length: n }, () => new Array(n).fill(0));
  for (let i = 0; i < epochs.length; i++) {
    const e = epochs[i];
    const f = e.factors ?? parallaxFactors(raDeg, decDeg, e.time);
    const tau = (e.time - ref) / YEAR_MS;
    const rows = [
      [1, 0, tau, 0, f.ra],
      [0, 1, 0, tau, f.dec],
    ];
    for (const row of rows) {
      for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) N[j][k] += weights[i] * row[j] * row[k];
    }
  }
  const C = epochs.length >= 2 ? invert(N) : null;
  if (!C) {
    return {
      properMotionPrecisionMasPerYr: { ra: Infinity, dec: Infinity },
      parallaxPrecisionMas: parameters === 5 ? Infinity : null,
      positionPrecisionMas: { ra: Infinity, dec: Infinity },
      referenceEpoch: ref,
      determined: false,
    };
  }
  return {
    properMotionPrecisionMasPerYr: { ra: Math.sqrt(C[2][2]), dec: Math.sqrt(C[3][3]) },
    parallaxPrecisionMas: parameters === 5 ? Math.sqrt(C[4][4]) : null,
    positionPrecisionMas: { ra: Math.sqrt(C[0][0]), dec: Math.sqrt(C[1][1]) },
    referenceEpoch: ref,
    determined: true,
  };
}

/** The API's astrometry answer for epoch dates (`YYYY-MM-DD`, taken at 00:00 UTC). */
/** −0 after rounding (e.g. −0.00004 to 4 digits) becomes 0. */
export function roundNoNegativeZero(x: number, digits: number): number {
  const v = Math.round(x * 10 ** digits) / 10 ** digits;
  return v === 0 ? 0 : v;
}

export function astrometryForDates(a: { raDeg: number; decDeg: number; epochs: string[]; positionalPrecisionMas: number }) {
  const epochs = a.epochs.map((date) => {
    const time = dayNumber(date) * DAY_MS;
    return { date, time, sigmaMas: a.positionalPrecisionMas, factors: parallaxFactors(a.raDeg, a.decDeg, time) };
  });
  const fit = fitPrecision(a.raDeg, a.decDeg, epochs);
  return {
    properMotionPrecisionMasPerYr: fit.properMotionPrecisionMasPerYr,
    parallaxPrecisionMas: fit.parallaxPrecisionMas as number,
    determined: fit.determined,
    parallaxFactors: epochs.map((e) => ({ date: e.date, ra: noNegativeZero(e.factors.ra), dec: noNegativeZero(e.factors.dec) })),
  };
}

/** Default tolerance of a planned epoch: ± this many nights. */
export const EPOCH_TOLERANCE_NIGHTS = 7;
/** An epoch whose tolerance window has fewer usable nights than this is fragile (weather). */
export const FRAGILE_BELOW_NIGHTS = 3;

export type PlanInput = {
  site: Site;
  target: Target;
  firstDate: string;
  baselineYears: number;
  perEpochPrecisionMas: number;
  limit: Limit;
  /** fixed number of epochs, or… */
  epochs?: number;
  /** …a required precision: proper motion (mas/yr) or tangential velocity at a distance */
  required?: { properMotionMasPerYr: number } | { tangentialVelocityKmS: number; distancePc: number };
  /** seconds on sky per epoch (exposures + overheads), for the cost per semester */
  secondsPerEpoch?: number;
  /** shortest useful window in a night (hours) */
  minWindowHours?: number;
  /**
   * The office's semesters (the calls' own dates), which name the semester of each epoch; a night
   * outside them follows on from the last one before it (lib/semesters semesterOf).
   */
  semesters?: SemesterSpan[];
  maxEpochs?: number;
  /**
   * Epochs per semester: the plan places exactly `epochs` in each listed semester (inside its
   * dates and visibility windows); nights outside these semesters are not used. Overrides `epochs`.
   */
  perSemester?: (SemesterSpan & { epochs: number })[];
  /** ± nights around each epoch in which it may be observed (default 7) */
  toleranceNights?: number;
  /**
   * Epochs already taken (a re-plan): they enter the fit with their own precision, new epochs keep
   * the gap from them, and no first anchor is placed (they hold the start of the baseline).
   */
  fixed?: { time: number; sigmaMas: number }[];
};

export type PlannedEpoch = {
  date: string;
  time: string;
  parallaxFactors: { ra: number; dec: number };
  semester: string;
  altitudeWindowHours: number;
  /** the nights (± tolerance) in which this epoch may be taken, and how many of them have time for the visit */
  window: { from: string; to: string; usableNights: number };
  /** fewer than FRAGILE_BELOW_NIGHTS usable nights in the window */
  fragile: boolean;
};

export type Plan = {
  epochs: PlannedEpoch[];
  precision: FitPrecision;
  requiredProperMotionMasPerYr: number | null;
  met: boolean | null;
  perSemester: { semester: string; epochs: number; hours: number }[];
  candidates: number;
  parallaxCurve: { date: string; ra: number; dec: number }[];
  message?: string;
};

type Candidate = { date: string; time: number; hours: number; f: { ra: number; dec: number }; index: number; semester: string | null };

/** Normal matrix of the 5-parameter fit, 5×5 row-major. */
type Normal = Float64Array;

/** Adds one epoch's two rows (weight w) to the normal matrix; τ from a fixed reference (μ, ϖ variances do not depend on it). */
function addEpoch(N: Normal, c: Candidate, ref: number, w: number): void {
  const tau = (c.time - ref) / YEAR_MS;
  const r1 = [1, 0, tau, 0, c.f.ra];
  const r2 = [0, 1, 0, tau, c.f.dec];
  for (let j = 0; j < 5; j++) for (let k = 0; k < 5; k++) N[5 * j + k] += w * (r1[j] * r1[k] + r2[j] * r2[k]);
}

const L = new Float64Array(25);
const y = new Float64Array(5);

/** σ²(μα*) + σ²(μδ) + ½σ²(ϖ) from the normal matrix by Cholesky (no allocation); Infinity if singular. */
function objectiveOf(N: Normal): number {
  for (let i = 0; i < 5; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = N[5 * i + j];
      for (let k = 0; k < j; k++) sum -= L[5 * i + k] * L[5 * j + k];
      if (i === j) {
        if (sum <= 1e-12 * N[5 * i + i]) return Infinity;
        L[5 * i + i] = Math.sqrt(sum);
      } else L[5 * i + j] = sum / L[5 * j + j];
    }
  }
  let total = 0;
  for (const [col, weight] of [[2, 1], [3, 1], [4, 0.5]] as const) {
    // (N⁻¹)_cc = |L⁻¹ e_c|²
    for (let i = 0; i < 5; i++) {
      let sum = i === col ? 1 : 0;
      for (let k = 0; k < i; k++) sum -= L[5 * i + k] * y[k];
      y[i] = sum / L[5 * i + i];
    }
    let q = 0;
    for (let i = col; i < 5; i++) q += y[i] * y[i];
    total += weight * q;
  }
  return total;
}

/**
 * Places epochs on nights when the target is observable in the dark: the first and last usable
 * nights anchor the baseline, then epochs are added greedily, each the candidate night that
 * lowers σ(μα*)² + σ(μδ)² + ½σ(ϖ)² the most, kept at least `minGap` apart so that they spread
 * over the baseline — which drives them towards the parallax-factor extremes of each season.
 */
export function planEpochs(input: PlanInput): Plan {
  const nights = Math.min(Math.round(input.baselineYears * 365.25) + 1, 366 * 6);
  const prepared = prepareSiteNights(input.site, input.firstDate, nights);
  const minAlt = limitAltitude(input.limit);
  const minHours = input.minWindowHours ?? 0.5;
  const rows = targetNights(prepared, input.target, minAlt, { moonSplit: false });
  const sigma = input.perEpochPrecisionMas;
  const spans = input.perSemester?.filter((s) => s.epochs > 0) ?? null;
  const semesterFor = (date: string) => (spans ? (spans.find((s) => date >= s.start && date <= s.end)?.code ?? null) : null);
  const candidates: Candidate[] = [];
  rows.forEach((r, index) => {
    if (r.observableHours < minHours) return;
    const semester = semesterFor(r.night.date);
    if (spans && semester === null) return;
    const longest = r.windows.reduce((a, b) => (b.end - b.start > a.end - a.start ? b : a));
    const time = (longest.start + longest.end) / 2;
    candidates.push({ date: r.night.date, time, hours: r.observableHours, f: parallaxFactors(input.target.raDeg, input.target.decDeg, time), index, semester });
  });
  const visitHours = Math.max(minHours, (input.secondsPerEpoch ?? 0) / 3600);
  const tolerance = input.toleranceNights ?? EPOCH_TOLERANCE_NIGHTS;
  const windowOf = (index: number) => {
    const lo = Math.max(0, index - tolerance);
    const hi = Math.min(rows.length - 1, index + tolerance);
    let usableNights = 0;
    for (let k = lo; k <= hi; k++) if (rows[k].observableHours >= visitHours) usableNights++;
    return { from: rows[lo].night.date, to: rows[hi].night.date, usableNights };
  };
  const required =
    input.required === undefined
      ? null
      : "properMotionMasPerYr" in input.required
        ? input.required.properMotionMasPerYr
        : properMotionForVelocity(input.required.tangentialVelocityKmS, input.required.distancePc);
  const maxEpochs = input.maxEpochs ?? 60;
  const quota = new Map<string, number>(spans ? spans.map((s) => [s.code, s.epochs]) : []);
  const wanted = spans ? spans.reduce((n, s) => n + s.epochs, 0) : (input.epochs ?? maxEpochs);
  const parallaxCurve = [];
  for (let d = 0; d < nights; d += 7) {
    const date = addDays(input.firstDate, d);
    const f = parallaxFactors(input.target.raDeg, input.target.decDeg, dayNumber(date) * DAY_MS);
    parallaxCurve.push({ date, ra: noNegativeZero(f.ra), dec: noNegativeZero(f.dec) });
  }
  if (candidates.length < 3) {
    return {
      epochs: [],
      precision: fitPrecision(input.target.raDeg, input.target.decDeg, []),
      requiredProperMotionMasPerYr: required,
      met: required === null ? null : false,
      perSemester: [],
      candidates: candidates.length,
      parallaxCurve,
      message: "The target is not observable on enough nights in the baseline.",
    };
  }
  const spanMs = candidates[candidates.length - 1].time - candidates[0].time;
  const globalGap = Math.max(3 * DAY_MS, Math.min(30 * DAY_MS, spanMs / (2 * Math.max(wanted, 3))));
  // With epochs per semester, the gap is set per semester from its own usable span.
  const gapOf = new Map<string, number>();
  if (spans) {
    for (const s of spans) {
      const mine = candidates.filter((c) => c.semester === s.code);
      const span = mine.length ? mine[mine.length - 1].time - mine[0].time : 0;
      gapOf.set(s.code, Math.max(DAY_MS, Math.min(globalGap, span / (2 * Math.max(s.epochs, 1)))));
    }
  }
  const gap = (c: Candidate) => (c.semester !== null ? (gapOf.get(c.semester) ?? globalGap) : globalGap);
  const open = (c: Candidate) => c.semester === null || (quota.get(c.semester) ?? 0) > 0;
  const take = (c: Candidate) => {
    if (c.semester !== null) quota.set(c.semester, (quota.get(c.semester) ?? 0) - 1);
  };
  const chosen: Candidate[] = [];
  const fixed = (input.fixed ?? []).map((e) => ({ time: e.time, sigmaMas: e.sigmaMas, f: parallaxFactors(input.target.raDeg, input.target.decDeg, e.time) }));
  const firstAnchor = fixed.length ? undefined : candidates.find(open);
  if (firstAnchor) {
    chosen.push(firstAnchor);
    take(firstAnchor);
  }
  const lastAnchor = [...candidates].reverse().find((c) => open(c) && c !== firstAnchor && Math.abs(c.time - (firstAnchor?.time ?? -Infinity)) >= gap(c));
  if (lastAnchor && chosen.length < wanted) {
    chosen.push(lastAnchor);
    take(lastAnchor);
  }
  const allEpochs = () => [...fixed.map((e) => ({ time: e.time, sigmaMas: e.sigmaMas, factors: e.f })), ...chosen.map((c) => ({ time: c.time, sigmaMas: sigma, factors: c.f }))];
  const meets = () => {
    const fit = fitPrecision(input.target.raDeg, input.target.decDeg, allEpochs());
    const p = fit.properMotionPrecisionMasPerYr;
    return fit.determined && required !== null && Math.max(p.ra, p.dec) <= required;
  };
  const ref = candidates[0].time;
  const w = 1 / (sigma * sigma);
  const N: Normal = new Float64Array(25);
  for (const c of chosen) addEpoch(N, c, ref, w);
  for (const e of fixed) addEpoch(N, { date: "", time: e.time, hours: 0, f: e.f, index: -1, semester: null }, ref, 1 / (e.sigmaMas * e.sigmaMas));
  const trial: Normal = new Float64Array(25);
  const fixedCount = spans !== null || input.epochs !== undefined;
  while (chosen.length < wanted && !(!fixedCount && meets())) {
    let best: Candidate | null = null;
    let bestValue = Infinity;
    for (const c of candidates) {
      if (!open(c)) continue;
      if (chosen.some((x) => Math.abs(x.time - c.time) < gap(c)) || fixed.some((x) => Math.abs(x.time - c.time) < gap(c))) continue;
      trial.set(N);
      addEpoch(trial, c, ref, w);
      const v = objectiveOf(trial);
      if (v < bestValue) {
        bestValue = v;
        best = c;
      }
    }
    if (!best) break;
    chosen.push(best);
    take(best);
    addEpoch(N, best, ref, w);
  }
  const shortfalls = spans ? spans.filter((s) => (quota.get(s.code) ?? 0) > 0).map((s) => ({ semester: s.code, asked: s.epochs, placed: s.epochs - (quota.get(s.code) ?? 0) })) : [];
  chosen.sort((a, b) => a.time - b.time);
  const precision = fitPrecision(input.target.raDeg, input.target.decDeg, allEpochs());
  const semesters = new Map<string, number>();
  if (spans) for (const s of spans) semesters.set(s.code, 0);
  const epochs = chosen.map((c) => {
    const semester = c.semester ?? semesterOf(c.date, input.semesters);
    semesters.set(semester, (semesters.get(semester) ?? 0) + 1);
    const window = windowOf(c.index);
    return {
      date: c.date,
      time: new Date(c.time).toISOString(),
      parallaxFactors: { ra: noNegativeZero(c.f.ra), dec: noNegativeZero(c.f.dec) },
      semester,
      altitudeWindowHours: c.hours,
      window,
      fragile: window.usableNights < FRAGILE_BELOW_NIGHTS,
    };
  });
  const p = precision.properMotionPrecisionMasPerYr;
  return {
    epochs,
    precision,
    requiredProperMotionMasPerYr: required,
    met: required === null ? null : precision.determined && Math.max(p.ra, p.dec) <= required,
    perSemester: [...semesters.entries()].map(([semester, n]) => ({
      semester,
      epochs: n,
      hours: ((input.secondsPerEpoch ?? 0) * n) / 3600,
    })),
    candidates: candidates.length,
    parallaxCurve,
    ...(shortfalls.length
      ? {
          message: `Not every semester has room for the epochs asked: ${shortfalls.map((x) => `${x.semester} ${x.placed} of ${x.asked}`).join(", ")} (nights with at least ${Math.round(visitHours * 100) / 100} h above the limit in the dark, spread apart).`,
        }
      : {}),
  };
}

/** −0 becomes 0 (a parallax factor printed as "-0.000" reads as a sign error). */
export function noNegativeZero(x: number): number {
  return Object.is(x, -0) ? 0 : x;
}

/** Precision for epochs the PI has moved (ISO times or dates), at a per-epoch precision. */
export function precisionForMovedEpochs(raDeg: number, decDeg: number, times: string[], perEpochPrecisionMas: number): FitPrecision {
  return fitPrecision(
    raDeg,
    decDeg,
    times.map((t) => ({ time: t.length === 10 ? dayNumber(t) * DAY_MS : Date.parse(t), sigmaMas: perEpochPrecisionMas })),
  );
}
