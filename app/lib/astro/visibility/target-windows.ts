// One target over a site's nights: its apparent place, the windows in astronomical darkness at
// or above an altitude limit, and their hours split by moon category.

import { altitudeForAirmass } from "../airmass";
import { DEG, directionAt, toRaDec, type Target, type Vec3 } from "../coordinates";
import { DAY_MS } from "../time";
import { SIDEREAL_RATE_DEG_PER_DAY, type MoonCategory, type Site } from "./conventions";
import { ensureMoonTimes, hoursByMoon } from "./moon";
import type { Interval, PreparedSite, SiteNight } from "./site-nights";
import { RAD, apply, hourAngleAtAltitude, wrap180 } from "./sun-track";

/** Apparent place of the target for a night: RA/Dec of date (deg) and unit vector. */
export function apparentPlace(target: Target, night: SiteNight): { raDeg: number; decDeg: number; dir: Vec3 } {
  const u = directionAt(target, night.refTime);
  const a = night.aberration;
  const w = apply(night.rotation, [u[0] + a[0], u[1] + a[1], u[2] + a[2]]);
  const n = Math.hypot(w[0], w[1], w[2]);
  const dir: Vec3 = [w[0] / n, w[1] / n, w[2] / n];
  return { ...toRaDec(dir), dir };
}

/**
 * Intervals inside [darkStart, darkEnd] during which the target is at or above `minAltitudeDeg`.
 * The target's apparent place is held fixed through the night (it moves < 0.5″ in 12 h), so its
 * local hour angle grows linearly with time and the crossings follow in closed form.
 */
export function targetWindows(night: SiteNight, site: Site, raDeg: number, decDeg: number, minAltitudeDeg: number): Interval[] {
  if (night.darkStart === null || night.darkEnd === null) return [];
  const a = night.darkStart;
  const b = night.darkEnd;
  const H0 = hourAngleAtAltitude(site.latitudeDeg, decDeg, minAltitudeDeg);
  if (H0 === Number.POSITIVE_INFINITY) return [{ start: a, end: b }];
  if (H0 === Number.NEGATIVE_INFINITY) return [];
  const rate = SIDEREAL_RATE_DEG_PER_DAY / DAY_MS;
  const ha = wrap180(night.gastDeg + rate * (a - night.gastTime) + site.longitudeDeg - raDeg);
  const hb = ha + rate * (b - a);
  const out: Interval[] = [];
  for (let k = Math.floor((ha + H0) / 360); 360 * k - H0 <= hb; k++) {
    const lo = Math.max(ha, 360 * k - H0);
    const hi = Math.min(hb, 360 * k + H0);
    if (hi > lo) out.push({ start: a + (lo - ha) / rate, end: a + (hi - ha) / rate });
  }
  return out;
}

export type Limit = { minAltitudeDeg: number } | { maxAirmass: number };

export function limitAltitude(limit: Limit): number {
  return "minAltitudeDeg" in limit ? limit.minAltitudeDeg : altitudeForAirmass(limit.maxAirmass);
}

export type TargetNight = {
  night: SiteNight;
  windows: Interval[];
  observableHours: number;
  moonSeparationDeg: number;
  /** observable hours split at moonrise and moonset (null when asked for `moonSplit: false`) */
  hoursByMoonCategory: Record<MoonCategory, number> | null;
};

/**
 * Per-night windows for one target over prepared nights (numbers only; the fast path). With
 * `moonSplit` (the default) each night's hours are also split by moon category at moonrise and
 * moonset; the epoch planner, which needs windows only, turns it off.
 */
export function targetNights(prepared: PreparedSite, target: Target, minAltitudeDeg: number, opts: { moonSplit?: boolean } = {}): TargetNight[] {
  const site = prepared.site;
  const moonSplit = opts.moonSplit ?? true;
  if (moonSplit) ensureMoonTimes(prepared);
  const sinLat = Math.sin(site.latitudeDeg * DEG);
  const cosLat = Math.cos(site.latitudeDeg * DEG);
  const sinH0 = Math.sin(minAltitudeDeg * DEG);
  const moving = (target.pmRaCosDecMasPerYr ?? 0) !== 0 || (target.pmDecMasPerYr ?? 0) !== 0;
  const fixed = moving ? null : directionAt(target, 0);
  const rate = SIDEREAL_RATE_DEG_PER_DAY / DAY_MS;
  const out: TargetNight[] = new Array(prepared.nights.length);
  for (let i = 0; i < prepared.nights.length; i++) {
    const night = prepared.nights[i];
    const u = fixed ?? directionAt(target, night.refTime);
    const ab = night.aberration;
    const x0 = u[0] + ab[0];
    const y0 = u[1] + ab[1];
    const z0 = u[2] + ab[2];
    const m = night.rotation;
    const x = m[0] * x0 + m[1] * y0 + m[2] * z0;
    const y = m[3] * x0 + m[4] * y0 + m[5] * z0;
    const z = m[6] * x0 + m[7] * y0 + m[8] * z0;
    const r = Math.sqrt(x * x + y * y + z * z);
    const sinDec = z / r;
    const cosDec = Math.sqrt(x * x + y * y) / r;
    const md = night.moonDir;
    const moonSeparationDeg = Math.acos(Math.max(-1, Math.min(1, (x * md[0] + y * md[1] + z * md[2]) / r))) * RAD;
    const windows: Interval[] = [];
    let hours = 0;
    if (night.darkStart !== null && night.darkEnd !== null) {
      const a = night.darkStart;
      const b = night.darkEnd;
      const denom = cosLat * cosDec;
      const c = denom < 1e-12 ? (sinH0 - sinLat * sinDec > 0 ? 2 : -2) : (sinH0 - sinLat * sinDec) / denom;
      if (c <= -1) windows.push({ start: a, end: b });
      else if (c < 1) {
        const H0 = Math.acos(c) * RAD;
        const ra = Math.atan2(y, x) * RAD;
        const ha = wrap180(night.gastDeg + rate * (a - night.gastTime) + site.longitudeDeg - ra);
        const hb = ha + rate * (b - a);
        for (let k = Math.floor((ha + H0) / 360); 360 * k - H0 <= hb; k++) {
          const lo = Math.max(ha, 360 * k - H0);
          const hi = Math.min(hb, 360 * k + H0);
          if (hi > lo) windows.push({ start: a + (lo - ha) / rate, end: a + (hi - ha) / rate });
        }
      }
      for (const w of windows) hours += (w.end - w.start) / 3_600_000;
    }
    out[i] = { night, windows, observableHours: hours, moonSeparationDeg, hoursByMoonCategory: moonSplit ? hoursByMoon(night, windows) : null };
  }
  return out;
}
