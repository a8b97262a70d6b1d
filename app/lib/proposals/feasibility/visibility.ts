// Visibility part of one observation: the site's nights over the call's semester, the target's
// windows above the airmass limit and the hours its moon category allows; and the checks of the
// request against those hours.

import { airmass } from "../../astro/airmass";
import {
  darkHoursByMoon,
  ensureMoonTimes,
  limitAltitude,
  moonAllows,
  prepareSiteNights,
  summarise,
  targetNights,
  type MoonCategory,
  type PreparedSite,
  type SemesterSummary,
  type TargetNight,
} from "../../astro/visibility";
import { moonCategories } from "../../domain";
import { astroTarget, r, splitRounded } from "./common";
import type { FeasibilityInput, FeasibilitySheet, ObservationSheet, Problem, SheetObservation, SheetTarget, SheetTelescope } from "./types";

/** hours requested above this fraction of the usable hours: a warning (weather, other programmes) */
export const TIGHT_FRACTION = 0.5;

/** The site's nights over the call's semester (prepared once, cached across targets). */
export function semesterNights(telescope: SheetTelescope, call: FeasibilityInput["call"], count: number): PreparedSite {
  const prepared = prepareSiteNights(telescope.site, call.semesterStart, count);
  ensureMoonTimes(prepared);
  return prepared;
}

/** The sheet's entry for a site: its nights with the Moon and the dark hours. */
export function siteSheet(telescope: SheetTelescope, prepared: PreparedSite): FeasibilitySheet["sites"][number] {
  return {
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

export type VisibilityPart = {
  minAltitudeDeg: number;
  summary: SemesterSummary;
  allowed: (c: MoonCategory) => boolean;
  usableHours: number;
  usableNights: number;
  best: TargetNight | null;
  bestAirmass: number | null;
};

export function visibilityPart(obs: SheetObservation, target: SheetTarget, telescope: SheetTelescope, prepared: PreparedSite): VisibilityPart {
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
  return { minAltitudeDeg, summary, allowed, usableHours, usableNights, best, bestAirmass };
}

/** The observation's `visibility` on the sheet. */
export function visibilitySheet(v: VisibilityPart): ObservationSheet["visibility"] {
  const { summary, usableHours, usableNights, best, bestAirmass } = v;
  return {
    observableHours: summary.observableHours,
    byMoonCategory: summary.byMoonCategory,
    usableHours: r(usableHours, 2),
    usableNights,
    darkHours: summary.darkHours,
    bestMonths: summary.bestMonths,
    hoursPerNight: summary.hoursPerNight.map((h) => r(h.hours, 2)),
    bestNight: best?.night.date ?? null,
    bestAirmass: bestAirmass === null ? null : r(bestAirmass, 3),
  };
}

/** The request in the call's semester against the hours the target is observable, and one epoch against the longest window. */
export function checkRequestFits(a: {
  v: VisibilityPart;
  obs: SheetObservation;
  call: FeasibilityInput["call"];
  requestedHoursThisSemester: number;
  epochHours: number;
  label: string;
  where: { targetId: number; observationId: number };
  problems: Problem[];
}) {
  const { v, obs, call, requestedHoursThisSemester, epochHours, label, where, problems } = a;
  const { summary, usableHours, best } = v;
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
}
