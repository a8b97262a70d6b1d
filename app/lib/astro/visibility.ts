// Night-by-night visibility of a fixed target from a site (SPEC §3.1).
//
// Conventions
// - Target: ICRS/J2000 direction carried to the night by its proper motion, corrected for
//   annual aberration (Earth's heliocentric velocity, as astronomy-engine does for its
//   user-defined stars), then rotated to the true equator and equinox of date (precession +
//   nutation, astronomy-engine's Rotation_EQJ_EQD). Altitudes are GEOMETRIC: no refraction is
//   applied to the target or to twilight, so an altitude limit means the unrefracted altitude
//   (refraction would lift a 30° limit by ~1.7′, a 20° limit by ~2.6′).
// - Sunset and sunrise follow astronomy-engine's SearchRiseSet: the Sun's upper limb at
//   −34′ × (air density at the site relative to sea level). Astronomical twilight: the Sun's
//   centre at −18°, geometric, topocentric (common practice).
// - A night is framed from the Sun's upper transit nearest local clock noon of its `date` (the
//   local calendar date on which the night begins) to the next upper transit. Inside a frame
//   the Sun goes down once and up once, so each event happens at most once.
// - Speed: everything that depends only on the site and the dates (Sun on a daily grid,
//   precession–nutation matrices, sidereal time, Earth's velocity, Moon) is computed once by
//   `prepareSiteNights`. Crossings are solved in closed form from the hour angle,
//   cos H = (sin h0 − sin φ sin δ) / (cos φ cos δ), iterated for the moving Sun.

import * as Astro from "astronomy-engine";
import { DEG, directionAt, toRaDec, vectorSeparationDeg, type Target, type Vec3 } from "./coordinates";
import { altitudeForAirmass } from "./airmass";
import { DAY_MS, addDays, dayNumber, isoTime, localDate, utDays, zoneOffsetMs } from "./time";
import type { MoonCategory } from "../domain";

export type Site = { latitudeDeg: number; longitudeDeg: number; elevationM: number; timeZone: string };

/**
 * Moon categories. Time counts as dark while the Moon's centre is below the horizon (geometric
 * altitude < 0°) or its illuminated fraction is below `darkBelow`; grey while it is up and lit
 * `darkBelow`–`greyBelow`; bright while it is up and lit at least `greyBelow`. The fraction is
 * the night's, at mid-darkness (it changes by < 0.06 within a night). A night's single
 * `moonCategory` is the category of its illuminated fraction at mid-darkness.
 */
export const MOON_CATEGORY_THRESHOLDS = {
  /** dark when the illuminated fraction is below this */
  darkBelow: 0.35,
  /** grey when below this (and not dark); bright otherwise */
  greyBelow: 0.7,
} as const;

export const MOON_TIME_RULE =
  "Moon time is split at moonrise and moonset: dark while the Moon's centre is below the horizon (geometric altitude < 0°) or it is less than 35 % lit; grey while it is up and 35–70 % lit; bright while it is up and at least 70 % lit (illuminated fraction at mid-darkness).";

export const TWILIGHT_ALTITUDE_DEG = -18;
export const REFRACTION_MODEL = "none (geometric altitudes) for targets and twilight; sunset/sunrise with 34′ horizontal refraction scaled by air density";

export function moonCategory(illumination: number): MoonCategory {
  if (illumination < MOON_CATEGORY_THRESHOLDS.darkBelow) return "dark";
  if (illumination < MOON_CATEGORY_THRESHOLDS.greyBelow) return "grey";
  return "bright";
}

/** Earth's sidereal rotation (deg per mean solar day); local sidereal time grows at this rate. */
export const SIDEREAL_RATE_DEG_PER_DAY = 360.98564736629;
const SUN_RADIUS_KM = 695_700;
const EARTH_RADIUS_KM = 6378.1366;
const C_AU_PER_DAY = Astro.C_AUDAY;
const RAD = 1 / DEG;

type Matrix = number[]; // 3×3 row-major

/** What a night offers, independent of the target. Times are ms since 1970 UTC. */
export type SiteNight = {
  date: string;
  frameStart: number;
  frameEnd: number;
  sunset: number | null;
  sunrise: number | null;
  darkStart: number | null;
  darkEnd: number | null;
  /** instant at which the Moon (and the target's apparent place) are evaluated */
  refTime: number;
  moonIllumination: number;
  moonAltitudeDeg: number;
  moonCategory: MoonCategory;
  /** Moon-up intervals inside the frame, moonrise and moonset in the frame; filled by `ensureMoonTimes` */
  moon?: MoonTimes;
  /** topocentric Moon direction, equator of date */
  moonDir: Vec3;
  /** EQJ → equator of date at refTime */
  rotation: Matrix;
  /** Earth's heliocentric velocity / c (EQJ) at refTime, for annual aberration */
  aberration: Vec3;
  /** Greenwich apparent sidereal time (deg) at `gastTime` */
  gastDeg: number;
  gastTime: number;
};

export type PreparedSite = { site: Site; from: string; nights: SiteNight[] };

type SunSample = { t: number; v: Vec3; gastDeg: number; rotation: Matrix; eqj: Vec3 };

function wrap180(x: number): number {
  return x - 360 * Math.floor((x + 180) / 360);
}

function matrixOf(rot: Astro.RotationMatrix): Matrix {
  const r = rot.rot;
  // astronomy-engine stores rot[i][j] so that out_j = Σ_i rot[i][j] · in_i
  return [r[0][0], r[1][0], r[2][0], r[0][1], r[1][1], r[2][1], r[0][2], r[1][2], r[2][2]];
}

function apply(m: Matrix, v: Vec3): Vec3 {
  return [
    m[0] * v[0] + m[1] * v[1] + m[2] * v[2],
    m[3] * v[0] + m[4] * v[1] + m[5] * v[2],
    m[6] * v[0] + m[7] * v[1] + m[8] * v[2],
  ];
}

/** Quadratic (Lagrange) interpolation through three samples. */
function lagrange3(t: number, t0: number, t1: number, t2: number, y0: number, y1: number, y2: number): number {
  const l0 = ((t - t1) * (t - t2)) / ((t0 - t1) * (t0 - t2));
  const l1 = ((t - t0) * (t - t2)) / ((t1 - t0) * (t1 - t2));
  const l2 = ((t - t0) * (t - t1)) / ((t2 - t0) * (t2 - t1));
  return l0 * y0 + l1 * y1 + l2 * y2;
}

function lagrange3Slope(t: number, t0: number, t1: number, t2: number, y0: number, y1: number, y2: number): number {
  const d0 = (2 * t - t1 - t2) / ((t0 - t1) * (t0 - t2));
  const d1 = (2 * t - t0 - t2) / ((t1 - t0) * (t1 - t2));
  const d2 = (2 * t - t0 - t1) / ((t2 - t0) * (t2 - t1));
  return d0 * y0 + d1 * y1 + d2 * y2;
}

class SunTrack {
  constructor(readonly samples: SunSample[]) {}

  /** Index of the sample nearest to t (samples are about a day apart). */
  private index(t: number): number {
    const s = this.samples;
    let k = Math.round((t - s[0].t) / DAY_MS);
    k = Math.min(Math.max(k, 0), s.length - 1);
    while (k > 0 && Math.abs(s[k - 1].t - t) < Math.abs(s[k].t - t)) k--;
    while (k < s.length - 1 && Math.abs(s[k + 1].t - t) < Math.abs(s[k].t - t)) k++;
    return k;
  }

  private around(t: number): [SunSample, SunSample, SunSample] {
    const c = Math.min(Math.max(this.index(t), 1), this.samples.length - 2);
    return [this.samples[c - 1], this.samples[c], this.samples[c + 1]];
  }

  /** Geocentric apparent Sun, equator of date: RA, Dec (deg), distance (AU). */
  at(t: number): { ra: number; dec: number; dist: number } {
    const [a, b, c] = this.around(t);
    const x = lagrange3(t, a.t, b.t, c.t, a.v[0], b.v[0], c.v[0]);
    const y = lagrange3(t, a.t, b.t, c.t, a.v[1], b.v[1], c.v[1]);
    const z = lagrange3(t, a.t, b.t, c.t, a.v[2], b.v[2], c.v[2]);
    const dist = Math.hypot(x, y, z);
    return { ra: Math.atan2(y, x) * RAD, dec: Math.asin(z / dist) * RAD, dist };
  }

  /** Earth's heliocentric velocity (AU/day, EQJ) = −d(Sun's geocentric position)/dt. */
  earthVelocity(t: number): Vec3 {
    const [a, b, c] = this.around(t);
    const f = (i: number) => -lagrange3Slope(t, a.t, b.t, c.t, a.eqj[i], b.eqj[i], c.eqj[i]) * DAY_MS;
    return [f(0), f(1), f(2)];
  }

  nearest(t: number): SunSample {
    return this.samples[this.index(t)];
  }

  gastDeg(t: number): number {
    const s = this.nearest(t);
    return s.gastDeg + SIDEREAL_RATE_DEG_PER_DAY * ((t - s.t) / DAY_MS);
  }
}

function sunSample(t: number): SunSample {
  const time = new Astro.AstroTime(utDays(t));
  // Apparent geocentric Sun = minus the Earth's heliocentric position backdated by the light
  // time (≈ 499 s × distance): light time and annual aberration together, to first order, as
  // astronomy-engine's GeoVector(Sun, t, true) does, at a third of its cost.
  const g = Astro.HelioVector(Astro.Body.Earth, time.AddDays(-0.0057755183));
  g.x = -g.x;
  g.y = -g.y;
  g.z = -g.z;
  const rotation = matrixOf(Astro.Rotation_EQJ_EQD(time));
  const eqj: Vec3 = [g.x, g.y, g.z];
  return { t, v: apply(rotation, eqj), eqj, gastDeg: 15 * Astro.SiderealTime(time), rotation };
}

type Geo = { sinLat: number; cosLat: number; lonDeg: number; latDeg: number };

function geoOf(site: Site): Geo {
  return {
    sinLat: Math.sin(site.latitudeDeg * DEG),
    cosLat: Math.cos(site.latitudeDeg * DEG),
    lonDeg: site.longitudeDeg,
    latDeg: site.latitudeDeg,
  };
}

/** Topocentric geometric altitude of the Sun's centre (deg), from the interpolated track. */
function sunAltitude(track: SunTrack, geo: Geo, t: number): number {
  const s = track.at(t);
  const h = lha(track.gastDeg(t), geo.lonDeg, s.ra);
  const sinH = geo.sinLat * Math.sin(s.dec * DEG) + geo.cosLat * Math.cos(s.dec * DEG) * Math.cos(h * DEG);
  const hGeo = Math.asin(Math.max(-1, Math.min(1, sinH))) * RAD;
  return hGeo - parallaxDeg(s.dist) * Math.cos(hGeo * DEG);
}

function parallaxDeg(distAu: number): number {
  return Math.asin(EARTH_RADIUS_KM / (distAu * Astro.KM_PER_AU)) * RAD;
}

function lha(gastDeg: number, lonDeg: number, raDeg: number): number {
  return wrap180(gastDeg + lonDeg - raDeg);
}

/** Hour angle (deg, 0–180) at which a body at declination dec reaches altitude h0; ±Infinity if never / always. */
export function hourAngleAtAltitude(latDeg: number, decDeg: number, h0Deg: number): number {
  const denom = Math.cos(latDeg * DEG) * Math.cos(decDeg * DEG);
  const num = Math.sin(h0Deg * DEG) - Math.sin(latDeg * DEG) * Math.sin(decDeg * DEG);
  if (Math.abs(denom) < 1e-12) return num > 0 ? Number.NEGATIVE_INFINITY : Number.POSITIVE_INFINITY;
  const c = num / denom;
  if (c >= 1) return Number.NEGATIVE_INFINITY; // never reaches h0
  if (c <= -1) return Number.POSITIVE_INFINITY; // always above h0
  return Math.acos(c) * RAD;
}

/**
 * Instant at which the Sun's topocentric centre crosses `h0(dist)` on one side of the meridian
 * (side +1: descending, west; −1: ascending, east), starting from `guess`, solved from the hour
 * angle and iterated because the Sun moves. Falls back to bisection inside [lo, hi].
 */
function sunCrossing(
  track: SunTrack,
  geo: Geo,
  h0: (dist: number) => number,
  side: 1 | -1,
  guess: number,
  lo: number,
  hi: number,
): number {
  let t = guess;
  for (let i = 0; i < 8; i++) {
    const s = track.at(t);
    const target = h0(s.dist);
    const hGeo = target + parallaxDeg(s.dist) * Math.cos(target * DEG);
    const H = hourAngleAtAltitude(geo.latDeg, s.dec, hGeo);
    if (!Number.isFinite(H)) break;
    const dt = (wrap180(side * H - lha(track.gastDeg(t), geo.lonDeg, s.ra)) / 360) * DAY_MS;
    t += dt;
    if (Math.abs(dt) < 1) return t >= lo && t <= hi ? t : bisect(track, geo, h0, lo, hi);
  }
  return bisect(track, geo, h0, lo, hi);
}

function bisect(track: SunTrack, geo: Geo, h0: (dist: number) => number, lo: number, hi: number): number {
  const f = (t: number) => sunAltitude(track, geo, t) - h0(track.at(t).dist);
  let a = lo;
  let b = hi;
  const fa = f(a);
  for (let i = 0; i < 50 && b - a > 1; i++) {
    const m = (a + b) / 2;
    if (Math.sign(f(m)) === Math.sign(fa)) a = m;
    else b = m;
  }
  return (a + b) / 2;
}

function transitNear(track: SunTrack, geo: Geo, t0: number): number {
  let t = t0;
  for (let i = 0; i < 5; i++) {
    const s = track.at(t);
    t -= (lha(track.gastDeg(t), geo.lonDeg, s.ra) / 360) * DAY_MS;
  }
  return t;
}

/**
 * Events of one threshold in a frame: the instants at which the Sun goes below `h0` (after the
 * first transit) and comes back above it (before the next). `start` is the frame start when the
 * Sun is already below at the transit; `null, null` when it never goes below.
 */
function belowInterval(
  track: SunTrack,
  geo: Geo,
  h0: (dist: number) => number,
  frameStart: number,
  frameEnd: number,
): { start: number | null; end: number | null; startIsFrame: boolean; endIsFrame: boolean } {
  const mid = (frameStart + frameEnd) / 2;
  const minAlt = sunAltitude(track, geo, mid);
  if (minAlt >= h0(track.at(mid).dist)) return { start: null, end: null, startIsFrame: false, endIsFrame: false };
  const belowAtStart = sunAltitude(track, geo, frameStart) < h0(track.at(frameStart).dist);
  const belowAtEnd = sunAltitude(track, geo, frameEnd) < h0(track.at(frameEnd).dist);
  const quarter = (frameEnd - frameStart) / 4;
  const start = belowAtStart ? frameStart : sunCrossing(track, geo, h0, 1, frameStart + quarter, frameStart, mid);
  const end = belowAtEnd ? frameEnd : sunCrossing(track, geo, h0, -1, frameEnd - quarter, mid, frameEnd);
  return { start, end, startIsFrame: belowAtStart, endIsFrame: belowAtEnd };
}

function moonAt(t: number, rotation: Matrix, sunVec: Vec3, observer: Astro.Observer, gastDeg: number, geo: Geo) {
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

/** Local apparent sidereal time (deg, not wrapped) at instant t of a night, as `targetNights` reckons hour angles. */
export function localSiderealDeg(night: SiteNight, longitudeDeg: number, t: number): number {
  return night.gastDeg + (SIDEREAL_RATE_DEG_PER_DAY / DAY_MS) * (t - night.gastTime) + longitudeDeg;
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

const cache = new Map<string, PreparedSite>();
const CACHE_SIZE = 64;

/**
 * Everything about `count` nights from local date `from` at a site that does not depend on the
 * target. Cached (LRU) by site and dates, so repeated calls for other targets are cheap.
 */
export function prepareSiteNights(site: Site, from: string, count: number): PreparedSite {
  const key = `${site.latitudeDeg}|${site.longitudeDeg}|${site.elevationM}|${site.timeZone}|${from}|${count}`;
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const prepared = computeSiteNights(site, from, count);
  cache.set(key, prepared);
  if (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value as string);
  return prepared;
}

export function clearSiteCache(): void {
  cache.clear();
}

function computeSiteNights(site: Site, from: string, count: number): PreparedSite {
  const geo = geoOf(site);
  const observer = new Astro.Observer(site.latitudeDeg, site.longitudeDeg, site.elevationM);
  const density = Astro.Atmosphere(site.elevationM).density;
  const riseSetH0 = (dist: number) =>
    -(34 / 60) * density - Math.asin(SUN_RADIUS_KM / (dist * Astro.KM_PER_AU)) * RAD;
  const darkH0 = () => TWILIGHT_ALTITUDE_DEG;

  // Local clock noon of each date (one time-zone look-up per date, seeded with the previous
  // offset), and a daily Sun grid half a day later, one extra sample on each side.
  const noons: number[] = [];
  let offset = Math.round(site.longitudeDeg / 15) * 3_600_000;
  for (let k = -2; k <= count + 1; k++) {
    const wall = (dayNumber(from) + k) * DAY_MS + 12 * 3_600_000;
    offset = zoneOffsetMs(wall - offset, site.timeZone);
    noons.push(wall - offset);
  }
  const samples = noons.map((noon) => sunSample(noon + DAY_MS / 2));
  const track = new SunTrack(samples);
  const transits: number[] = [];
  for (let k = 0; k <= count; k++) transits.push(transitNear(track, geo, noons[k + 2]));

  const nights: SiteNight[] = [];
  for (let i = 0; i < count; i++) {
    const frameStart = transits[i];
    const frameEnd = transits[i + 1];
    const rs = belowInterval(track, geo, riseSetH0, frameStart, frameEnd);
    const dk = belowInterval(track, geo, darkH0, frameStart, frameEnd);
    const sunset = rs.start !== null && !rs.startIsFrame ? rs.start : null;
    const sunrise = rs.end !== null && !rs.endIsFrame ? rs.end : null;
    const darkStart = dk.start;
    const darkEnd = dk.end;
    const refTime =
      darkStart !== null && darkEnd !== null
        ? (darkStart + darkEnd) / 2
        : sunset !== null && sunrise !== null
          ? (sunset + sunrise) / 2
          : (frameStart + frameEnd) / 2;
    const sample = track.nearest(refTime);
    const gastDeg = track.gastDeg(refTime);
    const sun = track.at(refTime);
    const sunVec: Vec3 = [
      sun.dist * Math.cos(sun.dec * DEG) * Math.cos(sun.ra * DEG),
      sun.dist * Math.cos(sun.dec * DEG) * Math.sin(sun.ra * DEG),
      sun.dist * Math.sin(sun.dec * DEG),
    ];
    const moon = moonAt(refTime, sample.rotation, sunVec, observer, gastDeg, geo);
    const v = track.earthVelocity(refTime);
    nights.push({
      date: addDays(from, i),
      frameStart,
      frameEnd,
      sunset,
      sunrise,
      darkStart,
      darkEnd,
      refTime,
      moonIllumination: moon.illumination,
      moonAltitudeDeg: moon.altitudeDeg,
      moonCategory: moonCategory(moon.illumination),
      moonDir: moon.dir,
      rotation: sample.rotation,
      aberration: [v[0] / C_AU_PER_DAY, v[1] / C_AU_PER_DAY, v[2] / C_AU_PER_DAY],
      gastDeg,
      gastTime: refTime,
    });
  }
  return { site, from, nights };
}

/** Apparent place of the target for a night: RA/Dec of date (deg) and unit vector. */
export function apparentPlace(target: Target, night: SiteNight): { raDeg: number; decDeg: number; dir: Vec3 } {
  const u = directionAt(target, night.refTime);
  const a = night.aberration;
  const w = apply(night.rotation, [u[0] + a[0], u[1] + a[1], u[2] + a[2]]);
  const n = Math.hypot(w[0], w[1], w[2]);
  const dir: Vec3 = [w[0] / n, w[1] / n, w[2] / n];
  return { ...toRaDec(dir), dir };
}

export type Interval = { start: number; end: number };

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

/** The API's visibility answer: nights with ISO 8601 UTC times and a semester summary. */
export function computeVisibility(input: VisibilityInput): VisibilityJson {
  const prepared = prepareSiteNights(input.site, input.from, input.nights);
  const minAltitudeDeg = limitAltitude(input.limit);
  const rows = targetNights(prepared, input.target, minAltitudeDeg);
  return {
    site: input.site,
    target: { raDeg: input.target.raDeg, decDeg: input.target.decDeg },
    limit: { minAltitudeDeg: round(minAltitudeDeg, 4), ...("maxAirmass" in input.limit ? { maxAirmass: input.limit.maxAirmass } : {}) },
    nights: rows.map((r) => ({
      date: r.night.date,
      sunset: iso(r.night.sunset),
      sunrise: iso(r.night.sunrise),
      darkStart: iso(r.night.darkStart),
      darkEnd: iso(r.night.darkEnd),
      windows: r.windows.map((w) => ({ start: iso(w.start) as string, end: iso(w.end) as string })),
      observableHours: round(r.observableHours, 4),
      moon: {
        illumination: round(r.night.moonIllumination, 4),
        altitudeDeg: round(r.night.moonAltitudeDeg, 2),
        separationDeg: round(r.moonSeparationDeg, 2),
      },
      moonCategory: r.night.moonCategory,
      moonrise: iso(r.night.moon?.moonrise ?? null),
      moonset: iso(r.night.moon?.moonset ?? null),
      hoursByMoonCategory: roundSplit(r.hoursByMoonCategory as Record<MoonCategory, number>, 4),
      darkHoursByMoonCategory: roundSplit(darkHoursByMoon(r.night), 4),
    })),
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

/** Local calendar date of an instant at a site (re-exported for callers that label nights). */
export function siteLocalDate(site: Site, t: number): string {
  return localDate(t, site.timeZone);
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
