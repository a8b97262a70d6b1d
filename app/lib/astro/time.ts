// Calendar dates in a site's IANA time zone, and a few time constants.

export const DAY_MS = 86_400_000;
export const J2000_UTC_MS = Date.UTC(2000, 0, 1, 12, 0, 0);

import { Lru } from "../lru";
import { requireTimeZone } from "../time-zones";

// One formatter per canonical zone (a spelling is canonicalised first), at most 128 kept.
const formatters = new Lru<string, Intl.DateTimeFormat>(128);

// `format` with a long offset name is ~30× faster than `formatToParts`, which matters when a
// semester of nights is framed.
function formatter(timeZone: string): Intl.DateTimeFormat {
  const zone = requireTimeZone(timeZone);
  return formatters.getOrSet(zone, () => new Intl.DateTimeFormat("en-GB", { timeZone: zone, timeZoneName: "longOffset" }));
}

/** Number of cached offset formatters (for tests). */
export function offsetFormatterCount() {
  return formatters.size;
}

/** Offset of local civil time from UTC at an instant, in ms (east positive). */
export function zoneOffsetMs(utcMs: number, timeZone: string): number {
  const text = formatter(timeZone).format(new Date(utcMs));
  const m = /GMT([+-−])(\d{1,2})(?::(\d{2}))?(?::(\d{2}))?/.exec(text);
  if (!m) return 0; // "GMT" alone: UTC
  const sign = m[1] === "+" ? 1 : -1;
  return sign * ((Number(m[2]) * 60 + Number(m[3] ?? 0)) * 60 + Number(m[4] ?? 0)) * 1000;
}

/** Days since 1970-01-01 of a `YYYY-MM-DD` date (proleptic Gregorian, integer arithmetic). */
export function dayNumber(date: string): number {
  let y = Number(date.slice(0, 4));
  const m = Number(date.slice(5, 7));
  const d = Number(date.slice(8, 10));
  y -= m <= 2 ? 1 : 0;
  const era = Math.floor(y / 400);
  const yoe = y - era * 400;
  const doy = Math.floor((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

/** `YYYY-MM-DD` of a day number (inverse of `dayNumber`). */
export function dateOfDayNumber(z0: number): string {
  const z = z0 + 719468;
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const d = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const m = mp < 10 ? mp + 3 : mp - 9;
  const y = yoe + era * 400 + (m <= 2 ? 1 : 0);
  return `${y}-${m < 10 ? "0" : ""}${m}-${d < 10 ? "0" : ""}${d}`;
}

/** UTC instant of a local wall-clock time on a calendar date (`YYYY-MM-DD`). */
export function localTimeToUtcMs(date: string, hour: number, timeZone: string, offsetGuessMs = 0): number {
  const wall = dayNumber(date) * DAY_MS + hour * 3_600_000;
  let t = wall - zoneOffsetMs(wall - offsetGuessMs, timeZone);
  if (offsetGuessMs === 0) t = wall - zoneOffsetMs(t, timeZone);
  return t;
}

/** Local calendar date (`YYYY-MM-DD`) of an instant. */
export function localDate(utcMs: number, timeZone: string): string {
  return new Date(utcMs + zoneOffsetMs(utcMs, timeZone)).toISOString().slice(0, 10);
}

/** Local wall-clock `YYYY-MM-DD HH:MM` of an instant, for display beside UTC. */
export function localDateTime(utcMs: number, timeZone: string): string {
  return new Date(utcMs + zoneOffsetMs(utcMs, timeZone)).toISOString().slice(0, 16).replace("T", " ");
}

export function addDays(date: string, days: number): string {
  return dateOfDayNumber(dayNumber(date) + days);
}

export function isIsoDate(date: string): boolean {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(date)) return false;
  const [y, m, d] = date.split("-").map(Number);
  const t = new Date(Date.UTC(y, m - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
}

export function utDays(utcMs: number): number {
  return (utcMs - J2000_UTC_MS) / DAY_MS;
}

export function fromUtDays(ut: number): number {
  return J2000_UTC_MS + ut * DAY_MS;
}

const isoDays = new Map<number, string>();
const pad2 = (n: number) => (n < 10 ? "0" : "") + n;

/**
 * `new Date(utcMs).toISOString()`, cheaper: the API's JSON formats thousands of instants that
 * fall on a few hundred days, so the date part is kept per day and the time of day is put
 * together by hand (years 0–9999, as toISOString writes them; other values go to it).
 */
export function isoTime(utcMs: number): string {
  const t = Math.trunc(utcMs); // the Date's own time clip
  const day = Math.floor(t / DAY_MS);
  if (!(t >= -62_167_219_200_000 && t < 253_402_300_800_000)) return new Date(t).toISOString();
  let prefix = isoDays.get(day);
  if (prefix === undefined) {
    prefix = new Date(day * DAY_MS).toISOString().slice(0, 11);
    if (isoDays.size > 20_000) isoDays.clear();
    isoDays.set(day, prefix);
  }
  let ms = t - day * DAY_MS;
  const h = Math.floor(ms / 3_600_000);
  ms -= h * 3_600_000;
  const m = Math.floor(ms / 60_000);
  ms -= m * 60_000;
  const s = Math.floor(ms / 1000);
  ms -= s * 1000;
  return `${prefix}${pad2(h)}:${pad2(m)}:${pad2(s)}.${ms < 10 ? "00" : ms < 100 ? "0" : ""}${ms}Z`;
}
