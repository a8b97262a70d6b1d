// The feasibility sheet: the technical case of one proposal, computed from plain data (no
// database) with the science core in ./astro. `feasibility.server.ts` loads the data and calls
// `buildFeasibilitySheet`; the route, the JSON API, the submission check and the proposal PDF
// all read the same result.
//
// Conventions (stated on the sheet):
// - An observation asking for dark time can use dark nights only; grey time: dark or grey
//   nights; bright time: any night. Moon categories and twilight as in astro/visibility.ts.
// - Exposure and SNR per frame at the observation's airmass limit (the worst airmass it accepts),
//   so the SNR holds wherever the target is observed. Saturation is checked at the target's best
//   airmass (at transit), where the star is brightest.
// - Time per epoch = frames × (exposure + readout) + acquisition.
// - An observation is astrometric when it has a baseline (years). Its epochs are the PI's
//   planned epochs when there are any, otherwise a plan proposed by astro/astrometry.ts
//   (exactly "epochs per semester" in each semester of the baseline — the call's semester and
//   the ones after it, with the dates the office set where a call exists, else six-month steps —
//   placed by the planner inside that semester's visibility windows).
// - Moon time: every observable window is split at moonrise and moonset (astro/visibility.ts,
//   MOON_TIME_RULE). An observation asking for dark time may use the dark hours only; grey: dark
//   and grey hours; bright: all hours.
// - Magnitudes per band: the exposure uses the target's magnitude in the observation's band.
//   When the target has none in that band, the nearest band it has is used with colour 0 and a
//   warning says so; with no magnitude at all, nothing is assumed.

import { AIRMASS_FORMULA, airmass } from "../astro/airmass";
import {
  EPOCH_TOLERANCE_NIGHTS,
  FRAGILE_BELOW_NIGHTS,
  centroidPrecisionMas,
  epochPrecisionMas,
  fitPrecision,
  roundNoNegativeZero,
  parallaxFactors,
  planEpochs,
  type Plan,
} from "../astro/astrometry";
import type { Target as AstroTarget } from "../astro/coordinates";
import { computeExposure, secondsPerEpoch, type ExposureResult } from "../astro/exposure";
import { BANDS, isBand, type Band } from "../astro/bands";
import { DAY_MS, dayNumber } from "../astro/time";
import { semesterSequence, type SemesterSpan } from "../semesters";
import {
  MOON_CATEGORY_THRESHOLDS,
  MOON_TIME_RULE,
  REFRACTION_MODEL,
  darkHoursByMoon,
  ensureMoonTimes,
  TWILIGHT_ALTITUDE_DEG,
  limitAltitude,
  moonAllows,
  prepareSiteNights,
  summarise,
  targetNights,
  type Site,
  type TargetNight,
} from "../astro/visibility";
import { moonCategories, type MoonCategory } from "../domain";

// ---------------------------------------------------------------------------------------------
// Input

export type SheetTelescope = { id: number; name: string; site: Site; apertureM: number; centralObstruction: number };
export type SheetInstrument = {
  id: number;
  telescopeId: number;
  name: string;
  pixelScaleArcsec: number;
  readNoiseE: number;
  darkEPerPixelPerS: number;
  gainEPerAdu: number;
  fullWellE: number;
  readoutSeconds: number;
  acquisitionSeconds: number;
  astrometricFloorMas: number;
  throughput: number;
};
export type SheetFilter = {
  id: number;
  instrumentId: number;
  band: string;
  zeroPointPhotons: number;
  extinctionMagPerAirmass: number;
  skyDarkMag: number;
  skyGreyMag: number;
  skyBrightMag: number;
};
export type SheetTarget = {
  id: number;
  name: string;
  raDeg: number;
  decDeg: number;
  pmRaMasPerYr: number | null;
  pmDecMasPerYr: number | null;
  /** magnitudes by band (band → magnitude); `magnitude`/`band` are the first of them */
  magnitudes: Record<string, number>;
  magnitude: number | null;
  band: string | null;
};
export type SheetEpoch = { id?: number; date: string; semesterCode: string; status: "planned" | "observed" | "missed" };
export type SheetObservation = {
  id: number;
  targetId: number;
  instrumentId: number;
  filterId: number;
  snrGoal: number | null;
  exposureSeconds: number | null;
  framesPerEpoch: number;
  epochsPerSemester: number;
  baselineYears: number | null;
  requiredPmPrecisionMasPerYr: number | null;
  moonCategory: MoonCategory;
  maxAirmass: number;
  seeingArcsec: number;
  epochs: SheetEpoch[];
  /** ± nights in which an epoch may be taken (default EPOCH_TOLERANCE_NIGHTS) */
  epochToleranceNights?: number;
};
export type FeasibilityInput = {
  proposalId: number;
  call: {
    semesterCode: string;
    semesterStart: string;
    semesterEnd: string;
    offers: { telescopeId: number; moonCategory: MoonCategory; hoursOffered: number }[];
    /** dates of later semesters where the office has set up their calls (code, start, end) */
    laterSemesters?: SemesterSpan[];
  };
  isMultiSemester: boolean;
  semestersRequested: string[];
  telescopes: SheetTelescope[];
  instruments: SheetInstrument[];
  filters: SheetFilter[];
  targets: SheetTarget[];
  observations: SheetObservation[];
};

// ---------------------------------------------------------------------------------------------
// Output (plain JSON: the route, the API and the PDF read it)

export type Problem = { severity: "blocking" | "warning"; message: string; targetId?: number; observationId?: number };

export type SheetNight = {
  date: string;
  moonCategory: MoonCategory;
  moonIllumination: number;
  darkHours: number;
  moonrise: string | null;
  moonset: string | null;
  /** the dark interval split at moonrise and moonset */
  darkHoursByMoonCategory: Record<MoonCategory, number>;
};

export type ObservationSheet = {
  observationId: number;
  targetId: number;
  targetName: string;
  telescopeId: number;
  telescopeName: string;
  instrumentName: string;
  band: string;
  moonCategory: MoonCategory;
  maxAirmass: number;
  minAltitudeDeg: number;
  seeingArcsec: number;
  visibility: {
    observableHours: number;
    byMoonCategory: Record<MoonCategory, number>;
    /** hours of this observation's moon category or darker, split at moonrise and moonset */
    usableHours: number;
    /** nights with some usable hours */
    usableNights: number;
    darkHours: number;
    bestMonths: { month: string; observableHours: number }[];
    /** aligned with the site's nights (`sheet.sites[telescopeId].nights`) */
    hoursPerNight: number[];
    /** the night with the longest window, for the altitude chart */
    bestNight: string | null;
    bestAirmass: number | null;
  };
  exposure:
    | (Pick<
        ExposureResult,
        | "exposureSeconds"
        | "snr"
        | "sourceElectrons"
        | "skyElectronsPerPixel"
        | "darkElectronsPerPixel"
        | "pixels"
        | "readNoiseE"
        | "peakPixelElectrons"
        | "fullWellE"
        | "apertureRadiusArcsec"
        | "apertureFraction"
        | "skyMagPerArcsec2"
        | "extinctionMagPerAirmass"
        | "noise"
        | "regime"
      > & {
        airmass: number;
        magnitude: number;
        /** peak pixel at the best airmass (saturation check) */
        peakAtBestAirmassElectrons: number;
        saturated: boolean;
        /** longest exposure that keeps the peak pixel below full well at the best airmass */
        maxUnsaturatedSeconds: number;
        mode: "snr-goal" | "exposure-time";
      })
    | null;
  timePerEpoch: {
    frames: number;
    exposureSeconds: number | null;
    readoutSeconds: number;
    acquisitionSeconds: number;
    totalSeconds: number | null;
  };
  /** epochs counted in the call's semester */
  epochsThisSemester: number;
  requestedHoursThisSemester: number;
  /** which band's magnitude the exposure used, and whether it is the observation's own */
  magnitudeUsed: { band: string; magnitude: number; assumed: boolean } | null;
  astrometry: null | {
    baselineYears: number;
    source: "planned" | "proposed";
    perEpochPrecisionMas: number | null;
    /** photon-noise part of the per-epoch precision and the instrument's floor (mas) */
    photonPrecisionMas: number | null;
    floorMas: number;
    floorDominated: boolean;
    requiredPmPrecisionMasPerYr: number | null;
    /** epochs per semester asked for, and per semester placed */
    epochsPerSemester: number;
    toleranceNights: number;
    /** what would meet the requirement over the same baseline, when it is not met */
    advice: string[];
    properMotionPrecisionMasPerYr: { ra: number; dec: number } | null;
    parallaxPrecisionMas: number | null;
    determined: boolean;
    met: boolean | null;
    epochs: {
      date: string;
      semesterCode: string;
      status: SheetEpoch["status"];
      parallaxFactorRa: number;
      parallaxFactorDec: number;
      observableHours: number | null;
      inWindow: boolean | null;
      /** ± tolerance nights around the epoch and how many of them have time for the visit */
      window: { from: string; to: string; usableNights: number } | null;
      fragile: boolean;
    }[];
    perSemester: { semesterCode: string; epochs: number; hours: number }[];
    parallaxCurve: { date: string; ra: number; dec: number }[];
    message?: string;
  };
};

export type FeasibilitySheet = {
  proposalId: number;
  semesterCode: string;
  semesterStart: string;
  semesterEnd: string;
  computedAt: string;
  conventions: {
    moonCategoryThresholds: typeof MOON_CATEGORY_THRESHOLDS;
    moonTimeRule: string;
    twilightAltitudeDeg: number;
    refraction: string;
    airmassFormula: string;
    exposure: string;
    centroid: string;
    timePerEpoch: string;
  };
  sites: Record<number, { telescopeName: string; site: Site; nights: SheetNight[] }>;
  observations: ObservationSheet[];
  targets: {
    targetId: number;
    name: string;
    raDeg: number;
    decDeg: number;
    pmRaMasPerYr: number | null;
    pmDecMasPerYr: number | null;
    magnitude: number | null;
    band: string | null;
    magnitudes: Record<string, number>;
    observationIds: number[];
  }[];
  /** per telescope, semester and moon category; the call's own semester first, then the later ones in order */
  totals: { telescopeId: number; telescopeName: string; semesterCode: string; moonCategory: MoonCategory; hours: number; offeredHours: number | null }[];
  /** hours asked for in each semester, the call's own first (always present), then the later ones */
  requestedHoursBySemester: { semesterCode: string; hours: number; callSemester: boolean }[];
  /** hours asked for in the call's own semester */
  requestedHoursThisSemester: number;
  /** all semesters together */
  requestedHours: number;
  problems: Problem[];
};

// ---------------------------------------------------------------------------------------------

const MOON_RANK: Record<MoonCategory, number> = { dark: 0, grey: 1, bright: 2 };
/** a peak above this fraction of full well is in the detector's non-linear range: a warning */
export const NONLINEAR_FRACTION = 0.8;
/** hours requested above this fraction of the usable hours: a warning (weather, other programmes) */
export const TIGHT_FRACTION = 0.5;
/** a single frame longer than this collects many cosmic rays and tracking errors: a warning */
export const LONG_FRAME_SECONDS = 1800;

const r = (x: number, digits = 2) => Math.round(x * 10 ** digits) / 10 ** digits;
const splitRounded = (x: Record<MoonCategory, number>, digits: number) => ({ dark: r(x.dark, digits), grey: r(x.grey, digits), bright: r(x.bright, digits) });

export function nightsInSemester(start: string, end: string): number {
  return dayNumber(end) - dayNumber(start) + 1;
}

/**
 * The magnitude an exposure in `band` uses: the target's own in that band, else the one in the
 * nearest band it has (by effective wavelength, U B V R I), flagged as assumed (colour 0).
 */
export function magnitudeFor(magnitudes: Record<string, number>, band: string): { band: string; magnitude: number; assumed: boolean } | null {
  if (Number.isFinite(magnitudes[band])) return { band, magnitude: magnitudes[band], assumed: false };
  const order: readonly string[] = BANDS;
  const at = order.indexOf(band);
  const have = Object.keys(magnitudes).filter((b) => Number.isFinite(magnitudes[b]));
  if (have.length === 0) return null;
  const distance = (b: string) => (at < 0 || order.indexOf(b) < 0 ? 99 : Math.abs(order.indexOf(b) - at));
  const nearest = [...have].sort((a, b) => distance(a) - distance(b) || order.indexOf(a) - order.indexOf(b))[0];
  return { band: nearest, magnitude: magnitudes[nearest], assumed: true };
}

function asBand(band: string): Band {
  return isBand(band) ? band : "V";
}

function skyFor(filter: SheetFilter, category: MoonCategory) {
  return category === "dark" ? filter.skyDarkMag : category === "grey" ? filter.skyGreyMag : filter.skyBrightMag;
}

function astroTarget(t: SheetTarget): AstroTarget {
  return { raDeg: t.raDeg, decDeg: t.decDeg, pmRaCosDecMasPerYr: t.pmRaMasPerYr ?? 0, pmDecMasPerYr: t.pmDecMasPerYr ?? 0 };
}

function baselineNights(years: number) {
  return Math.min(Math.round(years * 365.25) + 1, 366 * 6);
}

// The planner searches every night of the baseline; its answer depends only on its input, so
// repeated loads of the sheet (live updates) reuse it.
const planCache = new Map<string, Plan>();
function cachedPlan(input: Parameters<typeof planEpochs>[0]): Plan {
  const key = JSON.stringify(input);
  const hit = planCache.get(key);
  if (hit) return hit;
  const plan = planEpochs(input);
  planCache.set(key, plan);
  if (planCache.size > 256) planCache.delete(planCache.keys().next().value as string);
  return plan;
}

export function buildFeasibilitySheet(input: FeasibilityInput): FeasibilitySheet {
  const { call } = input;
  const problems: Problem[] = [];
  const count = nightsInSemester(call.semesterStart, call.semesterEnd);
  const telescopes = new Map(input.telescopes.map((t) => [t.id, t]));
  const instruments = new Map(input.instruments.map((i) => [i.id, i]));
  const filters = new Map(input.filters.map((f) => [f.id, f]));
  const targets = new Map(input.targets.map((t) => [t.id, t]));
  const sites: FeasibilitySheet["sites"] = {};
  const observations: ObservationSheet[] = [];
  const totals = new Map<string, { telescopeId: number; telescopeName: string; semesterCode: string; moonCategory: MoonCategory; hours: number }>();
  const addTotal = (telescope: SheetTelescope, semesterCode: string, moonCategory: MoonCategory, hours: number) => {
    const key = `${telescope.id}|${semesterCode}|${moonCategory}`;
    const row = totals.get(key) ?? { telescopeId: telescope.id, telescopeName: telescope.name, semesterCode, moonCategory, hours: 0 };
    row.hours += hours;
    totals.set(key, row);
  };

  if (input.observations.length === 0) {
    problems.push({ severity: "blocking", message: "The proposal has no observations yet: add at least one on the observations tab." });
  }
  for (const t of input.targets) {
    if (!input.observations.some((o) => o.targetId === t.id)) {
      problems.push({ severity: "warning", targetId: t.id, message: `Target ${t.name} has no observation, so no time is requested for it.` });
    }
  }

  for (const obs of [...input.observations].sort((a, b) => a.targetId - b.targetId || a.id - b.id)) {
    const target = targets.get(obs.targetId);
    const instrument = instruments.get(obs.instrumentId);
    const filter = filters.get(obs.filterId);
    const telescope = instrument ? telescopes.get(instrument.telescopeId) : undefined;
    if (!target || !instrument || !filter || !telescope) {
      problems.push({ severity: "blocking", observationId: obs.id, message: `Observation ${obs.id} refers to a target, instrument or filter that no longer exists: edit it.` });
      continue;
    }
    const label = `${target.name} (${telescope.name}, ${filter.band})`;
    const where = { targetId: target.id, observationId: obs.id };
    if (filter.instrumentId !== instrument.id) {
      problems.push({ severity: "blocking", ...where, message: `${label}: the filter does not belong to ${instrument.name}.` });
    }
    if (!call.offers.some((o) => o.telescopeId === telescope.id && o.hoursOffered > 0)) {
      problems.push({ severity: "blocking", ...where, message: `${label}: ${telescope.name} offers no time in call ${call.semesterCode}.` });
    }

    // Visibility over the call's semester (site nights prepared once, cached across targets).
    const prepared = prepareSiteNights(telescope.site, call.semesterStart, count);
    ensureMoonTimes(prepared);
    if (!sites[telescope.id]) {
      sites[telescope.id] = {
        telescopeName: telescope.name,
        site: telescope.site,
        nights: prepared.nights.map((n) => ({
          date: n.date,
          moonCategory: n.moonCategory,
          moonIllumination: r(n.moonIllumination, 3),
          darkHours: n.darkStart !== null && n.darkEnd !== null ? r((n.darkEnd - n.darkStart) / 3_600_000, 3) : 0,
          moonrise: n.moon?.moonrise != null ? new Date(n.moon.moonrise).toISOString() : null,
          moonset: n.moon?.moonset != null ? new Date(n.moon.moonset).toISOString() : null,
          darkHoursByMoonCategory: splitRounded(darkHoursByMoon(n), 3),
        })),
      };
    }
    const minAltitudeDeg = limitAltitude({ maxAirmass: obs.maxAirmass });
    const rows = targetNights(prepared, astroTarget(target), minAltitudeDeg);
    const summary = summarise(rows);
    const allowed = (c: MoonCategory) => moonAllows(obs.moonCategory, c);
    /** a night's observable hours in this observation's moon category or darker (split at moonrise/moonset) */
    const usableOf = (row: TargetNight) => {
      const split = row.hoursByMoonCategory as Record<MoonCategory, number>;
      return moonCategories.filter(allowed).reduce((sum, c) => sum + split[c], 0);
    };
    let usableHours = 0;
    let usableNights = 0;
    let best: TargetNight | null = null;
    for (const row of rows) {
      if (row.observableHours > 0 && (!best || row.observableHours > best.observableHours)) best = row;
      const h = usableOf(row);
      if (h > 0) {
        usableHours += h;
        usableNights += 1;
      }
    }
    const transitAltitude = 90 - Math.abs(telescope.site.latitudeDeg - target.decDeg);
    const bestAirmass = transitAltitude > 0 ? airmass(transitAltitude) : null;

    // Exposure and SNR per frame (CCD equation, astro/exposure.ts).
    let exposure: ObservationSheet["exposure"] = null;
    const exposureBase = {
      band: asBand(filter.band),
      airmass: obs.maxAirmass,
      seeingArcsec: obs.seeingArcsec,
      skyMagPerArcsec2: skyFor(filter, obs.moonCategory),
      extinctionMagPerAirmass: filter.extinctionMagPerAirmass,
      zeroPointPhotons: filter.zeroPointPhotons,
      telescope: { apertureM: telescope.apertureM, centralObstruction: telescope.centralObstruction },
      instrument: {
        throughput: instrument.throughput,
        pixelScaleArcsec: instrument.pixelScaleArcsec,
        readNoiseE: instrument.readNoiseE,
        darkEPerPixelPerS: instrument.darkEPerPixelPerS,
        fullWellE: instrument.fullWellE,
      },
    };
    const used = magnitudeFor(target.magnitudes, filter.band);
    if (used === null) {
      if (obs.snrGoal !== null) {
        problems.push({ severity: "blocking", ...where, message: `${label}: the target has no magnitude, so the exposure time for SNR ${obs.snrGoal} cannot be computed. Add its magnitude on the targets tab.` });
      } else {
        problems.push({ severity: "warning", ...where, message: `${label}: the target has no magnitude, so the SNR of the ${obs.exposureSeconds} s exposures is unknown.` });
      }
    } else if (obs.snrGoal === null && obs.exposureSeconds === null) {
      problems.push({ severity: "blocking", ...where, message: `${label}: give either an SNR goal or an exposure time.` });
    } else {
      const magnitude = used.magnitude;
      const result =
        obs.snrGoal !== null
          ? computeExposure({ ...exposureBase, magnitude, snr: obs.snrGoal })
          : computeExposure({ ...exposureBase, magnitude, exposureSeconds: obs.exposureSeconds as number });
      // Saturation where the star is brightest: same exposure at the best airmass.
      const atBest = computeExposure({ ...exposureBase, magnitude, airmass: bestAirmass ?? obs.maxAirmass, exposureSeconds: result.exposureSeconds });
      const peakRate = atBest.peakPixelElectrons / result.exposureSeconds;
      const maxUnsaturatedSeconds = peakRate > 0 ? instrument.fullWellE / peakRate : Number.POSITIVE_INFINITY;
      const saturated = atBest.peakPixelElectrons >= instrument.fullWellE;
      exposure = {
        exposureSeconds: result.exposureSeconds,
        snr: result.snr,
        sourceElectrons: result.sourceElectrons,
        skyElectronsPerPixel: result.skyElectronsPerPixel,
        darkElectronsPerPixel: result.darkElectronsPerPixel,
        pixels: result.pixels,
        readNoiseE: result.readNoiseE,
        peakPixelElectrons: result.peakPixelElectrons,
        fullWellE: result.fullWellE,
        apertureRadiusArcsec: result.apertureRadiusArcsec,
        apertureFraction: result.apertureFraction,
        skyMagPerArcsec2: result.skyMagPerArcsec2,
        extinctionMagPerAirmass: result.extinctionMagPerAirmass,
        noise: result.noise,
        regime: result.regime,
        airmass: obs.maxAirmass,
        magnitude,
        peakAtBestAirmassElectrons: atBest.peakPixelElectrons,
        saturated,
        maxUnsaturatedSeconds: Number.isFinite(maxUnsaturatedSeconds) ? maxUnsaturatedSeconds : 1e9,
        mode: obs.snrGoal !== null ? "snr-goal" : "exposure-time",
      };
      if (used.assumed) {
        problems.push({
          severity: "warning",
          ...where,
          message: `${label}: the target has no ${filter.band} magnitude. The exposure assumes ${filter.band} = ${used.band} = ${used.magnitude} (colour ${filter.band} − ${used.band} = 0), which is wrong by the star's colour; add its ${filter.band} magnitude on the targets tab.`,
        });
      }
      if (saturated) {
        // Blocking: a saturated star gives neither a centroid nor a flux. The fix is in the
        // PI's hands (shorter frames, more of them), and the message says by how much.
        const frames = Math.ceil((obs.framesPerEpoch * result.exposureSeconds) / Math.max(maxUnsaturatedSeconds, 0.001));
        problems.push({
          severity: "blocking",
          ...where,
          message:
            maxUnsaturatedSeconds < 1
              ? `${label}: saturates even in 1 s (peak ${fmtE(atBest.peakPixelElectrons)} e⁻ against a full well of ${fmtE(instrument.fullWellE)} e⁻): choose a redder or narrower filter or a fainter target.`
              : `${label}: frames of ${r(result.exposureSeconds, 1)} s saturate at airmass ${r(bestAirmass ?? obs.maxAirmass, 2)} (peak ${fmtE(atBest.peakPixelElectrons)} e⁻, full well ${fmtE(instrument.fullWellE)} e⁻). Keep frames at or below ${r(maxUnsaturatedSeconds, 1)} s, e.g. ${frames} frames per epoch for the same total exposure.`,
        });
      } else if (atBest.peakPixelElectrons >= NONLINEAR_FRACTION * instrument.fullWellE) {
        problems.push({ severity: "warning", ...where, message: `${label}: the peak pixel reaches ${Math.round((100 * atBest.peakPixelElectrons) / instrument.fullWellE)} % of full well at the best airmass, where the detector may be non-linear.` });
      }
      if (result.exposureSeconds > LONG_FRAME_SECONDS) {
        problems.push({ severity: "warning", ...where, message: `${label}: single frames of ${Math.round(result.exposureSeconds)} s collect many cosmic rays; consider more, shorter frames.` });
      }
    }

    const frameSeconds = exposure?.exposureSeconds ?? obs.exposureSeconds;
    const totalSeconds = frameSeconds === null ? null : secondsPerEpoch(obs.framesPerEpoch, frameSeconds, instrument);
    const timePerEpoch = {
      frames: obs.framesPerEpoch,
      exposureSeconds: frameSeconds,
      readoutSeconds: instrument.readoutSeconds,
      acquisitionSeconds: instrument.acquisitionSeconds,
      totalSeconds,
    };
    const epochHours = totalSeconds === null ? 0 : totalSeconds / 3600;

    // Astrometric epochs: the PI's plan, or one proposed by the planner.
    let astrometry: ObservationSheet["astrometry"] = null;
    let epochsThisSemester = obs.epochsPerSemester;
    const perSemesterEpochs = new Map<string, number>();
    if (obs.baselineYears !== null && obs.baselineYears > 0) {
      const part = astrometryPart({ obs, target, instrument, telescope, call, exposure, totalSeconds, epochHours, minAltitudeDeg, label, where, problems, allowed });
      astrometry = part.astrometry;
      for (const [code, n] of part.perSemesterEpochs) perSemesterEpochs.set(code, n);
      epochsThisSemester = perSemesterEpochs.get(call.semesterCode) ?? 0;
      for (const [semesterCode, n] of perSemesterEpochs) addTotal(telescope, semesterCode, obs.moonCategory, n * epochHours);
    } else {
      const semesters = input.isMultiSemester && input.semestersRequested.length ? input.semestersRequested : [call.semesterCode];
      for (const s of semesters) addTotal(telescope, s, obs.moonCategory, obs.epochsPerSemester * epochHours);
      epochsThisSemester = semesters.includes(call.semesterCode) ? obs.epochsPerSemester : 0;
    }
    const requestedHoursThisSemester = epochsThisSemester * epochHours;

    if (summary.observableHours === 0) {
      problems.push({ severity: "blocking", ...where, message: `${label}: the target never rises above airmass ${obs.maxAirmass} in astronomical darkness during ${call.semesterCode}.` });
    } else if (requestedHoursThisSemester > usableHours) {
      problems.push({
        severity: "blocking",
        ...where,
        message: `${label}: ${r(requestedHoursThisSemester, 2)} h are requested in ${call.semesterCode} but the target is observable for only ${r(usableHours, 2)} h on ${obs.moonCategory === "bright" ? "" : `${obs.moonCategory === "dark" ? "dark" : "dark or grey"} `}nights above airmass ${obs.maxAirmass}.`,
      });
    } else if (requestedHoursThisSemester > TIGHT_FRACTION * usableHours) {
      problems.push({ severity: "warning", ...where, message: `${label}: the request uses ${Math.round((100 * requestedHoursThisSemester) / usableHours)} % of the hours the target is observable in ${obs.moonCategory} time; weather losses leave little margin.` });
    }
    if (epochHours > 0 && best && best.observableHours < epochHours) {
      problems.push({ severity: "blocking", ...where, message: `${label}: one epoch takes ${r(epochHours, 2)} h, longer than the longest window of any night (${r(best.observableHours, 2)} h on ${best.night.date}). Use fewer frames per epoch.` });
    }

    observations.push({
      observationId: obs.id,
      targetId: target.id,
      targetName: target.name,
      telescopeId: telescope.id,
      telescopeName: telescope.name,
      instrumentName: instrument.name,
      band: filter.band,
      moonCategory: obs.moonCategory,
      maxAirmass: obs.maxAirmass,
      minAltitudeDeg: r(minAltitudeDeg, 3),
      seeingArcsec: obs.seeingArcsec,
      visibility: {
        observableHours: summary.observableHours,
        byMoonCategory: summary.byMoonCategory,
        usableHours: r(usableHours, 2),
        usableNights,
        darkHours: summary.darkHours,
        bestMonths: summary.bestMonths,
        hoursPerNight: summary.hoursPerNight.map((h) => r(h.hours, 2)),
        bestNight: best?.night.date ?? null,
        bestAirmass: bestAirmass === null ? null : r(bestAirmass, 3),
      },
      exposure,
      timePerEpoch,
      epochsThisSemester,
      requestedHoursThisSemester: r(requestedHoursThisSemester, 3),
      magnitudeUsed: used,
      astrometry,
    });
  }

  const offered = (telescopeId: number, moon: MoonCategory) =>
    call.offers.find((o) => o.telescopeId === telescopeId && o.moonCategory === moon)?.hoursOffered ?? null;
  const totalRows = [...totals.values()]
    .map((t) => ({ ...t, hours: r(t.hours, 2), offeredHours: t.semesterCode === call.semesterCode ? offered(t.telescopeId, t.moonCategory) : null }))
    .sort(
      (a, b) =>
        Number(b.semesterCode === call.semesterCode) - Number(a.semesterCode === call.semesterCode) ||
        a.semesterCode.localeCompare(b.semesterCode) ||
        a.telescopeName.localeCompare(b.telescopeName) ||
        MOON_RANK[a.moonCategory] - MOON_RANK[b.moonCategory],
    );
  for (const t of totalRows) {
    if (t.offeredHours !== null && t.hours > t.offeredHours) {
      problems.push({ severity: "warning", message: `${t.hours} h of ${t.moonCategory} time on ${t.telescopeName} are requested in ${t.semesterCode}; the call offers ${t.offeredHours} h in all.` });
    }
  }
  const requestedHours = r(
    totalRows.reduce((s, t) => s + t.hours, 0),
    2,
  );
  const bySemester = new Map<string, number>([[call.semesterCode, 0]]);
  for (const t of totalRows) bySemester.set(t.semesterCode, (bySemester.get(t.semesterCode) ?? 0) + t.hours);
  const requestedHoursBySemester = [...bySemester.entries()].map(([semesterCode, hours]) => ({ semesterCode, hours: r(hours, 2), callSemester: semesterCode === call.semesterCode }));

  problems.sort((a, b) => (a.severity === b.severity ? 0 : a.severity === "blocking" ? -1 : 1));
  return {
    proposalId: input.proposalId,
    semesterCode: call.semesterCode,
    semesterStart: call.semesterStart,
    semesterEnd: call.semesterEnd,
    computedAt: new Date().toISOString(),
    conventions: {
      moonCategoryThresholds: MOON_CATEGORY_THRESHOLDS,
      moonTimeRule: MOON_TIME_RULE,
      twilightAltitudeDeg: TWILIGHT_ALTITUDE_DEG,
      refraction: REFRACTION_MODEL,
      airmassFormula: AIRMASS_FORMULA,
      exposure: "CCD equation (Howell, Handbook of CCD Astronomy; Merline & Howell 1995), per frame at the observation's airmass limit; saturation checked at the best airmass",
      centroid: "σ ≈ FWHM / (2.355 · SNR) per frame, /√frames per epoch, instrument floor in quadrature; five-parameter least-squares fit over the epochs",
      timePerEpoch: "frames × (exposure + readout) + acquisition",
    },
    sites,
    observations,
    targets: input.targets.map((t) => ({
      targetId: t.id,
      name: t.name,
      raDeg: t.raDeg,
      decDeg: t.decDeg,
      pmRaMasPerYr: t.pmRaMasPerYr,
      pmDecMasPerYr: t.pmDecMasPerYr,
      magnitude: t.magnitude,
      band: t.band,
      magnitudes: t.magnitudes,
      observationIds: observations.filter((o) => o.targetId === t.id).map((o) => o.observationId),
    })),
    totals: totalRows,
    requestedHoursBySemester,
    requestedHoursThisSemester: requestedHoursBySemester[0].hours,
    requestedHours,
    problems,
  };
}

function fmtE(x: number) {
  return x >= 1e6 ? `${(x / 1e6).toFixed(2)} M` : x >= 1e4 ? `${Math.round(x / 1000)} k` : `${Math.round(x)}`;
}

export const blockingProblems = (sheet: Pick<FeasibilitySheet, "problems">) => sheet.problems.filter((p) => p.severity === "blocking");

// ---------------------------------------------------------------------------------------------
// Astrometry part of one observation: the PI's epochs or a plan with exactly "epochs per
// semester" in each semester of the baseline; per-epoch windows (± tolerance nights); what
// limits the precision and what would meet the requirement.

/** Semesters of a baseline: the call's own and the next ones, round(years × 2) in all. */
export function baselineSemesters(call: FeasibilityInput["call"], baselineYears: number): SemesterSpan[] {
  const count = Math.max(1, Math.round(baselineYears * 2));
  return semesterSequence({ code: call.semesterCode, start: call.semesterStart, end: call.semesterEnd }, count, call.laterSemesters ?? []);
}

/** Largest number of epochs per semester the advice tries before saying none can. */
export const MAX_EPOCHS_PER_SEMESTER_TRIED = 20;

type AstrometryArgs = {
  obs: SheetObservation;
  target: SheetTarget;
  instrument: SheetInstrument;
  telescope: SheetTelescope;
  call: FeasibilityInput["call"];
  exposure: ObservationSheet["exposure"];
  totalSeconds: number | null;
  epochHours: number;
  minAltitudeDeg: number;
  label: string;
  where: { targetId: number; observationId: number };
  problems: Problem[];
  allowed: (c: MoonCategory) => boolean;
};

function astrometryPart(a: AstrometryArgs): { astrometry: NonNullable<ObservationSheet["astrometry"]>; perSemesterEpochs: Map<string, number> } {
  const { obs, target, instrument, telescope, call, exposure, totalSeconds, epochHours, minAltitudeDeg, label, where, problems, allowed } = a;
  const baselineYears = obs.baselineYears as number;
  const tolerance = obs.epochToleranceNights ?? EPOCH_TOLERANCE_NIGHTS;
  const floorMas = instrument.astrometricFloorMas;
  const photonPrecision = exposure ? centroidPrecisionMas(obs.seeingArcsec, exposure.snr) / Math.sqrt(obs.framesPerEpoch) : null;
  const perEpochPrecision = exposure
    ? epochPrecisionMas({ fwhmArcsec: obs.seeingArcsec, snr: exposure.snr, frames: obs.framesPerEpoch, floorMas })
    : null;
  const floorDominated = photonPrecision !== null && floorMas >= photonPrecision;
  const semesters = baselineSemesters(call, baselineYears);
  const lastNight = semesters[semesters.length - 1].end;
  const span = Math.min(dayNumber(lastNight) - dayNumber(call.semesterStart) + 1, 366 * 6);
  const longPrepared = prepareSiteNights(telescope.site, call.semesterStart, span);
  const limit = { maxAirmass: obs.maxAirmass };
  const perSemesterEpochs = new Map<string, number>();
  const advice: string[] = [];
  let epochs: NonNullable<ObservationSheet["astrometry"]>["epochs"] = [];
  let precision: ReturnType<typeof fitPrecision> | null = null;
  let parallaxCurve: { date: string; ra: number; dec: number }[] = [];
  let message: string | undefined;
  const source: "planned" | "proposed" = obs.epochs.length > 0 ? "planned" : "proposed";
  const pf = (x: number) => roundNoNegativeZero(x, 4);
  const planFor = (perSemester: number) =>
    cachedPlan({
      site: telescope.site,
      target: astroTarget(target),
      firstDate: call.semesterStart,
      baselineYears: (span - 1) / 365.25, // the planner then prepares exactly `span` nights, the same cached span
      perEpochPrecisionMas: perEpochPrecision as number,
      limit,
      perSemester: semesters.map((s) => ({ ...s, epochs: perSemester })),
      ...(obs.requiredPmPrecisionMasPerYr !== null ? { required: { properMotionMasPerYr: obs.requiredPmPrecisionMasPerYr } } : {}),
      secondsPerEpoch: totalSeconds ?? 0,
      minWindowHours: Math.max(epochHours, 0.25),
      toleranceNights: tolerance,
    });

  if (source === "planned") {
    const longRows = targetNights(longPrepared, astroTarget(target), minAltitudeDeg);
    const first = dayNumber(call.semesterStart);
    const visit = Math.max(epochHours, 0.01);
    const fitEpochs: { time: number; sigmaMas: number }[] = [];
    for (const e of [...obs.epochs].sort((x, y) => x.date.localeCompare(y.date))) {
      const index = dayNumber(e.date) - first;
      const row = index >= 0 && index < longRows.length ? longRows[index] : null;
      const window = row && row.windows.length ? row.windows.reduce((x, y) => (y.end - y.start > x.end - x.start ? y : x)) : null;
      const time = window ? (window.start + window.end) / 2 : dayNumber(e.date) * DAY_MS + DAY_MS;
      const f = parallaxFactors(target.raDeg, target.decDeg, time);
      const inWindow = row ? row.observableHours >= visit : null;
      let tolWindow: { from: string; to: string; usableNights: number } | null = null;
      if (row) {
        const lo = Math.max(0, index - tolerance);
        const hi = Math.min(longRows.length - 1, index + tolerance);
        let usableNights = 0;
        for (let k = lo; k <= hi; k++) if (longRows[k].observableHours >= visit) usableNights++;
        tolWindow = { from: longRows[lo].night.date, to: longRows[hi].night.date, usableNights };
      }
      const fragile = tolWindow !== null && tolWindow.usableNights < FRAGILE_BELOW_NIGHTS;
      epochs.push({
        date: e.date,
        semesterCode: e.semesterCode,
        status: e.status,
        parallaxFactorRa: pf(f.ra),
        parallaxFactorDec: pf(f.dec),
        observableHours: row ? r(row.observableHours, 2) : null,
        inWindow,
        window: tolWindow,
        fragile,
      });
      if (index < 0) {
        problems.push({ severity: "blocking", ...where, message: `${label}: the epoch on ${e.date} is before the semester starts (${call.semesterStart}).` });
      } else if (!row) {
        problems.push({ severity: "warning", ...where, message: `${label}: the epoch on ${e.date} lies beyond the ${baselineYears}-year baseline.` });
      } else if (!inWindow) {
        problems.push({
          severity: "blocking",
          ...where,
          message:
            row.observableHours === 0
              ? `${label}: on ${e.date} the target is not above airmass ${obs.maxAirmass} in the dark, so that epoch cannot be observed.`
              : `${label}: on ${e.date} the target is observable for ${r(row.observableHours, 2)} h, less than the ${r(epochHours, 2)} h the epoch needs.`,
        });
      } else {
        const split = row.hoursByMoonCategory as Record<MoonCategory, number>;
        const usable = moonCategories.filter(allowed).reduce((sum, c) => sum + split[c], 0);
        if (usable < visit) {
          problems.push({
            severity: "warning",
            ...where,
            message: `${label}: on ${e.date} only ${r(usable, 2)} h of the window are ${obs.moonCategory === "dark" ? "dark" : "dark or grey"} time (Moon up and ${row.night.moonCategory}), less than the ${r(epochHours, 2)} h the epoch needs.`,
          });
        }
      }
      if (fragile && tolWindow) {
        problems.push({
          severity: "warning",
          ...where,
          message: `${label}: the epoch on ${e.date} is fragile: within ±${tolerance} nights (${tolWindow.from} to ${tolWindow.to}) only ${tolWindow.usableNights} night${tolWindow.usableNights === 1 ? " has" : "s have"} the ${r(epochHours, 2)} h the visit needs; one cloudy night may lose it.`,
        });
      }
      if (perEpochPrecision !== null) fitEpochs.push({ time, sigmaMas: perEpochPrecision });
      perSemesterEpochs.set(e.semesterCode, (perSemesterEpochs.get(e.semesterCode) ?? 0) + 1);
    }
    if (fitEpochs.length) precision = fitPrecision(target.raDeg, target.decDeg, fitEpochs);
    for (let d = 0; d < span; d += 7) {
      const date = longPrepared.nights[d].date;
      const f = parallaxFactors(target.raDeg, target.decDeg, dayNumber(date) * DAY_MS);
      parallaxCurve.push({ date, ra: pf(f.ra), dec: pf(f.dec) });
    }
  } else if (perEpochPrecision !== null) {
    const total = obs.epochsPerSemester * semesters.length;
    if (total < 3) {
      message = `${obs.epochsPerSemester} epoch${obs.epochsPerSemester === 1 ? "" : "s"} per semester over ${semesters.length} semester${semesters.length === 1 ? "" : "s"} make ${total}; position, proper motion and parallax need at least 3 epochs.`;
      problems.push({ severity: "blocking", ...where, message: `${label}: ${message}` });
    } else {
      const plan = planFor(obs.epochsPerSemester);
      precision = plan.epochs.length ? plan.precision : null;
      message = plan.message;
      epochs = plan.epochs.map((e) => ({
        date: e.date,
        semesterCode: e.semester,
        status: "planned" as const,
        parallaxFactorRa: pf(e.parallaxFactors.ra),
        parallaxFactorDec: pf(e.parallaxFactors.dec),
        observableHours: r(e.altitudeWindowHours, 2),
        inWindow: true,
        window: e.window,
        fragile: e.fragile,
      }));
      for (const s of semesters) perSemesterEpochs.set(s.code, 0);
      for (const e of plan.epochs) perSemesterEpochs.set(e.semester, (perSemesterEpochs.get(e.semester) ?? 0) + 1);
      parallaxCurve = plan.parallaxCurve.map((p) => ({ date: p.date, ra: pf(p.ra), dec: pf(p.dec) }));
      if (plan.message) problems.push({ severity: "blocking", ...where, message: `${label}: ${plan.message}` });
      for (const e of plan.epochs.filter((x) => x.fragile)) {
        problems.push({
          severity: "warning",
          ...where,
          message: `${label}: the proposed epoch on ${e.date} is fragile: within ±${tolerance} nights (${e.window.from} to ${e.window.to}) only ${e.window.usableNights} night${e.window.usableNights === 1 ? " has" : "s have"} the ${r(epochHours, 2)} h the visit needs.`,
        });
      }
    }
  }

  if (floorDominated && photonPrecision !== null && perEpochPrecision !== null) {
    const text = `the per-epoch precision (${r(perEpochPrecision, 2)} mas) is set by ${instrument.name}'s systematic floor of ${r(floorMas, 2)} mas (photon noise alone gives ${r(photonPrecision, 2)} mas): more frames or longer exposures cannot improve it; more epochs or a longer baseline can.`;
    advice.push(text);
    problems.push({ severity: "warning", ...where, message: `${label}: ${text}` });
  }

  const pm = precision?.determined ? precision.properMotionPrecisionMasPerYr : null;
  let met: boolean | null = null;
  if (obs.requiredPmPrecisionMasPerYr !== null) {
    const required = obs.requiredPmPrecisionMasPerYr;
    met = pm ? Math.max(pm.ra, pm.dec) <= required : false;
    if (!met && perEpochPrecision !== null) {
      // What would meet it over the same baseline: the fewest epochs per semester that do
      // (σ(μ) falls with the number of epochs: bisection between what is asked and the most tried).
      const outcome = (k: number) => {
        const trial = planFor(k);
        const p = trial.precision.properMotionPrecisionMasPerYr;
        return { full: !trial.message, worst: trial.precision.determined ? Math.max(p.ra, p.dec) : Infinity };
      };
      let meets: number | null = null;
      let reached: number | null = null;
      let lo = Math.max(source === "proposed" ? obs.epochsPerSemester : 0, Math.ceil(3 / semesters.length) - 1);
      let hi = MAX_EPOCHS_PER_SEMESTER_TRIED;
      // the most epochs per semester the windows hold (a plan with a shortfall does not count)
      while (hi > lo && !outcome(hi).full) hi = Math.max(lo, Math.floor((lo + hi) / 2));
      if (hi > lo) {
        const top = outcome(hi);
        reached = top.worst;
        if (top.worst <= required) {
          while (hi - lo > 1) {
            const mid = Math.floor((lo + hi) / 2);
            if (outcome(mid).worst <= required) hi = mid;
            else lo = mid;
          }
          meets = hi;
        }
      }
      const spanText = `the ${baselineYears}-year baseline (${semesters.map((s) => s.code).join(", ")})`;
      const how =
        meets !== null
          ? `${meets} epochs per semester (${meets * semesters.length} in all) over ${spanText} would meet it.`
          : `no number of epochs per semester over ${spanText} meets it${reached !== null ? ` (the most that fit reach ${r(reached, 3)} mas/yr)` : ""}: a longer baseline${floorDominated ? "" : " or a better per-epoch precision"} is needed.`;
      advice.push(how);
      problems.push({
        severity: "blocking",
        ...where,
        message: pm
          ? `${label}: the epochs reach a proper-motion precision of ${r(Math.max(pm.ra, pm.dec), 3)} mas/yr; ${required} mas/yr is required. ${how}`
          : `${label}: the epochs cannot determine the proper motion and parallax (at least 3 well-spread epochs are needed); ${required} mas/yr is required. ${how}`,
      });
    }
  } else {
    problems.push({ severity: "warning", ...where, message: `${label}: no required proper-motion precision is given, so the epoch plan cannot be checked against what the science needs.` });
  }

  return {
    perSemesterEpochs,
    astrometry: {
      baselineYears,
      source,
      perEpochPrecisionMas: perEpochPrecision === null ? null : r(perEpochPrecision, 3),
      photonPrecisionMas: photonPrecision === null ? null : r(photonPrecision, 3),
      floorMas,
      floorDominated,
      requiredPmPrecisionMasPerYr: obs.requiredPmPrecisionMasPerYr,
      epochsPerSemester: obs.epochsPerSemester,
      toleranceNights: tolerance,
      advice,
      properMotionPrecisionMasPerYr: pm ? { ra: r(pm.ra, 4), dec: r(pm.dec, 4) } : null,
      parallaxPrecisionMas: precision?.determined && precision.parallaxPrecisionMas !== null ? r(precision.parallaxPrecisionMas, 4) : null,
      determined: Boolean(precision?.determined),
      met,
      epochs,
      perSemester: [...perSemesterEpochs.entries()]
        .sort((x, y) => x[0].localeCompare(y[0]))
        .map(([semesterCode, n]) => ({ semesterCode, epochs: n, hours: r(n * epochHours, 3) })),
      parallaxCurve,
      ...(message ? { message } : {}),
    },
  };
}
