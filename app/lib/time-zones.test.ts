// Issue 7, item 10: every spelling of a zone is canonicalised before it reaches a cache, and
// every cache is bounded, so 20 000 case variants cannot grow memory without end.
import { describe, expect, it } from "vitest";
import { offsetFormatterCount, zoneOffsetMs } from "./astro/time";
import { Lru } from "./lru";
import { canonicalTimeZone, timeZoneCacheSize } from "./time-zones";
import { formatInZone, utcToZonedLocal, zonedLocalToUtc } from "./zoned-time";

/** The n-th of the 2^k capitalisations of `name` (letters only are flipped). */
function variant(name: string, n: number) {
  let bit = 0;
  return [...name].map((c) => (/[a-z]/i.test(c) ? ((n >> bit++) & 1 ? c.toUpperCase() : c.toLowerCase()) : c)).join("");
}

describe("time-zone spellings", () => {
  it("canonicalises case and aliases (IANA names; Link US/Eastern → America/New_York from the tz database's backward file)", () => {
    expect(canonicalTimeZone("europe/PARIS")).toBe("Europe/Paris");
    expect(canonicalTimeZone("US/Eastern")).toBe("America/New_York");
    expect(canonicalTimeZone("utc")).toBe("UTC");
    expect(canonicalTimeZone("Not/AZone")).toBeNull();
    expect(canonicalTimeZone(" Europe/Paris")).toBeNull();
    expect(canonicalTimeZone("x".repeat(65))).toBeNull();
  });

  it("keeps the caches bounded over 20 000 capitalisations of one zone", () => {
    const name = "Europe/Amsterdam"; // 15 letters: 32 768 spellings
    const instant = Date.UTC(2027, 0, 15, 12);
    const expected = 3_600_000; // CET, UTC+1, in January (tz database, europe file)
    let wrong = 0;
    for (let n = 0; n < 20_000; n++) {
      const zone = variant(name, n);
      if (zoneOffsetMs(instant, zone) !== expected) wrong++;
      if (n % 1000 === 0) {
        expect(formatInZone(new Date(instant), zone)).toMatch(/^2027-01-15 13:00 /);
        expect(zonedLocalToUtc("2027-01-15T13:00", zone)?.getTime()).toBe(instant);
      }
    }
    expect(wrong).toBe(0);
    expect(offsetFormatterCount()).toBe(1);
  });

  it("keeps the spelling cache bounded for zones the runtime only knows as aliases", () => {
    // America/Argentina/Buenos_Aires is not in Intl.supportedValuesOf (which lists America/Buenos_Aires)
    const instant = Date.UTC(2027, 0, 15, 12);
    for (let n = 0; n < 1_500; n++) {
      // Argentina keeps UTC−3 all year since 2009 (tz database, southamerica file)
      if (zoneOffsetMs(instant, variant("America/Argentina/Buenos_Aires", n)) !== -3 * 3_600_000) throw new Error(`wrong offset for spelling ${n}`);
    }
    expect(timeZoneCacheSize()).toBeLessThanOrEqual(1024);
    expect(offsetFormatterCount()).toBeLessThanOrEqual(2);
  });
});

describe("Lru", () => {
  it("drops the least recently used entry beyond its size", () => {
    const lru = new Lru<string, number>(2);
    lru.set("a", 1).set("b", 2);
    expect(lru.get("a")).toBe(1); // a is now the most recent
    lru.set("c", 3);
    expect(lru.has("b")).toBe(false);
    expect(lru.has("a")).toBe(true);
    expect(lru.size).toBe(2);
  });
});

describe("the call form's wall-clock text: YYYY-MM-DD HH:MM, or with a T", () => {
  it("reads both separators as the same instant and writes the space form", () => {
    // 13:00 in Amsterdam on 2027-01-15 is CET, UTC+1 (tz database, europe file): 12:00 UTC
    const instant = Date.UTC(2027, 0, 15, 12);
    expect(zonedLocalToUtc("2027-01-15 13:00", "Europe/Amsterdam")?.getTime()).toBe(instant);
    expect(zonedLocalToUtc("2027-01-15T13:00", "Europe/Amsterdam")?.getTime()).toBe(instant);
    expect(zonedLocalToUtc("2027-01-15  13:00", "Europe/Amsterdam")).toBeNull();
    expect(zonedLocalToUtc("15/01/2027 13:00", "Europe/Amsterdam")).toBeNull();
    expect(utcToZonedLocal(new Date(instant), "Europe/Amsterdam")).toBe("2027-01-15 13:00");
  });
});
