// The Sun's track for a site: a daily grid of the apparent geocentric Sun (astronomy-engine),
// interpolated quadratically, and the crossings of a threshold altitude solved from the hour
// angle (sunset, sunrise, astronomical twilight). Internal to astro/visibility.

import * as Astro from "astronomy-engine";
import { DEG, type Vec3 } from "../coordinates";
import { DAY_MS, utDays } from "../time";
import { SIDEREAL_RATE_DEG_PER_DAY, type Site } from "./conventions";

export const SUN_RADIUS_KM = 695_700;
export const EARTH_RADIUS_KM = 6378.1366;
export const C_AU_PER_DAY = Astro.C_AUDAY;
export const RAD = 1 / DEG;

export type Matrix = number[]; // 3×3 row-major

type SunSample = { t: number; v: Vec3; gastDeg: number; rotation: Matrix; eqj: Vec3 };

export function wrap180(x: number): number {
  return x - 360 * Math.floor((x + 180) / 360);
}

function matrixOf(rot: Astro.RotationMatrix): Matrix {
  const r = rot.rot;
  // astronomy-engine stores rot[i][j] so that out_j = Σ_i rot[i][j] · in_i
  return [r[0][0], r[1][0], r[2][0], r[0][1], r[1][1], r[2][1], r[0][2], r[1][2], r[2][2]];
}

export function apply(m: Matrix, v: Vec3): Vec3 {
  return [
    m[0] * v[0] + m[1] * v[1] + m[2] * v[2],
    m[3] * v[0] + m[4] * v[1] + m[5] * v[2],
    m[6] * v[0] + m[7] * v[1] + m[8] * v[2],
  ];
}

/** Quadratic (Lagrange) interpolation through three samples. */
export function lagrange3(t: number, t0: number, t1: number, t2: number, y0: number, y1: number, y2: number): number {
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

export class SunTrack {
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

export function sunSample(t: number): SunSample {
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

export type Geo = { sinLat: number; cosLat: number; lonDeg: number; latDeg: number };

export function geoOf(site: Site): Geo {
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

export function lha(gastDeg: number, lonDeg: number, raDeg: number): number {
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

export function transitNear(track: SunTrack, geo: Geo, t0: number): number {
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
export function belowInterval(
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
