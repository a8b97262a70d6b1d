// The Moon over a site's nights: its place and phase at each night's reference instant,
// moonrise and moonset, and the hours of each moon category inside given intervals.

import * as Astro from "astronomy-engine";
import { DEG, toRaDec, vectorSeparationDeg, type Vec3 } from "../coordinates";
import { DAY_MS, utDays } from "../time";
import { SIDEREAL_RATE_DEG_PER_DAY, moonCategory, type MoonCategory } from "./conventions";
import type { Interval, PreparedSite, SiteNight } from "./site-nights";
import { EARTH_RADIUS_KM, RAD, apply, lagrange3, lha, type Geo, type Matrix } from "./sun-track";

export function moonAt(t: number, rotation: Matrix, sunVec: Vec3, observer: Astro.Observer, gastDeg: number, geo: Geo) {
  const time = new Astro.AstroTime(utDays(t));
  const m = Astro.GeoMoon(time);
  const geoMoon = apply(rotation, [m.x, m.y, m.z]);
  const o = Astro.ObserverVector(time, observer, true);
  const topo: Vec3 = [geoMoon[0] - o.x, geoMoon[1] - o.y, geoMoon[2] - o.z];
  const { raDeg, decDeg } = toRaDec(topo);
  const H = lha(gastDeg, geo.lonDeg, raDeg);
  const sinAlt = geo.sinLat * Math.sin(decDeg * DEG) + geo.cosLat * Math.cos(decDeg * DEG) * Math.cos(H * DEG);
  // phase angle at the Moon between the Sun and the Earth; k = (1 + cos i)/2 (Meeus 48.1)
  const toSun: Vec3 = [sunVec[0] - geoMoon[0], sunVec[1] - geoMoon[1], sunVec[2] - geoMoon[2]];
  const toEarth: Vec3 = [-geoMoon[0], -geoMoon[1], -geoMoon[2]];
  const i = vectorSeparationDeg(toSun, toEarth);
  const n = Math.hypot(topo[0], topo[1], topo[2]);
  return {
    illumination: (1 + Math.cos(i * DEG)) / 2,
    altitudeDeg: Math.asin(sinAlt) * RAD,
    dir: [topo[0] / n, topo[1] / n, topo[2] / n] as Vec3,
  };
}

export type MoonTimes = {
  /** first instant in the frame at which the Moon's centre rises through geometric altitude 0° */
  moonrise: number | null;
  /** first instant in the frame at which it sets through 0° */
  moonset: number | null;
  /** intervals of the frame during which the Moon's centre is above the horizon */
  up: Interval[];
};

const MOON_GRID_MS = 6 * 3_600_000;
const MOON_SCAN_MS = 20 * 60_000;
const moonDone = new WeakSet<PreparedSite>();

/**
 * Fills `night.moon` (moonrise, moonset, Moon-up intervals) for every night of a prepared site,
 * once. The geocentric Moon (astronomy-engine GeoMoon, rotated to the equator of date) is sampled
 * every 6 h and interpolated quadratically (error < 1″); the observer's geocentric position
 * follows astronomy-engine's `terra` (same ellipsoid) at the interpolated sidereal time; the
 * altitude is that of the Moon's centre, topocentric and geometric. Crossings: a 20-min scan
 * for sign changes, then regula falsi to < 1 s. Checked against astronomy-engine's
 * SearchAltitude(Moon, …, 0°) in visibility.test.ts.
 */
export function ensureMoonTimes(prepared: PreparedSite): void {
  if (moonDone.has(prepared) || prepared.nights.length === 0) return;
  if (prepared.nights.every((n) => n.moon)) {
    moonDone.add(prepared); // a slice of an already prepared span
    return;
  }
  const { site, nights } = prepared;
  const t0 = nights[0].frameStart - MOON_GRID_MS;
  const t1 = nights[nights.length - 1].frameEnd + MOON_GRID_MS;
  const grid: { t: number; v: Vec3 }[] = [];
  for (let t = t0; t <= t1 + MOON_GRID_MS; t += MOON_GRID_MS) {
    const m = Astro.GeoMoon(new Astro.AstroTime(utDays(t)));
    const night = nights[Math.min(nights.length - 1, Math.max(0, Math.floor((t - nights[0].frameStart) / DAY_MS)))];
    grid.push({ t, v: apply(night.rotation, [m.x, m.y, m.z]) });
  }
  const phi = site.latitudeDeg * DEG;
  const F = 0.996647180302104; // astronomy-engine's EARTH_FLATTENING (polar / equatorial radius)
  const c = 1 / Math.hypot(Math.cos(phi), F * Math.sin(phi));
  const hKm = site.elevationM / 1000;
  const ach = (EARTH_RADIUS_KM * c + hKm) / Astro.KM_PER_AU;
  const ash = (EARTH_RADIUS_KM * F * F * c + hKm) / Astro.KM_PER_AU;
  const cosPhi = Math.cos(phi);
  const sinPhi = Math.sin(phi);
  // sidereal time from the nearest night's reference (linear in time; nutation drifts < 0.01″/h)
  const nightAt = (t: number) => nights[Math.min(nights.length - 1, Math.max(0, Math.floor((t - nights[0].frameStart) / DAY_MS)))];
  const altitude = (t: number): number => {
    const k = Math.min(Math.max(Math.round((t - t0) / MOON_GRID_MS), 1), grid.length - 2);
    const a = grid[k - 1];
    const b = grid[k];
    const g = grid[k + 1];
    const x = lagrange3(t, a.t, b.t, g.t, a.v[0], b.v[0], g.v[0]);
    const y = lagrange3(t, a.t, b.t, g.t, a.v[1], b.v[1], g.v[1]);
    const z = lagrange3(t, a.t, b.t, g.t, a.v[2], b.v[2], g.v[2]);
    const n = nightAt(t);
    const theta = (n.gastDeg + SIDEREAL_RATE_DEG_PER_DAY * ((t - n.gastTime) / DAY_MS) + site.longitudeDeg) * DEG;
    const cosT = Math.cos(theta);
    const sinT = Math.sin(theta);
    const tx = x - ach * cosPhi * cosT;
    const ty = y - ach * cosPhi * sinT;
    const tz = z - ash * sinPhi;
    const up = cosPhi * cosT * tx + cosPhi * sinT * ty + sinPhi * tz;
    return Math.asin(up / Math.sqrt(tx * tx + ty * ty + tz * tz)) * RAD;
  };
  const crossing = (lo: number, hi: number, flo: number, fhi: number): number => {
    let a = lo;
    let b = hi;
    let fa = flo;
    let fb = fhi;
    for (let i = 0; i < 40 && b - a > 500; i++) {
      const m = Math.min(Math.max(a + ((b - a) * fa) / (fa - fb), a + (b - a) * 0.05), a + (b - a) * 0.95);
      const fm = altitude(m);
      if (fm === 0) return m;
      if (Math.sign(fm) === Math.sign(fa)) {
        a = m;
        fa = fm;
      } else {
        b = m;
        fb = fm;
      }
    }
    return a + ((b - a) * fa) / (fa - fb);
  };
  for (const night of nights) {
    const start = night.frameStart;
    const end = night.frameEnd;
    let moonrise: number | null = null;
    let moonset: number | null = null;
    const up: Interval[] = [];
    let prevT = start;
    let prevA = altitude(start);
    let upSince: number | null = prevA >= 0 ? start : null;
    for (let t = Math.min(start + MOON_SCAN_MS, end); ; t = Math.min(t + MOON_SCAN_MS, end)) {
      const alt = altitude(t);
      if ((prevA < 0) !== (alt < 0)) {
        const tc = crossing(prevT, t, prevA, alt);
        if (alt >= 0) {
          moonrise ??= tc;
          upSince = tc;
        } else {
          moonset ??= tc;
          if (upSince !== null) up.push({ start: upSince, end: tc });
          upSince = null;
        }
      }
      prevT = t;
      prevA = alt;
      if (t >= end) break;
    }
    if (upSince !== null) up.push({ start: upSince, end });
    night.moon = { moonrise, moonset, up };
  }
  moonDone.add(prepared);
}

const MOON_ORDER: Record<MoonCategory, number> = { dark: 0, grey: 1, bright: 2 };

/** Whether an observation that tolerates `tolerated` moon may use time of `category` (its category or darker). */
export function moonAllows(tolerated: MoonCategory, category: MoonCategory): boolean {
  return MOON_ORDER[category] <= MOON_ORDER[tolerated];
}

/**
 * The given intervals of one night cut at moonrise and moonset, each piece with its moon
 * category: the night's category while the Moon is up, dark while it is down — the same rule as
 * `hoursByMoon` (whose hours are the sums of these pieces), as intervals for callers that need
 * to know when (RA pressure).
 */
export function moonSegments(night: SiteNight, intervals: Interval[]): (Interval & { category: MoonCategory })[] {
  const up = night.moon?.up;
  if (!up) throw new Error("moon times not computed: call ensureMoonTimes(prepared) first");
  const upCategory = moonCategory(night.moonIllumination);
  const out: (Interval & { category: MoonCategory })[] = [];
  for (const w of intervals) {
    let t = w.start;
    for (const u of up) {
      if (u.end <= t || u.start >= w.end) continue;
      const lo = Math.max(u.start, t);
      const hi = Math.min(u.end, w.end);
      if (lo > t) out.push({ start: t, end: lo, category: "dark" });
      out.push({ start: lo, end: hi, category: upCategory });
      t = hi;
    }
    if (w.end > t) out.push({ start: t, end: w.end, category: "dark" });
  }
  return out;
}

/** Hours of each moon category inside the given intervals of one night (see MOON_CATEGORY_THRESHOLDS). */
export function hoursByMoon(night: SiteNight, intervals: Interval[]): Record<MoonCategory, number> {
  const out: Record<MoonCategory, number> = { dark: 0, grey: 0, bright: 0 };
  const upCategory = moonCategory(night.moonIllumination);
  const up = night.moon?.up;
  if (!up) throw new Error("moon times not computed: call ensureMoonTimes(prepared) first");
  for (const w of intervals) {
    const total = (w.end - w.start) / 3_600_000;
    let moonUp = 0;
    for (const u of up) {
      const lo = Math.max(u.start, w.start);
      const hi = Math.min(u.end, w.end);
      if (hi > lo) moonUp += (hi - lo) / 3_600_000;
    }
    out[upCategory] += moonUp;
    out.dark += total - moonUp;
  }
  return out;
}

/** Moon's illuminated fraction k = (1 + cos i)/2 (Meeus 48.1), i from geocentric Moon and Sun vectors. */
export function moonIllumination(t: number): number {
  const time = new Astro.AstroTime(utDays(t));
  const m = Astro.GeoMoon(time);
  const e = Astro.HelioVector(Astro.Body.Earth, time);
  const toSun: Vec3 = [-e.x - m.x, -e.y - m.y, -e.z - m.z];
  const i = vectorSeparationDeg(toSun, [-m.x, -m.y, -m.z]);
  return (1 + Math.cos(i * DEG)) / 2;
}
