// RA pressure (pure part). Check values come from outside the module: astronomy-engine's own
// sidereal time (SiderealTime, a reference library), the textbook hour angle at an altitude
// (cos H0 = (sin h0 − sin φ sin δ) / (cos φ cos δ), Meeus, Astronomical Algorithms, eq. 15.1, from
// memory) and plain sums over the nights' dark intervals. The astropy comparison of the available
// side is in ra-pressure-reference.test.ts. The site is invented.
import * as Astro from "astronomy-engine";
import { describe, expect, it } from "vitest";
import { darkHoursByMoon, ensureMoonTimes, prepareSiteNights, type Site } from "../astro/visibility";
import { raPressure, type RaObservation } from "./ra-pressure";

const SITE: Site = { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" }; // invented
const prepared = prepareSiteNights(SITE, "2027-02-01", 181); // 2027-02-01 … 2027-07-31
ensureMoonTimes(prepared);
const darkOf = (n: (typeof prepared.nights)[number]) => (n.darkStart === null || n.darkEnd === null ? 0 : (n.darkEnd - n.darkStart) / 3_600_000);
const semesterDark = prepared.nights.reduce((s, n) => s + darkOf(n), 0);
const sum = (xs: number[]) => xs.reduce((s, x) => s + x, 0);
const obs = (over: Partial<RaObservation>): RaObservation => ({
  observationId: 1,
  proposalId: 1,
  target: { raDeg: 90, decDeg: 0 },
  minAltitudeDeg: 30,
  moonCategory: "bright",
  requestedHours: 10,
  ...over,
});

describe("available dark hours per RA bin", () => {
  it("the 24 bins sum to the semester's dark hours, and each moon category to the nights' own split", () => {
    const result = raPressure({ prepared, clearFractions: [], observations: [] });
    expect(result.bins.map((b) => b.raHour)).toEqual([...Array(24).keys()]);
    expect(semesterDark).toBeGreaterThan(1000); // 181 nights at 31° N
    expect(sum(result.bins.map((b) => b.darkHours))).toBeCloseTo(semesterDark, 9);
    expect(result.darkHours).toBeCloseTo(semesterDark, 9);
    for (const c of ["dark", "grey", "bright"] as const) {
      expect(sum(result.bins.map((b) => b.byMoonCategory[c].darkHours))).toBeCloseTo(sum(prepared.nights.map((n) => darkHoursByMoon(n)[c])), 9);
    }
    // without a setting every month counts as clear, and says so
    expect(result.clearFractions.map((c) => [c.month, c.clearFraction, c.set])).toEqual([2, 3, 4, 5, 6, 7].map((m) => [m, 1, false]));
    for (const b of result.bins) expect(b.availableDarkHours).toBeCloseTo(b.darkHours, 12);
  });

  it("puts one night's dark time in the bins of the LST astronomy-engine gives at dusk and dawn", () => {
    const one = prepareSiteNights(SITE, "2027-04-12", 1);
    const night = one.nights[0];
    const result = raPressure({ prepared: one, clearFractions: [], observations: [] });
    // LST from astronomy-engine's SiderealTime (GAST, hours) + east longitude, at both ends
    const lst = (t: number) => (((Astro.SiderealTime(new Date(t)) + SITE.longitudeDeg / 15) % 24) + 24) % 24;
    const l0 = lst(night.darkStart!);
    let l1 = lst(night.darkEnd!);
    if (l1 < l0) l1 += 24;
    const expected = new Array(24).fill(0);
    for (let h = Math.floor(l0); h < l1; h++) {
      const sidereal = Math.min(h + 1, l1) - Math.max(h, l0);
      expected[h % 24] += sidereal / 1.00273790935; // sidereal hours → solar hours (common practice)
    }
    for (let k = 0; k < 24; k++) expect(Math.abs(result.bins[k].darkHours - expected[k]), `bin ${k}`).toBeLessThan(0.001);
    expect(expected.filter((h) => h > 0).length).toBeGreaterThan(5);
  });

  it("applies each month's clear fraction to its nights and reports the months not set", () => {
    const result = raPressure({ prepared, clearFractions: [{ month: 2, clearFraction: 0.5 }, { month: 3, clearFraction: 0.8 }, { month: 11, clearFraction: 0.1 }], observations: [] });
    const factor = (date: string) => ({ "02": 0.5, "03": 0.8 })[date.slice(5, 7)] ?? 1;
    const want = sum(prepared.nights.map((n) => darkOf(n) * factor(n.date)));
    expect(want).toBeLessThan(semesterDark - 100);
    expect(sum(result.bins.map((b) => b.availableDarkHours))).toBeCloseTo(want, 9);
    expect(sum(result.bins.map((b) => b.darkHours))).toBeCloseTo(semesterDark, 9);
    expect(result.clearFractions.map((c) => [c.month, c.clearFraction, c.set, c.nights])).toEqual([
      [2, 0.5, true, 28],
      [3, 0.8, true, 31],
      [4, 1, false, 30],
      [5, 1, false, 31],
      [6, 1, false, 30],
      [7, 1, false, 31],
    ]);
  });
});

describe("requested hours per RA bin", () => {
  it("a target that never sets follows the dark time itself, within its moon category or darker", () => {
    const avail = raPressure({ prepared, clearFractions: [], observations: [] }).bins;
    // δ = +85° at φ = 31.3°: lowest altitude 90 − 85 − (90 − 31.3) … = 26.3° > 20°, always up
    const circumpolar = { raDeg: 40, decDeg: 85 };
    for (const [moon, share] of [
      ["bright", (b: (typeof avail)[number]) => b.darkHours],
      ["grey", (b: (typeof avail)[number]) => b.byMoonCategory.dark.darkHours + b.byMoonCategory.grey.darkHours],
      ["dark", (b: (typeof avail)[number]) => b.byMoonCategory.dark.darkHours],
    ] as const) {
      const result = raPressure({ prepared, clearFractions: [], observations: [obs({ target: circumpolar, minAltitudeDeg: 20, moonCategory: moon, requestedHours: 50 })] });
      const total = sum(avail.map(share));
      for (const [k, b] of result.bins.entries()) {
        expect(b.requestedHours, `${moon} bin ${k}`).toBeCloseTo((50 * share(avail[k])) / total, 6);
        expect(b.byMoonCategory[moon].requestedHours).toBeCloseTo(b.requestedHours, 12);
      }
    }
  });

  it("a target on the equator is requested only in the bins within its hour-angle limit of its RA", () => {
    // Meeus eq. 15.1: cos H0 = (sin 30° − sin φ · sin 0) / (cos φ · cos 0) → H0 = 54.2° = 3.61 h
    const h0 = (Math.acos(Math.sin(Math.PI / 6) / Math.cos((SITE.latitudeDeg * Math.PI) / 180)) * 180) / Math.PI / 15;
    expect(h0).toBeCloseTo(3.61, 2);
    const result = raPressure({ prepared, clearFractions: [], observations: [obs({ target: { raDeg: 90, decDeg: 0 }, moonCategory: "grey", requestedHours: 12 })] });
    const inside = (k: number) => k + 1 > 6 - h0 && k < 6 + h0; // bins 2 … 9
    const outside = result.bins.filter((b) => !inside(b.raHour));
    expect(outside.map((b) => b.raHour)).toEqual([0, 1, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23]);
    for (const b of outside) expect(b.requestedHours, `bin ${b.raHour}`).toBe(0);
    for (const k of [3, 4, 5, 6, 7, 8]) expect(result.bins[k].requestedHours, `bin ${k}`).toBeGreaterThan(0.01); // bin 3 only in early February evenings
    expect(sum(result.bins.map((b) => b.requestedHours))).toBeCloseTo(12, 9);
    expect(sum(result.bins.map((b) => b.byMoonCategory.grey.requestedHours))).toBeCloseTo(12, 9);
    expect(sum(result.bins.map((b) => b.byMoonCategory.dark.requestedHours + b.byMoonCategory.bright.requestedHours))).toBe(0);
    expect(result.requestedHours).toBeCloseTo(12, 9);
  });

  it("sums the observations' hours; one that never rises is reported apart, not spread", () => {
    const result = raPressure({
      prepared,
      clearFractions: [],
      observations: [
        obs({ observationId: 1, proposalId: 7, target: { raDeg: 150, decDeg: 20 }, moonCategory: "dark", requestedHours: 6.5 }),
        obs({ observationId: 2, proposalId: 7, target: { raDeg: 210, decDeg: -10 }, moonCategory: "bright", requestedHours: 3 }),
        // δ = −80° never climbs above 90 − 31.3 − 80 < 0° at 31.3° N
        obs({ observationId: 3, proposalId: 8, target: { raDeg: 100, decDeg: -80 }, moonCategory: "bright", requestedHours: 4 }),
        obs({ observationId: 4, proposalId: 8, requestedHours: 0 }),
      ],
    });
    expect(sum(result.bins.map((b) => b.requestedHours))).toBeCloseTo(9.5, 9);
    expect(result.requestedHours).toBeCloseTo(9.5, 9);
    expect(sum(result.bins.map((b) => b.byMoonCategory.dark.requestedHours))).toBeCloseTo(6.5, 9);
    expect(sum(result.bins.map((b) => b.byMoonCategory.bright.requestedHours))).toBeCloseTo(3, 9);
    expect(result.unplaced).toEqual([{ observationId: 3, proposalId: 8, hours: 4 }]);
  });
});
