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
//   (epochs per semester × semesters in the baseline, placed by the planner).

import { AIRMASS_FORMULA, airmass } from "./astro/airmass";
import {
  epochPrecisionMas,
  fitPrecision,
  parallaxFactors,
  planEpochs,
  semesterOf,
  type Plan,
} from "./astro/astrometry";
import type { Target as AstroTarget } from "./astro/coordinates";
import { computeExposure, type ExposureResult } from "./astro/exposure";
import { BANDS, type Band } from "./astro/photometry";
import { DAY_MS, dayNumber } from "./astro/time";
import {
  MOON_CATEGORY_THRESHOLDS,
  REFRACTION_MODEL,
  TWILIGHT_ALTITUDE_DEG,
  limitAltitude,
  prepareSiteNights,
  summarise,
  targetNights,
  type MoonCategory,
  type Site,
  type TargetNight,
} from "./astro/visibility";

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
};
export type FeasibilityInput = {
  proposalId: number;
  call: {
    semesterCode: string;
    semesterStart: string;
    semesterEnd: string;
    offers: { telescopeId: number; moonCategory: MoonCategory; hoursOffered: number }[];
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

export type SheetNight = { date: string; moonCategory: MoonCategory; moonIllumination: number; darkHours: number };

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
    /** hours on nights this observation may use (its moon category or darker) */
    usableHours: number;
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
  astrometry: null | {
    baselineYears: number;
    source: "planned" | "proposed";
    perEpochPrecisionMas: number | null;
    requiredPmPrecisionMasPerYr: number | null;
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

export function nightsInSemester(start: string, end: string): number {
  return dayNumber(end) - dayNumber(start) + 1;
}

function asBand(band: string): Band {
  return (BANDS as string[]).includes(band) ? (band as Band) : "V";
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
    if (!sites[telescope.id]) {
      sites[telescope.id] = {
        telescopeName: telescope.name,
        site: telescope.site,
        nights: prepared.nights.map((n) => ({
          date: n.date,
          moonCategory: n.moonCategory,
          moonIllumination: r(n.moonIllumination, 3),
          darkHours: n.darkStart !== null && n.darkEnd !== null ? r((n.darkEnd - n.darkStart) / 3_600_000, 3) : 0,
        })),
      };
    }
    const minAltitudeDeg = limitAltitude({ maxAirmass: obs.maxAirmass });
    const rows = targetNights(prepared, astroTarget(target), minAltitudeDeg);
    const summary = summarise(rows);
    const allowed = (c: MoonCategory) => MOON_RANK[c] <= MOON_RANK[obs.moonCategory];
    let usableHours = 0;
    let usableNights = 0;
    let best: TargetNight | null = null;
    for (const row of rows) {
      if (row.observableHours > 0 && (!best || row.observableHours > best.observableHours)) best = row;
      if (allowed(row.night.moonCategory) && row.observableHours > 0) {
        usableHours += row.observableHours;
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
    if (target.magnitude === null) {
      if (obs.snrGoal !== null) {
        problems.push({ severity: "blocking", ...where, message: `${label}: the target has no magnitude, so the exposure time for SNR ${obs.snrGoal} cannot be computed. Add its magnitude on the targets tab.` });
      } else {
        problems.push({ severity: "warning", ...where, message: `${label}: the target has no magnitude, so the SNR of the ${obs.exposureSeconds} s exposures is unknown.` });
      }
    } else if (obs.snrGoal === null && obs.exposureSeconds === null) {
      problems.push({ severity: "blocking", ...where, message: `${label}: give either an SNR goal or an exposure time.` });
    } else {
      const magnitude = target.magnitude;
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
      if (target.band && target.band !== filter.band) {
        problems.push({ severity: "warning", ...where, message: `${label}: the magnitude is given in ${target.band} and used as is for ${filter.band} (no colour term).` });
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
    const totalSeconds = frameSeconds === null ? null : obs.framesPerEpoch * (frameSeconds + instrument.readoutSeconds) + instrument.acquisitionSeconds;
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
      const perEpochPrecision = exposure
        ? epochPrecisionMas({ fwhmArcsec: obs.seeingArcsec, snr: exposure.snr, frames: obs.framesPerEpoch, floorMas: instrument.astrometricFloorMas })
        : null;
      const span = baselineNights(obs.baselineYears);
      const longPrepared = prepareSiteNights(telescope.site, call.semesterStart, span);
      const limit = { maxAirmass: obs.maxAirmass };
      let epochs: NonNullable<ObservationSheet["astrometry"]>["epochs"] = [];
      let precision: ReturnType<typeof fitPrecision> | null = null;
      let met: boolean | null = null;
      let parallaxCurve: { date: string; ra: number; dec: number }[] = [];
      let message: string | undefined;
      const source: "planned" | "proposed" = obs.epochs.length > 0 ? "planned" : "proposed";
      if (source === "planned") {
        const longRows = targetNights(longPrepared, astroTarget(target), minAltitudeDeg);
        const first = dayNumber(call.semesterStart);
        const fitEpochs: { time: number; sigmaMas: number }[] = [];
        for (const e of [...obs.epochs].sort((a, b) => a.date.localeCompare(b.date))) {
          const index = dayNumber(e.date) - first;
          const row = index >= 0 && index < longRows.length ? longRows[index] : null;
          const window = row && row.windows.length ? row.windows.reduce((a, b) => (b.end - b.start > a.end - a.start ? b : a)) : null;
          const time = window ? (window.start + window.end) / 2 : dayNumber(e.date) * DAY_MS + DAY_MS;
          const f = parallaxFactors(target.raDeg, target.decDeg, time);
          const inWindow = row ? row.observableHours >= Math.max(epochHours, 0.01) : null;
          epochs.push({
            date: e.date,
            semesterCode: e.semesterCode,
            status: e.status,
            parallaxFactorRa: r(f.ra, 4),
            parallaxFactorDec: r(f.dec, 4),
            observableHours: row ? r(row.observableHours, 2) : null,
            inWindow,
          });
          if (index < 0) {
            problems.push({ severity: "blocking", ...where, message: `${label}: the epoch on ${e.date} is before the semester starts (${call.semesterStart}).` });
          } else if (!row) {
            problems.push({ severity: "warning", ...where, message: `${label}: the epoch on ${e.date} lies beyond the ${obs.baselineYears}-year baseline.` });
          } else if (!inWindow) {
            problems.push({
              severity: "blocking",
              ...where,
              message:
                row.observableHours === 0
                  ? `${label}: on ${e.date} the target is not above airmass ${obs.maxAirmass} in the dark, so that epoch cannot be observed.`
                  : `${label}: on ${e.date} the target is observable for ${r(row.observableHours, 2)} h, less than the ${r(epochHours, 2)} h the epoch needs.`,
            });
          } else if (!allowed(row.night.moonCategory)) {
            problems.push({ severity: "warning", ...where, message: `${label}: ${e.date} is a ${row.night.moonCategory} night, brighter than the ${obs.moonCategory} time asked for.` });
          }
          if (perEpochPrecision !== null) fitEpochs.push({ time, sigmaMas: perEpochPrecision });
          perSemesterEpochs.set(e.semesterCode, (perSemesterEpochs.get(e.semesterCode) ?? 0) + 1);
        }
        if (fitEpochs.length) precision = fitPrecision(target.raDeg, target.decDeg, fitEpochs);
        for (let d = 0; d < span; d += 7) {
          const date = longPrepared.nights[d].date;
          const f = parallaxFactors(target.raDeg, target.decDeg, dayNumber(date) * DAY_MS);
          parallaxCurve.push({ date, ra: r(f.ra, 4), dec: r(f.dec, 4) });
        }
      } else if (perEpochPrecision !== null) {
        const semesters = Math.max(1, Math.round(obs.baselineYears * 2));
        const plan = cachedPlan({
          site: telescope.site,
          target: astroTarget(target),
          firstDate: call.semesterStart,
          baselineYears: obs.baselineYears,
          perEpochPrecisionMas: perEpochPrecision,
          limit,
          epochs: Math.max(3, obs.epochsPerSemester * semesters),
          ...(obs.requiredPmPrecisionMasPerYr !== null ? { required: { properMotionMasPerYr: obs.requiredPmPrecisionMasPerYr } } : {}),
          secondsPerEpoch: totalSeconds ?? 0,
          minWindowHours: Math.max(epochHours, 0.25),
        });
        precision = plan.epochs.length ? plan.precision : null;
        message = plan.message;
        epochs = plan.epochs.map((e) => ({
          date: e.date,
          semesterCode: e.semester,
          status: "planned" as const,
          parallaxFactorRa: r(e.parallaxFactors.ra, 4),
          parallaxFactorDec: r(e.parallaxFactors.dec, 4),
          observableHours: r(e.altitudeWindowHours, 2),
          inWindow: true,
        }));
        for (const e of plan.epochs) perSemesterEpochs.set(e.semester, (perSemesterEpochs.get(e.semester) ?? 0) + 1);
        parallaxCurve = plan.parallaxCurve.map((p) => ({ date: p.date, ra: r(p.ra, 4), dec: r(p.dec, 4) }));
        if (plan.message) problems.push({ severity: "blocking", ...where, message: `${label}: ${plan.message}` });
      }
      const pm = precision?.determined ? precision.properMotionPrecisionMasPerYr : null;
      if (obs.requiredPmPrecisionMasPerYr !== null) {
        met = pm ? Math.max(pm.ra, pm.dec) <= obs.requiredPmPrecisionMasPerYr : false;
        if (!met && perEpochPrecision !== null) {
          problems.push({
            severity: "blocking",
            ...where,
            message: pm
              ? `${label}: the epochs reach a proper-motion precision of ${r(Math.max(pm.ra, pm.dec), 3)} mas/yr; ${obs.requiredPmPrecisionMasPerYr} mas/yr is required. Add epochs, frames or baseline.`
              : `${label}: the epochs cannot determine the proper motion and parallax (at least 3 well-spread epochs are needed); ${obs.requiredPmPrecisionMasPerYr} mas/yr is required.`,
          });
        }
      } else {
        problems.push({ severity: "warning", ...where, message: `${label}: no required proper-motion precision is given, so the epoch plan cannot be checked against what the science needs.` });
      }
      epochsThisSemester = perSemesterEpochs.get(call.semesterCode) ?? 0;
      astrometry = {
        baselineYears: obs.baselineYears,
        source,
        perEpochPrecisionMas: perEpochPrecision === null ? null : r(perEpochPrecision, 3),
        requiredPmPrecisionMasPerYr: obs.requiredPmPrecisionMasPerYr,
        properMotionPrecisionMasPerYr: pm ? { ra: r(pm.ra, 4), dec: r(pm.dec, 4) } : null,
        parallaxPrecisionMas: precision?.determined && precision.parallaxPrecisionMas !== null ? r(precision.parallaxPrecisionMas, 4) : null,
        determined: Boolean(precision?.determined),
        met,
        epochs,
        perSemester: [...perSemesterEpochs.entries()]
          .sort((a, b) => a[0].localeCompare(b[0]))
          .map(([semesterCode, n]) => ({ semesterCode, epochs: n, hours: r(n * epochHours, 3) })),
        parallaxCurve,
        ...(message ? { message } : {}),
      };
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

/** Epoch semester codes the same way the planner assigns them. */
export { semesterOf };
