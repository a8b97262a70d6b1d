// The semester check: the allocated programmes scheduled night by night into the semester's real
// nights under weather, over many realisations, from a seeded generator (pure: plain data in,
// plain data out; semester-check-input.ts builds the input from the feasibility sheets).
//
// Rules (shown with the result, see CHECK_RULES):
// - Weather: each night is wholly clear or wholly lost. One uniform draw per site and night
//   (telescopes at the same site share the sky); a telescope's night is clear when the draw is
//   below that telescope's clear fraction for the night's month. A month without a setting counts
//   as clear (fraction 1) and the result says so.
// - Each clear night the dark interval is filled greedily in priority order: assured, then queue,
//   then filler, each down the board's order, each programme's observations in their order.
//   A visit (one epoch: time per epoch of the feasibility sheet) is one contiguous block inside
//   the target's observable window and the observation's allowed moon time (dark: Moon down or
//   the night dark; grey: also grey Moon-up time; bright: all), in the earliest free time that
//   holds it. At most one visit per observation per night.
// - An astrometric observation takes each of this semester's epochs inside its window (± the
//   tolerance nights around the planned date), earliest first; an epoch whose window has passed
//   is lost. Other observations take their visits on any night.
// - Hours: a programme's visits are those its allocation (per telescope × moon category of the
//   call's semester) covers in whole visits (epochs first, then the other observations, in order;
//   within 0.01 h, the rounding of the sheet's hours); no programme runs more than its allocation
//   (+ that 0.01 h), and no night more than its dark hours.
// - A programme completes in a realisation when every visit its allocation covers was done.
// - Proper motion: the five-parameter fit (astro/astrometry.ts fitPrecision) over the epochs of
//   the other semesters as planned plus this semester's epochs achieved, each at the middle of the
//   dark interval of its night (the parallax factor moves < 0.005 within a night).
import { mersenne } from "pure-rand/generator/mersenne";
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { fitPrecision, parallaxFactors } from "~/lib/astro/astrometry";
import type { AllocationTier, MoonCategory } from "~/lib/domain";

export const COMPLETION_GOALS = { assured: 0.9, queue: 0.5 } as const;
export const DEFAULT_REALISATIONS = 200;

export const CHECK_RULES = [
  "Each night is clear or lost as a whole: one draw per site and night, clear when below the telescope's clear fraction for that month.",
  "Clear nights are filled in the order assured → queue → filler, each down the board's order; a visit is one block of the sheet's time per epoch inside the target's window and its allowed moon time, at most one per observation per night.",
  "Astrometric epochs are taken inside their windows (± tolerance nights), earliest first; other visits on any night.",
  "A programme runs at most its allocated hours (the visits they cover in whole visits); it completes when all those visits are done.",
  `Flags: assured below ${COMPLETION_GOALS.assured * 100} % completion, queue below ${COMPLETION_GOALS.queue * 100} %.`,
];

// ---------------------------------------------------------------------------------------------
// Input

export type CheckInterval = { start: number; end: number };
export type CheckNight = {
  date: string;
  /** 1–12, the month whose clear fraction applies */
  month: number;
  /** ms since 1970 UTC; null when the Sun never reaches −18° */
  darkStart: number | null;
  darkEnd: number | null;
  /** Moon-up intervals (ms) of the night; clipped to darkness here */
  moonUp: CheckInterval[];
  /** category of Moon-up time this night (from its illuminated fraction) */
  upCategory: MoonCategory;
};
export type CheckTelescope = {
  telescopeId: number;
  name: string;
  /** telescopes with the same key share the weather draw */
  siteKey: string;
  nights: CheckNight[];
  /** month 1–12 at index 0–11; null = no setting (taken as 1) */
  clearFractions: (number | null)[];
};
export type CheckEpoch = {
  date: string;
  /** first and last night index (in the telescope's nights) in which it may be taken */
  fromNight: number;
  toNight: number;
};
export type CheckObservation = {
  observationId: number;
  label: string;
  telescopeId: number;
  moonCategory: MoonCategory;
  /** one visit (epoch), hours */
  visitHours: number;
  /** visits wanted in the call's semester (for astrometry: the epochs below) */
  visits: number;
  /** observable windows per night (ms), aligned with the telescope's nights */
  windows: CheckInterval[][];
  astrometry: null | {
    raDeg: number;
    decDeg: number;
    perEpochPrecisionMas: number | null;
    requiredPmPrecisionMasPerYr: number | null;
    /** this semester's planned epochs, in date order */
    epochs: CheckEpoch[];
    /** epochs of the other semesters of the baseline, taken as planned (ms) */
    otherEpochTimes: number[];
  };
};
export type CheckProgramme = {
  proposalId: number;
  code: string | null;
  title: string;
  tier: AllocationTier;
  /** 1 = top of the board */
  position: number;
  /** allocated hours in the call's semester */
  allocation: { telescopeId: number; moonCategory: MoonCategory; hours: number }[];
  observations: CheckObservation[];
  /** why an observation could not be simulated (missing exposure, …) */
  notes?: string[];
};
export type CheckInput = { semesterCode: string; telescopes: CheckTelescope[]; programmes: CheckProgramme[] };

export type CheckOptions = {
  realisations: number;
  seed: number;
  onProgress?: (done: number, total: number) => void;
  /** realisations between progress calls (default: 1 % of them) */
  progressEvery?: number;
  /** return the first realisation's clear nights and used hours per night (tests) */
  trace?: boolean;
};

// ---------------------------------------------------------------------------------------------
// Output

export type ProgrammeOutcome = {
  proposalId: number;
  code: string | null;
  title: string;
  tier: AllocationTier;
  /** its place on the board; null to a chair conflicted on it (`withholdPositions`) */
  position: number | null;
  allocatedHours: number;
  /** hours of the visits the allocation covers */
  plannedHours: number;
  plannedVisits: number;
  /** visits the observations want in the semester */
  wantedVisits: number;
  /** null when nothing is planned this semester */
  completionProbability: number | null;
  expectedExecutedHours: number;
  /** executed / planned hours */
  expectedExecutedFraction: number | null;
  epochs: null | { wanted: number; planned: number; expectedAchieved: number };
  astrometry: {
    observationId: number;
    label: string;
    requiredPmPrecisionMasPerYr: number | null;
    /** every planned epoch taken */
    plannedPmPrecisionMasPerYr: number | null;
    /** mean over the realisations in which the fit is determined */
    expectedPmPrecisionMasPerYr: number | null;
    probabilityMet: number | null;
    undeterminedFraction: number;
  }[];
  flag: null | "assured-below-goal" | "queue-below-goal";
  notes: string[];
};
export type TelescopeOutcome = {
  telescopeId: number;
  name: string;
  nights: number;
  darkHours: number;
  expectedClearDarkHours: number;
  expectedUsedHours: number;
  /** expected used / dark hours */
  expectedUseOfDark: number;
  /** expected used / clear dark hours */
  expectedUseOfClearDark: number | null;
  maxUsedHours: number;
  clearFractions: (number | null)[];
};
export type SemesterCheckResult = {
  semesterCode: string;
  realisations: number;
  seed: number;
  goals: typeof COMPLETION_GOALS;
  rules: string[];
  notes: string[];
  programmes: ProgrammeOutcome[];
  telescopes: TelescopeOutcome[];
  trace?: { telescopeId: number; clear: boolean[]; usedHours: number[]; darkHours: number[] }[];
};

// ---------------------------------------------------------------------------------------------

const MOON_RANK: Record<MoonCategory, number> = { dark: 0, grey: 1, bright: 2 };
const TIER_RANK: Record<AllocationTier, number> = { assured: 0, queue: 1, filler: 2 };
const H = 3_600_000;
const EPS = 1e-9;
/** allocated hours come from the sheet's totals, rounded to 0.01 h: a visit counts as covered within that */
export const COVER_TOLERANCE_HOURS = 0.01;
const MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"];
const round = (x: number, digits = 4) => Math.round(x * 10 ** digits) / 10 ** digits;

/** Intervals of `a` minus those of `b` (both sorted, disjoint). */
function subtract(a: CheckInterval[], b: CheckInterval[]): CheckInterval[] {
  const out: CheckInterval[] = [];
  for (const w of a) {
    let start = w.start;
    for (const u of b) {
      if (u.end <= start || u.start >= w.end) continue;
      if (u.start > start) out.push({ start, end: u.start });
      start = Math.max(start, u.end);
      if (start >= w.end) break;
    }
    if (start < w.end) out.push({ start, end: w.end });
  }
  return out;
}

type Obs = {
  p: number;
  o: CheckObservation;
  t: number;
  cell: number;
  visit: number;
  planned: number;
  epochBase: number;
  astro: boolean;
};

export function runSemesterCheck(input: CheckInput, options: CheckOptions): SemesterCheckResult {
  const R = Math.max(1, Math.floor(options.realisations));
  const notes: string[] = [];
  const telescopes = input.telescopes;
  const tIndex = new Map(telescopes.map((t, i) => [t.telescopeId, i]));

  // Nights: dark length and Moon-up time in hours from the start of darkness.
  const nightCount = telescopes.map((t) => t.nights.length);
  const dark = telescopes.map((t) => Float64Array.from(t.nights, (n) => (n.darkStart !== null && n.darkEnd !== null ? Math.max(0, (n.darkEnd - n.darkStart) / H) : 0)));
  const midMs = telescopes.map((t) => Float64Array.from(t.nights, (n) => (n.darkStart !== null && n.darkEnd !== null ? (n.darkStart + n.darkEnd) / 2 : 0)));
  const clearOf = telescopes.map((t) => {
    const missing = t.nights.filter((n) => t.clearFractions[n.month - 1] == null).map((n) => n.month);
    const months = [...new Set(missing)].sort((a, b) => a - b);
    if (months.length) notes.push(`${t.name}: no clear fraction is set for ${months.map((m) => MONTHS[m - 1]).join(", ")}; those nights count as clear (fraction 1).`);
    return Float64Array.from(t.nights, (n) => Math.min(1, Math.max(0, t.clearFractions[n.month - 1] ?? 1)));
  });

  // Weather draws: one per site and date.
  const siteKeys = [...new Set(telescopes.map((t) => t.siteKey))].sort();
  const siteDates = siteKeys.map((k) => [...new Set(telescopes.filter((t) => t.siteKey === k).flatMap((t) => t.nights.map((n) => n.date)))].sort());
  const drawBase: number[] = [];
  let draws = 0;
  for (const dates of siteDates) {
    drawBase.push(draws);
    draws += dates.length;
  }
  const drawIndex = telescopes.map((t) => {
    const s = siteKeys.indexOf(t.siteKey);
    const at = new Map(siteDates[s].map((d, i) => [d, drawBase[s] + i]));
    return Int32Array.from(t.nights, (n) => at.get(n.date)!);
  });

  // Programmes in priority order; allocation cells per programme × telescope × moon category.
  const programmes = input.programmes.map((p, i) => ({ p, i })).sort((a, b) => TIER_RANK[a.p.tier] - TIER_RANK[b.p.tier] || a.p.position - b.p.position || a.p.proposalId - b.p.proposalId);
  const cellHours: number[] = [];
  const cellKey = new Map<string, number>();
  const obs: Obs[] = [];
  const epochFrom: number[] = [];
  const epochTo: number[] = [];
  const epochObs: number[] = [];
  const progNotes: string[][] = input.programmes.map((p) => [...(p.notes ?? [])]);
  const progAllocated = new Float64Array(input.programmes.length);
  const progPlannedHours = new Float64Array(input.programmes.length);
  const progPlannedVisits = new Int32Array(input.programmes.length);
  const progWantedVisits = new Int32Array(input.programmes.length);
  const progWantedEpochs = new Int32Array(input.programmes.length);
  const progPlannedEpochs = new Int32Array(input.programmes.length);
  const progHasEpochs = new Uint8Array(input.programmes.length);
  for (const { p, i } of programmes) {
    const budget = new Map<string, number>();
    for (const a of p.allocation) {
      if (!(a.hours > 0) || !tIndex.has(a.telescopeId)) continue;
      const k = `${i}|${a.telescopeId}|${a.moonCategory}`;
      budget.set(k, (budget.get(k) ?? 0) + a.hours);
      progAllocated[i] += a.hours;
    }
    for (const [k, h] of budget) {
      cellKey.set(k, cellHours.length);
      cellHours.push(h);
    }
    // epochs first, then the other observations, each in their order
    const ordered = [...p.observations].sort((a, b) => Number(b.astrometry !== null) - Number(a.astrometry !== null));
    for (const o of ordered) {
      const t = tIndex.get(o.telescopeId);
      const wanted = o.astrometry ? o.astrometry.epochs.length : Math.max(0, Math.floor(o.visits));
      progWantedVisits[i] += wanted;
      if (o.astrometry) {
        progHasEpochs[i] = 1;
        progWantedEpochs[i] += wanted;
      }
      if (t === undefined || !(o.visitHours > 0)) {
        if (wanted > 0) progNotes[i].push(`${o.label}: not simulated (${t === undefined ? "its telescope has no nights in this check" : "no time per visit"}).`);
        continue;
      }
      const k = `${i}|${o.telescopeId}|${o.moonCategory}`;
      const cell = cellKey.get(k);
      const left = cell === undefined ? 0 : budget.get(k)!;
      const planned = Math.min(wanted, Math.floor((left + COVER_TOLERANCE_HOURS) / o.visitHours));
      if (cell !== undefined) budget.set(k, left - planned * o.visitHours);
      if (planned < wanted) progNotes[i].push(`${o.label}: the allocation covers ${planned} of its ${wanted} visits of ${round(o.visitHours, 2)} h.`);
      progPlannedVisits[i] += planned;
      progPlannedHours[i] += planned * o.visitHours;
      if (o.astrometry) progPlannedEpochs[i] += planned;
      const epochBase = epochFrom.length;
      if (o.astrometry) {
        for (const e of o.astrometry.epochs.slice(0, planned)) {
          epochFrom.push(e.fromNight);
          epochTo.push(e.toNight);
          epochObs.push(obs.length);
        }
      }
      obs.push({ p: i, o, t, cell: cell ?? -1, visit: o.visitHours, planned, epochBase, astro: o.astrometry !== null });
    }
  }

  // Per telescope and night, the observations that can take a visit there, in priority order,
  // with their usable intervals (hours from the start of darkness) long enough for one visit.
  const candStart = telescopes.map((_, t) => new Int32Array(nightCount[t] + 1));
  const candObs: Int32Array[] = [];
  const candIv: Int32Array[] = [];
  const candIvCount: Int32Array[] = [];
  const ivLo: number[] = [];
  const ivHi: number[] = [];
  for (let t = 0; t < telescopes.length; t++) {
    const tel = telescopes[t];
    const here = obs.map((x, j) => ({ x, j })).filter(({ x }) => x.t === t && x.planned > 0);
    const co: number[] = [];
    const ci: number[] = [];
    const cc: number[] = [];
    for (let n = 0; n < nightCount[t]; n++) {
      candStart[t][n] = co.length;
      const night = tel.nights[n];
      if (night.darkStart === null || night.darkEnd === null || dark[t][n] <= 0) continue;
      const d0 = night.darkStart;
      const d1 = night.darkEnd;
      const up = night.moonUp
        .map((u) => ({ start: Math.max(u.start, d0), end: Math.min(u.end, d1) }))
        .filter((u) => u.end > u.start)
        .sort((a, b) => a.start - b.start);
      for (const { x, j } of here) {
        const windows = (x.o.windows[n] ?? [])
          .map((w) => ({ start: Math.max(w.start, d0), end: Math.min(w.end, d1) }))
          .filter((w) => w.end > w.start)
          .sort((a, b) => a.start - b.start);
        if (windows.length === 0) continue;
        const usable = MOON_RANK[night.upCategory] <= MOON_RANK[x.o.moonCategory] ? windows : subtract(windows, up);
        const first = ivLo.length;
        for (const u of usable) {
          if ((u.end - u.start) / H + EPS < x.visit) continue;
          ivLo.push((u.start - d0) / H);
          ivHi.push((u.end - d0) / H);
        }
        if (ivLo.length === first) continue;
        co.push(j);
        ci.push(first);
        cc.push(ivLo.length - first);
      }
    }
    candStart[t][nightCount[t]] = co.length;
    candObs.push(Int32Array.from(co));
    candIv.push(Int32Array.from(ci));
    candIvCount.push(Int32Array.from(cc));
  }
  const IvLo = Float64Array.from(ivLo);
  const IvHi = Float64Array.from(ivHi);

  // Astrometry: parallax factors per observation and night (mid-darkness), computed when first needed.
  const astroObs = obs.map((x, j) => ({ x, j })).filter(({ x }) => x.astro && x.o.astrometry!.perEpochPrecisionMas !== null && x.o.astrometry!.perEpochPrecisionMas! > 0);
  const factorCache = new Map<number, Float64Array>();
  const factorsAt = (j: number, n: number) => {
    const x = obs[j];
    let row = factorCache.get(j);
    if (!row) {
      row = new Float64Array(nightCount[x.t] * 2).fill(Number.NaN);
      factorCache.set(j, row);
    }
    if (Number.isNaN(row[2 * n])) {
      const f = parallaxFactors(x.o.astrometry!.raDeg, x.o.astrometry!.decDeg, midMs[x.t][n]);
      row[2 * n] = f.ra;
      row[2 * n + 1] = f.dec;
    }
    return { ra: row[2 * n], dec: row[2 * n + 1] };
  };
  const otherEpochs = new Map<number, { time: number; sigmaMas: number; factors: { ra: number; dec: number } }[]>();
  for (const { x, j } of astroObs) {
    const a = x.o.astrometry!;
    otherEpochs.set(j, a.otherEpochTimes.map((time) => ({ time, sigmaMas: a.perEpochPrecisionMas!, factors: parallaxFactors(a.raDeg, a.decDeg, time) })));
  }
  const fitMemo = new Map<string, number>();
  const worstPm = (j: number, nights: number[]) => {
    const key = `${j}:${nights.join(",")}`;
    const hit = fitMemo.get(key);
    if (hit !== undefined) return hit;
    const x = obs[j];
    const a = x.o.astrometry!;
    const epochs = [...otherEpochs.get(j)!, ...nights.map((n) => ({ time: midMs[x.t][n], sigmaMas: a.perEpochPrecisionMas!, factors: factorsAt(j, n) }))];
    const fit = fitPrecision(a.raDeg, a.decDeg, epochs);
    const v = fit.determined ? Math.max(fit.properMotionPrecisionMasPerYr.ra, fit.properMotionPrecisionMasPerYr.dec) : Number.POSITIVE_INFINITY;
    fitMemo.set(key, v);
    return v;
  };
  const plannedPm = new Map<number, number>();
  for (const { x, j } of astroObs) {
    const a = x.o.astrometry!;
    const epochs = [
      ...otherEpochs.get(j)!,
      ...a.epochs.map((e) => {
        const n = Math.min(Math.max(Math.round((e.fromNight + e.toNight) / 2), 0), nightCount[x.t] - 1);
        return { time: midMs[x.t][n] || Date.parse(e.date), sigmaMas: a.perEpochPrecisionMas!, factors: factorsAt(j, n) };
      }),
    ];
    const fit = fitPrecision(a.raDeg, a.decDeg, epochs);
    plannedPm.set(j, fit.determined ? Math.max(fit.properMotionPrecisionMasPerYr.ra, fit.properMotionPrecisionMasPerYr.dec) : Number.POSITIVE_INFINITY);
  }

  // State reused by every realisation.
  const P = input.programmes.length;
  const visitsLeft = new Int32Array(obs.length);
  const epochNight = new Int32Array(epochFrom.length);
  const epochPtr = new Int32Array(obs.length);
  const cellLeft = new Float64Array(cellHours.length);
  const executed = new Float64Array(P);
  const EpochFrom = Int32Array.from(epochFrom);
  const EpochTo = Int32Array.from(epochTo);
  const u = new Float64Array(draws);
  const MAXFREE = 1024;
  const freeLo = new Float64Array(MAXFREE);
  const freeHi = new Float64Array(MAXFREE);
  // accumulators
  const completeCount = new Float64Array(P);
  const executedSum = new Float64Array(P);
  const epochsSum = new Float64Array(P);
  const usedSum = new Float64Array(telescopes.length);
  const clearDarkSum = new Float64Array(telescopes.length);
  const usedMax = new Float64Array(telescopes.length);
  const pmSum = new Map<number, { sum: number; determined: number; met: number }>(astroObs.map(({ j }) => [j, { sum: 0, determined: 0, met: 0 }]));
  const trace: SemesterCheckResult["trace"] = options.trace ? [] : undefined;

  const rng = mersenne(options.seed >>> 0);
  const every = Math.max(1, Math.floor(options.progressEvery ?? Math.ceil(R / 100)));

  for (let r = 0; r < R; r++) {
    for (let k = 0; k < draws; k++) u[k] = uniformFloat64(rng);
    for (let j = 0; j < obs.length; j++) {
      visitsLeft[j] = obs[j].astro ? 0 : obs[j].planned;
      epochPtr[j] = obs[j].epochBase;
    }
    epochNight.fill(-1);
    for (let c = 0; c < cellHours.length; c++) cellLeft[c] = cellHours[c];
    executed.fill(0);

    for (let t = 0; t < telescopes.length; t++) {
      const cs = candStart[t];
      const co = candObs[t];
      const ci = candIv[t];
      const cc = candIvCount[t];
      const dk = dark[t];
      const cf = clearOf[t];
      const di = drawIndex[t];
      let used = 0;
      const tr = trace && r === 0 ? { telescopeId: telescopes[t].telescopeId, clear: [] as boolean[], usedHours: [] as number[], darkHours: Array.from(dk, (d) => round(d, 6)) } : null;
      for (let n = 0; n < nightCount[t]; n++) {
        const clear = u[di[n]] < cf[n];
        if (tr) tr.clear.push(clear);
        if (!clear || dk[n] <= 0) {
          if (tr) tr.usedHours.push(0);
          continue;
        }
        clearDarkSum[t] += dk[n];
        let nFree = 1;
        freeLo[0] = 0;
        freeHi[0] = dk[n];
        let freeTotal = dk[n];
        let nightUsed = 0;
        for (let q = cs[n]; q < cs[n + 1]; q++) {
          const j = co[q];
          const x = obs[j];
          const v = x.visit;
          if (freeTotal + EPS < v) continue;
          if (x.cell < 0 || cellLeft[x.cell] + COVER_TOLERANCE_HOURS < v) continue;
          let epoch = -1;
          if (x.astro) {
            const end = x.epochBase + x.planned;
            let k = epochPtr[j];
            while (k < end && (epochNight[k] >= 0 || EpochTo[k] < n)) k++;
            epochPtr[j] = k;
            for (; k < end && EpochFrom[k] <= n; k++) {
              if (epochNight[k] < 0 && EpochTo[k] >= n) {
                epoch = k;
                break;
              }
            }
            if (epoch < 0) continue;
          } else if (visitsLeft[j] <= 0) continue;
          // earliest free time inside one of its usable intervals that holds the visit
          let placed = false;
          const i0 = ci[q];
          const i1 = i0 + cc[q];
          for (let iv = i0; iv < i1 && !placed; iv++) {
            const a = IvLo[iv];
            const b = IvHi[iv];
            for (let f = 0; f < nFree; f++) {
              if (freeLo[f] >= b) break;
              const s = freeLo[f] > a ? freeLo[f] : a;
              const e = freeHi[f] < b ? freeHi[f] : b;
              if (e - s + EPS < v) continue;
              const end = s + v;
              const before = s - freeLo[f] > EPS;
              const after = freeHi[f] - end > EPS;
              if (before && after) {
                if (nFree < MAXFREE) {
                  freeLo.copyWithin(f + 2, f + 1, nFree);
                  freeHi.copyWithin(f + 2, f + 1, nFree);
                  freeLo[f + 1] = end;
                  freeHi[f + 1] = freeHi[f];
                  freeHi[f] = s;
                  nFree++;
                } else continue;
              } else if (before) freeHi[f] = s;
              else if (after) freeLo[f] = end;
              else {
                freeLo.copyWithin(f, f + 1, nFree);
                freeHi.copyWithin(f, f + 1, nFree);
                nFree--;
              }
              placed = true;
              break;
            }
          }
          if (!placed) continue;
          freeTotal -= v;
          nightUsed += v;
          cellLeft[x.cell] -= v;
          executed[x.p] += v;
          if (epoch >= 0) epochNight[epoch] = n;
          else visitsLeft[j]--;
        }
        used += nightUsed;
        if (tr) tr.usedHours.push(round(nightUsed, 6));
      }
      usedSum[t] += used;
      if (used > usedMax[t]) usedMax[t] = used;
      if (tr) trace!.push(tr);
    }

    // outcomes of this realisation
    const done = new Uint8Array(P).fill(1);
    const epochs = new Int32Array(P);
    for (let j = 0; j < obs.length; j++) {
      const x = obs[j];
      if (x.astro) {
        for (let k = x.epochBase; k < x.epochBase + x.planned; k++) {
          if (epochNight[k] >= 0) epochs[x.p]++;
          else done[x.p] = 0;
        }
      } else if (visitsLeft[j] > 0) done[x.p] = 0;
    }
    for (let i = 0; i < P; i++) {
      if (done[i] && progPlannedVisits[i] > 0) completeCount[i]++;
      executedSum[i] += executed[i];
      epochsSum[i] += epochs[i];
    }
    for (const { x, j } of astroObs) {
      const nights: number[] = [];
      for (let k = x.epochBase; k < x.epochBase + x.planned; k++) if (epochNight[k] >= 0) nights.push(epochNight[k]);
      const pm = worstPm(j, nights);
      const acc = pmSum.get(j)!;
      if (Number.isFinite(pm)) {
        acc.sum += pm;
        acc.determined++;
        const req = x.o.astrometry!.requiredPmPrecisionMasPerYr;
        if (req !== null && pm <= req) acc.met++;
      }
    }
    if (options.onProgress && ((r + 1) % every === 0 || r + 1 === R)) options.onProgress(r + 1, R);
  }

  const out: ProgrammeOutcome[] = programmes.map(({ p, i }) => {
    const completion = progPlannedVisits[i] > 0 ? completeCount[i] / R : null;
    const goal = p.tier === "assured" ? COMPLETION_GOALS.assured : p.tier === "queue" ? COMPLETION_GOALS.queue : null;
    const flag = completion !== null && goal !== null && completion < goal ? (p.tier === "assured" ? "assured-below-goal" : "queue-below-goal") : null;
    if (progPlannedVisits[i] === 0 && progAllocated[i] > 0) progNotes[i].push("No visit fits in the allocated hours, so nothing is scheduled.");
    return {
      proposalId: p.proposalId,
      code: p.code,
      title: p.title,
      tier: p.tier,
      position: p.position,
      allocatedHours: round(progAllocated[i]),
      plannedHours: round(progPlannedHours[i]),
      plannedVisits: progPlannedVisits[i],
      wantedVisits: progWantedVisits[i],
      completionProbability: completion === null ? null : round(completion),
      expectedExecutedHours: round(executedSum[i] / R),
      expectedExecutedFraction: progPlannedHours[i] > 0 ? round(executedSum[i] / R / progPlannedHours[i]) : null,
      epochs: progHasEpochs[i] ? { wanted: progWantedEpochs[i], planned: progPlannedEpochs[i], expectedAchieved: round(epochsSum[i] / R) } : null,
      astrometry: astroObs
        .filter(({ x }) => x.p === i)
        .map(({ x, j }) => {
          const acc = pmSum.get(j)!;
          const a = x.o.astrometry!;
          const planned = plannedPm.get(j)!;
          return {
            observationId: x.o.observationId,
            label: x.o.label,
            requiredPmPrecisionMasPerYr: a.requiredPmPrecisionMasPerYr,
            plannedPmPrecisionMasPerYr: Number.isFinite(planned) ? round(planned) : null,
            expectedPmPrecisionMasPerYr: acc.determined ? round(acc.sum / acc.determined) : null,
            probabilityMet: a.requiredPmPrecisionMasPerYr === null ? null : round(acc.met / R),
            undeterminedFraction: round(1 - acc.determined / R),
          };
        }),
      flag,
      notes: progNotes[i],
    };
  });
  return {
    semesterCode: input.semesterCode,
    realisations: R,
    seed: options.seed,
    goals: COMPLETION_GOALS,
    rules: CHECK_RULES,
    notes,
    programmes: out,
    telescopes: telescopes.map((t, i) => {
      const darkHours = dark[i].reduce((s, d) => s + d, 0);
      const used = usedSum[i] / R;
      const clearDark = clearDarkSum[i] / R;
      return {
        telescopeId: t.telescopeId,
        name: t.name,
        nights: nightCount[i],
        darkHours: round(darkHours, 3),
        expectedClearDarkHours: round(clearDark, 3),
        expectedUsedHours: round(used, 3),
        expectedUseOfDark: darkHours > 0 ? round(used / darkHours) : 0,
        expectedUseOfClearDark: clearDark > 0 ? round(used / clearDark) : null,
        maxUsedHours: round(usedMax[i], 3),
        clearFractions: t.clearFractions,
      };
    }),
    ...(trace ? { trace } : {}),
  };
}
