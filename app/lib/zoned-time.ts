// Wall-clock times at the observatory ↔ UTC instants. Browser-safe (no server imports).
import { TZDate } from "@date-fns/tz";
import { format } from "date-fns";
import { Lru } from "./lru";
import { canonicalTimeZone, requireTimeZone } from "./time-zones";

// Zones are canonicalised before they reach TZDate: @date-fns/tz keeps a formatter per zone
// string it is given, without bound, so only canonical names (a few hundred) may reach it.

const localPattern = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/** "2027-01-15T17:00" read as a wall-clock time in `timeZone` → the UTC instant; null if malformed. */
export function zonedLocalToUtc(local: string, timeZone: string): Date | null {
  const m = localPattern.exec(local.trim());
  const zone = canonicalTimeZone(timeZone);
  if (!m || zone === null) return null;
  const [year, month, day, hour, minute, second] = m.slice(1).map((part) => Number(part ?? 0));
  if (month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 || second > 59) return null;
  const zoned = new TZDate(year, month - 1, day, hour, minute, second, zone);
  // Day 31 of a 30-day month rolls over; refuse it rather than guess.
  if (zoned.getDate() !== day) return null;
  return new Date(zoned.getTime());
}

/** A UTC instant as the wall clock in `timeZone`, "YYYY-MM-DD HH:MM" (the call form's text inputs). */
export function utcToZonedLocal(instant: Date | string, timeZone: string) {
  return format(new TZDate(new Date(instant).getTime(), requireTimeZone(timeZone)), "yyyy-MM-dd HH:mm");
}

/** "2027-01-15 17:00 MST" style, for showing an instant in a zone. */
const displayFormatters = new Lru<string, Intl.DateTimeFormat>(64);

export function formatInZone(instant: Date | string, timeZone: string) {
  const date = new Date(instant);
  const zone = requireTimeZone(timeZone);
  const formatter = displayFormatters.getOrSet(
    zone,
    () => new Intl.DateTimeFormat("en-US", { timeZone: zone, year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZoneName: "short" }),
  );
  const parts = formatter.formatToParts(date);
  const get = (type: string) => parts.find((p) => p.type === type)?.value ?? "";
  return `${get("year")}-${get("month")}-${get("day")} ${get("hour")}:${get("minute")} ${get("timeZoneName")}`;
}

/** Midnight at the start of a calendar date (YYYY-MM-DD) in `timeZone`. */
export function startOfDateInZone(date: string, timeZone: string) {
  return zonedLocalToUtc(`${date}T00:00`, timeZone);
}
