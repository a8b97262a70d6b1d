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
//
// The parts live in ./feasibility/: types, visibility, exposure (and time per epoch),
// astrometry, totals; this module runs them for each observation in turn.

import { AIRMASS_FORMULA } from "../astro/airmass";
import { MOON_CATEGORY_THRESHOLDS, MOON_TIME_RULE, REFRACTION_MODEL, TWILIGHT_ALTITUDE_DEG } from "../astro/visibility";
import { astrometryPart } from "./feasibility/astrometry";
import { nightsInSemester, r } from "./feasibility/common";
import { exposurePart, timePerEpochPart } from "./feasibility/exposure";
import { createTotals, totalsPart } from "./feasibility/totals";
import type { FeasibilityInput, FeasibilitySheet, ObservationSheet, Problem } from "./feasibility/types";
import { checkRequestFits, semesterNights, siteSheet, visibilityPart, visibilitySheet } from "./feasibility/visibility";

export type * from "./feasibility/types";
export { baselineSemesters, MAX_EPOCHS_PER_SEMESTER_TRIED } from "./feasibility/astrometry";
export { nightsInSemester } from "./feasibility/common";
export { LONG_FRAME_SECONDS, magnitudeFor, NONLINEAR_FRACTION } from "./feasibility/exposure";
export { TIGHT_FRACTION } from "./feasibility/visibility";

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
  const totals = createTotals();

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
    const prepared = semesterNights(telescope, call, count);
    if (!sites[telescope.id]) sites[telescope.id] = siteSheet(telescope, prepared);
    const v = visibilityPart(obs, target, telescope, prepared);

    // Exposure and SNR per frame, and the time per epoch.
    const { exposure, used } = exposurePart({ obs, target, instrument, filter, telescope, bestAirmass: v.bestAirmass, label, where, problems });
    const { timePerEpoch, totalSeconds, epochHours } = timePerEpochPart(obs, instrument, exposure);

    // Astrometric epochs: the PI's plan, or one proposed by the planner.
    let astrometry: ObservationSheet["astrometry"] = null;
    let epochsThisSemester = obs.epochsPerSemester;
    const perSemesterEpochs = new Map<string, number>();
    if (obs.baselineYears !== null && obs.baselineYears > 0) {
      const part = astrometryPart({ obs, target, instrument, telescope, call, exposure, totalSeconds, epochHours, minAltitudeDeg: v.minAltitudeDeg, label, where, problems, allowed: v.allowed });
      astrometry = part.astrometry;
      for (const [code, n] of part.perSemesterEpochs) perSemesterEpochs.set(code, n);
      epochsThisSemester = perSemesterEpochs.get(call.semesterCode) ?? 0;
      for (const [semesterCode, n] of perSemesterEpochs) totals.add(telescope, semesterCode, obs.moonCategory, n * epochHours);
    } else {
      const semesters = input.isMultiSemester && input.semestersRequested.length ? input.semestersRequested : [call.semesterCode];
      for (const s of semesters) totals.add(telescope, s, obs.moonCategory, obs.epochsPerSemester * epochHours);
      epochsThisSemester = semesters.includes(call.semesterCode) ? obs.epochsPerSemester : 0;
    }
    const requestedHoursThisSemester = epochsThisSemester * epochHours;
    checkRequestFits({ v, obs, call, requestedHoursThisSemester, epochHours, label, where, problems });

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
      minAltitudeDeg: r(v.minAltitudeDeg, 3),
      seeingArcsec: obs.seeingArcsec,
      visibility: visibilitySheet(v),
      exposure,
      timePerEpoch,
      epochsThisSemester,
      requestedHoursThisSemester: r(requestedHoursThisSemester, 3),
      magnitudeUsed: used,
      astrometry,
    });
  }

  const { totals: totalRows, requestedHours, requestedHoursBySemester } = totalsPart(totals.rows(), call, problems);

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

export const blockingProblems = (sheet: Pick<FeasibilitySheet, "problems">) => sheet.problems.filter((p) => p.severity === "blocking");


