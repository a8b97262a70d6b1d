// A site's nights, independent of the target: the Sun's transits framing each night, sunset,
// sunrise and astronomical darkness, the Moon at mid-darkness, and the rotation, aberration and
// sidereal time the target windows need. Cached by site and dates.

import * as Astro from "astronomy-engine";
import { DEG, type Vec3 } from "../coordinates";
import { DAY_MS, addDays, dayNumber, localDate, zoneOffsetMs } from "../time";
import { SIDEREAL_RATE_DEG_PER_DAY, TWILIGHT_ALTITUDE_DEG, moonCategory, type MoonCategory, type Site } from "./conventions";
import { moonAt, type MoonTimes } from "./moon";
import { C_AU_PER_DAY, RAD, SUN_RADIUS_KM, SunTrack, belowInterval, geoOf, sunSample, transitNear, type Matrix } from "./sun-track";

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

export type Interval = { start: number; end: number };

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

/** Local apparent sidereal time (deg, not wrapped) at instant t of a night, as `targetNights` reckons hour angles. */
export function localSiderealDeg(night: SiteNight, longitudeDeg: number, t: number): number {
  return night.gastDeg + (SIDEREAL_RATE_DEG_PER_DAY / DAY_MS) * (t - night.gastTime) + longitudeDeg;
}

/** Local calendar date of an instant at a site (re-exported for callers that label nights). */
export function siteLocalDate(site: Site, t: number): string {
  return localDate(t, site.timeZone);
}
