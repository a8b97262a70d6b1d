// One home for time-zone names: every zone a client sends is canonicalised here first
// ("europe/PARIS" → "Europe/Paris", "US/Eastern" → "America/New_York"), so that the caches
// keyed by zone (ours and @date-fns/tz's formatter cache) hold at most one entry per real zone.
// Browser-safe (the LRU and zod only).
import { z } from "zod";
import { Lru } from "./lru";

/** Longer than any IANA name (the longest is ~32 characters); longer input is refused unparsed. */
export const TIME_ZONE_MAX_LENGTH = 64;

// raw spelling → canonical name (or null when it is no zone); bounded, so 20 000 spellings cost
// at most this many small strings.
const canonical = new Lru<string, string | null>(1024);

/** The runtime's canonical zones and UTC (a fixed set of a few hundred): the lists the forms offer. */
export function supportedTimeZones(): string[] {
  const intl = Intl as typeof Intl & { supportedValuesOf?: (key: "timeZone") => string[] };
  return [...new Set([...(intl.supportedValuesOf?.("timeZone") ?? []), "UTC"])];
}

// The canonical zones by lower-case name.
let byLowerCase: Map<string, string> | null = null;
function knownZone(timeZone: string): string | undefined {
  byLowerCase ??= new Map(supportedTimeZones().map((zone) => [zone.toLowerCase(), zone]));
  return byLowerCase.get(timeZone.toLowerCase());
}

/** The canonical IANA name of a time zone, or null when it is not one. */
export function canonicalTimeZone(timeZone: unknown): string | null {
  if (typeof timeZone !== "string" || timeZone === "" || timeZone.length > TIME_ZONE_MAX_LENGTH || timeZone !== timeZone.trim()) return null;
  const known = knownZone(timeZone);
  if (known !== undefined) return known;
  // aliases (US/Eastern) and other spellings the runtime accepts: asked once, remembered
  const hit = canonical.get(timeZone);
  if (hit !== undefined) return hit;
  let name: string | null;
  try {
    // A throwaway formatter (collected like any object); only the answer is kept.
    name = new Intl.DateTimeFormat("en-US", { timeZone }).resolvedOptions().timeZone;
  } catch {
    name = null;
  }
  canonical.set(timeZone, name);
  return name;
}

export function isValidTimeZone(timeZone: unknown): timeZone is string {
  return canonicalTimeZone(timeZone) !== null;
}

/** A form or API field holding a time zone: refused with `message` unless it is one, then canonical. */
export function timeZoneSchema(message: string) {
  return z
    .string({ error: message })
    .max(TIME_ZONE_MAX_LENGTH, { error: message })
    .refine(isValidTimeZone, { error: message })
    .transform((zone) => canonicalTimeZone(zone) ?? zone);
}

/** The canonical name; throws a RangeError for a name that is not a zone (callers validate first). */
export function requireTimeZone(timeZone: string): string {
  const name = canonicalTimeZone(timeZone);
  if (name === null) throw new RangeError(`not an IANA time zone: ${timeZone.slice(0, TIME_ZONE_MAX_LENGTH)}`);
  return name;
}

/** Size of the spelling cache (for tests). */
export function timeZoneCacheSize() {
  return canonical.size;
}
