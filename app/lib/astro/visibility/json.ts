// The visibility answer as JSON (the API, the sky tools): nights with ISO 8601 UTC times, a
// semester summary, and an altitude curve for one night.

import * as Astro from "astronomy-engine";
import type { Target } from "../coordinates";
import { isoTime, utDays } from "../time";
import type { MoonCategory, Site } from "./conventions";
import { hoursByMoon } from "./moon";
import { prepareSiteNights, type SiteNight } from "./site-nights";
import { apparentPlace, limitAltitude, targetNights, type Limit, type TargetNight } from "./target-windows";

const iso = (t: number | null) => (t === null ? null : isoTime(t));

export type NightJson = {
  date: string;
  sunset: string | null;
  sunrise: string | null;
  darkStart: string | null;
  darkEnd: string | null;
  windows: { start: string; end: string }[];
  observableHours: number;
  moon: { illumination: number; altitudeDeg: number; separationDeg: number };
  /** the category of the Moon's illuminated fraction at mid-darkness */
  moonCategory: MoonCategory;
  /** first moonrise / moonset (Moon's centre through geometric altitude 0°) between the Sun's transits framing the night */
  moonrise: string | null;
  moonset: string | null;
  /** the observable hours split at moonrise and moonset */
  hoursByMoonCategory: Record<MoonCategory, number>;
  /** the dark interval (Sun below −18°) split the same way */
  darkHoursByMoonCategory: Record<MoonCategory, number>;
};

export type VisibilityJson = {
  site: Site;
  target: { raDeg: number; decDeg: number };
  limit: { minAltitudeDeg: number; maxAirmass?: number };
  nights: NightJson[];
  summary: SemesterSummary;
};

export type SemesterSummary = {
  observableHours: number;
  byMoonCategory: Record<MoonCategory, number>;
  darkHours: number;
  bestMonths: { month: string; observableHours: number }[];
  hoursPerNight: { date: string; hours: number; moonCategory: MoonCategory }[];
};

const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;

/** The dark interval of a night split by moon category (hours). */
export function darkHoursByMoon(night: SiteNight): Record<MoonCategory, number> {
  return night.darkStart === null || night.darkEnd === null
    ? { dark: 0, grey: 0, bright: 0 }
    : hoursByMoon(night, [{ start: night.darkStart, end: night.darkEnd }]);
}

/** Semester summary; `byMoonCategory` sums the hours split at moonrise and moonset. */
export function summarise(rows: TargetNight[]): SemesterSummary {
  const byMoonCategory: Record<MoonCategory, number> = { dark: 0, grey: 0, bright: 0 };
  const months = new Map<string, number>();
  let total = 0;
  let dark = 0;
  for (const r of rows) {
    total += r.observableHours;
    const split = r.hoursByMoonCategory;
    if (!split) throw new Error("summarise needs rows computed with the moon split");
    byMoonCategory.dark += split.dark;
    byMoonCategory.grey += split.grey;
    byMoonCategory.bright += split.bright;
    const month = r.night.date.slice(0, 7);
    months.set(month, (months.get(month) ?? 0) + r.observableHours);
    if (r.night.darkStart !== null && r.night.darkEnd !== null) dark += (r.night.darkEnd - r.night.darkStart) / 3_600_000;
  }
  const bestMonths = [...months.entries()]
    .filter(([, h]) => h > 0)
    .sort((a, b) => b[1] - a[1])
    .slice(0, 3)
    .map(([month, h]) => ({ month, observableHours: round(h, 2) }));
  return {
    observableHours: round(total, 2),
    byMoonCategory: {
      dark: round(byMoonCategory.dark, 2),
      grey: round(byMoonCategory.grey, 2),
      bright: round(byMoonCategory.bright, 2),
    },
    darkHours: round(dark, 2),
    bestMonths,
    hoursPerNight: rows.map((r) => ({ date: r.night.date, hours: round(r.observableHours, 3), moonCategory: r.night.moonCategory })),
  };
}

const roundSplit = (x: Record<MoonCategory, number>, digits: number) => ({ dark: round(x.dark, digits), grey: round(x.grey, digits), bright: round(x.bright, digits) });

export type VisibilityInput = { site: Site; target: Target; from: string; nights: number; limit: Limit };

type SiteNightJson = Pick<NightJson, "sunset" | "sunrise" | "darkStart" | "darkEnd" | "moonrise" | "moonset" | "darkHoursByMoonCategory"> & { illumination: number; altitudeDeg: number };
const siteNightsJson = new WeakMap<SiteNight, SiteNightJson>();

/**
 * A night's own fields (the Sun's, the Moon's, the dark hours), formatted once per night: the
 * site's nights are shared by every target (prepareSiteNights caches them), so a sheet of 500
 * targets formats them once, not 500 times.
 */
function siteNightJson(night: SiteNight): SiteNightJson {
  let json = siteNightsJson.get(night);
  if (!json) {
    // first: it needs the Moon's times (hoursByMoon throws without them), which moonrise reads
    const darkHours = roundSplit(darkHoursByMoon(night), 4);
    json = {
      sunset: iso(night.sunset),
      sunrise: iso(night.sunrise),
      darkStart: iso(night.darkStart),
      darkEnd: iso(night.darkEnd),
      moonrise: iso(night.moon?.moonrise ?? null),
      moonset: iso(night.moon?.moonset ?? null),
      illumination: round(night.moonIllumination, 4),
      altitudeDeg: round(night.moonAltitudeDeg, 2),
      darkHoursByMoonCategory: darkHours,
    };
    siteNightsJson.set(night, json);
  }
  return json;
}

/** The API's visibility answer: nights with ISO 8601 UTC times and a semester summary. */
export function computeVisibility(input: VisibilityInput): VisibilityJson {
  const prepared = prepareSiteNights(input.site, input.from, input.nights);
  const minAltitudeDeg = limitAltitude(input.limit);
  const rows = targetNights(prepared, input.target, minAltitudeDeg);
  return {
    site: input.site,
    target: { raDeg: input.target.raDeg, decDeg: input.target.decDeg },
    limit: { minAltitudeDeg: round(minAltitudeDeg, 4), ...("maxAirmass" in input.limit ? { maxAirmass: input.limit.maxAirmass } : {}) },
    nights: rows.map((r) => {
      const night = siteNightJson(r.night);
      return {
        date: r.night.date,
        sunset: night.sunset,
        sunrise: night.sunrise,
        darkStart: night.darkStart,
        darkEnd: night.darkEnd,
        windows: r.windows.map((w) => ({ start: iso(w.start) as string, end: iso(w.end) as string })),
        observableHours: round(r.observableHours, 4),
        moon: { illumination: night.illumination, altitudeDeg: night.altitudeDeg, separationDeg: round(r.moonSeparationDeg, 2) },
        moonCategory: r.night.moonCategory,
        moonrise: night.moonrise,
        moonset: night.moonset,
        hoursByMoonCategory: roundSplit(r.hoursByMoonCategory as Record<MoonCategory, number>, 4),
        darkHoursByMoonCategory: { ...night.darkHoursByMoonCategory },
      };
    }),
    summary: summarise(rows),
  };
}

export type CurvePoint = { time: string; targetAltDeg: number; sunAltDeg: number; moonAltDeg: number };

/**
 * Altitude against time for one night (for a chart), every `stepMinutes` across the frame's
 * night half: from 1 h before sunset (or the frame's quarter) to 1 h after sunrise. Sun and Moon
 * from astronomy-engine directly (topocentric, geometric), the target as in `targetWindows`.
 */
export function altitudeCurve(site: Site, target: Target, date: string, stepMinutes = 10): {
  night: SiteNight;
  points: CurvePoint[];
} {
  const prepared = prepareSiteNights(site, date, 1);
  const night = prepared.nights[0];
  const quarter = (night.frameEnd - night.frameStart) / 4;
  const start = night.sunset !== null ? night.sunset - 3_600_000 : night.frameStart + quarter;
  const end = night.sunrise !== null ? night.sunrise + 3_600_000 : night.frameEnd - quarter;
  const observer = new Astro.Observer(site.latitudeDeg, site.longitudeDeg, site.elevationM);
  const place = apparentPlace(target, night);
  const points: CurvePoint[] = [];
  for (let t = start; t <= end + 1; t += stepMinutes * 60_000) {
    const time = new Astro.AstroTime(utDays(t));
    const sun = Astro.Equator(Astro.Body.Sun, time, observer, true, true);
    const moon = Astro.Equator(Astro.Body.Moon, time, observer, true, true);
    points.push({
      time: isoTime(t),
      targetAltDeg: round(Astro.Horizon(time, observer, place.raDeg / 15, place.decDeg).altitude, 3),
      sunAltDeg: round(Astro.Horizon(time, observer, sun.ra, sun.dec).altitude, 3),
      moonAltDeg: round(Astro.Horizon(time, observer, moon.ra, moon.dec).altitude, 3),
    });
  }
  return { night, points };
}
