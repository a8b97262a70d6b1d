// Astrometry part of one observation: the PI's epochs or a plan with exactly "epochs per
// semester" in each semester of the baseline; per-epoch windows (± tolerance nights); what
// limits the precision and what would meet the requirement.

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
} from "../../astro/astrometry";
import { semesterSequence, type SemesterSpan } from "../../semesters";
import { moonCategories } from "../../domain";
import { DAY_MS, dayNumber } from "../../astro/time";
import { prepareSiteNights, targetNights } from "../../astro/visibility";
import type { MoonCategory } from "../../domain";
import { astroTarget, r } from "./common";
import type { FeasibilityInput, ObservationSheet, Problem, SheetInstrument, SheetObservation, SheetTarget, SheetTelescope } from "./types";

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

export function astrometryPart(a: AstrometryArgs): { astrometry: NonNullable<ObservationSheet["astrometry"]>; perSemesterEpochs: Map<string, number> } {
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
