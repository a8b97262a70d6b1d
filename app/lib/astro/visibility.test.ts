import * as Astro from "astronomy-engine";
import { describe, expect, it } from "vitest";
import { altitudeForAirmass } from "./airmass";
import { localDate } from "./time";
import {
  MOON_CATEGORY_THRESHOLDS,
  altitudeCurve,
  computeVisibility,
  moonCategory,
  prepareSiteNights,
  targetNights,
  type Site,
} from "./visibility";

// Invented sites (no real observatory): mid-northern, southern, sub-arctic, arctic, near-pole.
const MID: Site = { latitudeDeg: 44.2, longitudeDeg: 10.6, elevationM: 800, timeZone: "Europe/Rome" };
const SOUTH: Site = { latitudeDeg: -31.7, longitudeDeg: -69.9, elevationM: 2400, timeZone: "America/Argentina/San_Juan" };
const SUBARCTIC: Site = { latitudeDeg: 60.0, longitudeDeg: 5.0, elevationM: 100, timeZone: "Europe/Oslo" };
const ARCTIC: Site = { latitudeDeg: 78.0, longitudeDeg: 15.0, elevationM: 10, timeZone: "Europe/Oslo" };
const NEAR_POLE: Site = { latitudeDeg: 86.0, longitudeDeg: 0, elevationM: 0, timeZone: "UTC" };

const observer = (s: Site) => new Astro.Observer(s.latitudeDeg, s.longitudeDeg, s.elevationM);

describe("agreement with astronomy-engine's own searches (tolerance 1 s)", () => {
  for (const [name, site, from] of [
    ["mid-north", MID, "2027-02-01"],
    ["south", SOUTH, "2027-08-01"],
  ] as const) {
    it(`sunset, sunrise, twilight and target crossings over 183 nights at the ${name} site`, () => {
      const prepared = prepareSiteNights(site, from, 183);
      const rows = targetNights(prepared, { raDeg: 201.7, decDeg: -12.3 }, 30);
      const obs = observer(site);
      Astro.DefineStar(Astro.Body.Star1, 201.7 / 15, -12.3, 1e6);
      let worst = 0;
      let windowEdges = 0;
      for (const r of rows) {
        const n = r.night;
        const start = new Date(n.frameStart);
        const ref = [
          [Astro.SearchRiseSet(Astro.Body.Sun, obs, -1, start, 1), n.sunset],
          [Astro.SearchRiseSet(Astro.Body.Sun, obs, +1, start, 1), n.sunrise],
          [Astro.SearchAltitude(Astro.Body.Sun, obs, -1, start, 1, -18), n.darkStart],
          [Astro.SearchAltitude(Astro.Body.Sun, obs, +1, start, 1, -18), n.darkEnd],
        ] as const;
        for (const [a, ours] of ref) worst = Math.max(worst, Math.abs(a!.date.getTime() - (ours as number)) / 1000);
        for (const w of r.windows) {
          if (w.start > n.darkStart! + 1) {
            const a = Astro.SearchAltitude(Astro.Body.Star1, obs, +1, new Date(w.start - 600_000), 0.1, 30)!;
            worst = Math.max(worst, Math.abs(a.date.getTime() - w.start) / 1000);
            windowEdges++;
          }
          if (w.end < n.darkEnd! - 1) {
            const a = Astro.SearchAltitude(Astro.Body.Star1, obs, -1, new Date(w.end - 600_000), 0.1, 30)!;
            worst = Math.max(worst, Math.abs(a.date.getTime() - w.end) / 1000);
            windowEdges++;
          }
        }
      }
      expect(windowEdges).toBeGreaterThan(50);
      expect(worst).toBeLessThan(1);
    });
  }

  it("Moon illumination and altitude agree with astronomy-engine (0.001, 0.02°)", () => {
    const prepared = prepareSiteNights(MID, "2027-02-01", 60);
    const obs = observer(MID);
    for (const n of prepared.nights) {
      const ill = Astro.Illumination(Astro.Body.Moon, new Date(n.refTime)).phase_fraction;
      expect(Math.abs(ill - n.moonIllumination)).toBeLessThan(0.001);
      const eq = Astro.Equator(Astro.Body.Moon, new Date(n.refTime), obs, true, true);
      const alt = Astro.Horizon(new Date(n.refTime), obs, eq.ra, eq.dec).altitude;
      expect(Math.abs(alt - n.moonAltitudeDeg)).toBeLessThan(0.02);
    }
  });
});

/** Observable hours by brute force: astronomy-engine altitude every 30 s inside the dark interval. */
function bruteHours(site: Site, ra: number, dec: number, limit: number, a: number, b: number): number {
  Astro.DefineStar(Astro.Body.Star2, ra / 15, dec, 1e6);
  const obs = observer(site);
  let up = 0;
  const step = 30_000;
  for (let t = a + step / 2; t < b; t += step) {
    const eq = Astro.Equator(Astro.Body.Star2, new Date(t), obs, true, true);
    if (Astro.Horizon(new Date(t), obs, eq.ra, eq.dec).altitude >= limit) up += step;
  }
  return up / 3_600_000;
}

describe("edge cases", () => {
  it("circumpolar above the limit: one window spanning the whole dark interval", () => {
    const [r] = targetNights(prepareSiteNights(MID, "2027-01-15", 1), { raDeg: 100, decDeg: 75 }, 20);
    expect(r.windows).toEqual([{ start: r.night.darkStart, end: r.night.darkEnd }]);
  });

  it("never rising: no windows, no error", () => {
    const v = computeVisibility({ site: MID, target: { raDeg: 100, decDeg: -60 }, from: "2027-01-15", nights: 5, limit: { minAltitudeDeg: 0 } });
    expect(v.nights.every((n) => n.windows.length === 0 && n.observableHours === 0)).toBe(true);
    expect(v.summary.observableHours).toBe(0);
  });

  it("no astronomical darkness at 60° N in June: darkStart and darkEnd null, no windows, but a sunset", () => {
    const v = computeVisibility({ site: SUBARCTIC, target: { raDeg: 270, decDeg: 40 }, from: "2027-06-21", nights: 1, limit: { minAltitudeDeg: 20 } });
    const n = v.nights[0];
    expect(n.darkStart).toBeNull();
    expect(n.darkEnd).toBeNull();
    expect(n.windows).toEqual([]);
    expect(n.sunset).not.toBeNull();
    expect(n.sunrise).not.toBeNull();
  });

  it("midnight sun at 78° N: no sunset, no sunrise, no darkness", () => {
    const [n] = prepareSiteNights(ARCTIC, "2027-06-21", 1).nights;
    expect([n.sunset, n.sunrise, n.darkStart, n.darkEnd]).toEqual([null, null, null, null]);
  });

  it("polar night at 78° N: no sunset or sunrise, yet a dark interval bounded by −18° crossings", () => {
    const [n] = prepareSiteNights(ARCTIC, "2027-12-21", 1).nights;
    expect(n.sunset).toBeNull();
    expect(n.sunrise).toBeNull();
    expect(n.darkStart).toBeGreaterThan(n.frameStart);
    expect(n.darkEnd).toBeLessThan(n.frameEnd);
    const obs = observer(ARCTIC);
    const a = Astro.SearchAltitude(Astro.Body.Sun, obs, -1, new Date(n.frameStart), 1, -18)!;
    expect(Math.abs(a.date.getTime() - n.darkStart!) / 1000).toBeLessThan(2);
  });

  it("polar night at 86° N: dark the whole frame, and windows match a brute-force altitude scan", () => {
    const prepared = prepareSiteNights(NEAR_POLE, "2027-12-20", 3);
    for (const n of prepared.nights) {
      expect(n.darkStart).toBe(n.frameStart);
      expect(n.darkEnd).toBe(n.frameEnd);
    }
    // a target at δ = +2° near the pole hovers around 6° altitude: limit 5° gives one or two windows a night
    const rows = targetNights(prepared, { raDeg: 40, decDeg: 2 }, 5);
    for (const r of rows) {
      const brute = bruteHours(NEAR_POLE, 40, 2, 5, r.night.darkStart!, r.night.darkEnd!);
      expect(Math.abs(r.observableHours - brute)).toBeLessThan(0.02); // 30-s scan: ±0.01 h per edge
    }
  });

  it("nights across a year boundary: consecutive dates, contiguous frames, sunset on the night's local date", () => {
    const prepared = prepareSiteNights(SOUTH, "2027-12-30", 4);
    expect(prepared.nights.map((n) => n.date)).toEqual(["2027-12-30", "2027-12-31", "2028-01-01", "2028-01-02"]);
    for (let i = 0; i < prepared.nights.length; i++) {
      const n = prepared.nights[i];
      expect(localDate(n.sunset!, SOUTH.timeZone)).toBe(n.date);
      if (i > 0) expect(n.frameStart).toBe(prepared.nights[i - 1].frameEnd);
    }
  });

  it("observable hours match a brute-force scan at a mid-latitude site", () => {
    const prepared = prepareSiteNights(MID, "2027-03-01", 20);
    for (const r of targetNights(prepared, { raDeg: 150, decDeg: 5 }, 35)) {
      const brute = bruteHours(MID, 150, 5, 35, r.night.darkStart!, r.night.darkEnd!);
      expect(Math.abs(r.observableHours - brute)).toBeLessThan(0.02);
    }
  });

  it("an air-mass limit is the same as the equivalent altitude limit", () => {
    const base = { site: MID, target: { raDeg: 150, decDeg: 5 }, from: "2027-03-01", nights: 10 };
    const a = computeVisibility({ ...base, limit: { maxAirmass: 1.5 } });
    const b = computeVisibility({ ...base, limit: { minAltitudeDeg: altitudeForAirmass(1.5) } });
    expect(a.nights.map((n) => n.windows)).toEqual(b.nights.map((n) => n.windows));
    // sec z = 1.5 would give 41.81°; the curved atmosphere of Kasten & Young needs a little less:
    // solve their published fit (Applied Optics 28, 4735, 1989: X = 1 / (sin h + 0.50572·(h + 6.07995°)^−1.6364))
    // for X = 1.5 by bisection here, apart from the code (41.741°)
    const kastenYoung1989 = (h: number) => 1 / (Math.sin((h * Math.PI) / 180) + 0.50572 * (h + 6.07995) ** -1.6364);
    let lo = 0;
    let hi = 90;
    for (let i = 0; i < 60; i++) {
      const h = (lo + hi) / 2;
      if (kastenYoung1989(h) > 1.5) lo = h;
      else hi = h;
    }
    expect(Math.abs(a.limit.minAltitudeDeg - lo)).toBeLessThan(0.01);
    expect(lo).toBeLessThan((Math.acos(1 / 1.5) * 180) / Math.PI);
  });

  it("moon categories follow the stated thresholds", () => {
    expect(moonCategory(MOON_CATEGORY_THRESHOLDS.darkBelow - 0.01)).toBe("dark");
    expect(moonCategory(MOON_CATEGORY_THRESHOLDS.darkBelow)).toBe("grey");
    expect(moonCategory(MOON_CATEGORY_THRESHOLDS.greyBelow)).toBe("bright");
    const v = computeVisibility({ site: MID, target: { raDeg: 150, decDeg: 5 }, from: "2027-02-01", nights: 30, limit: { minAltitudeDeg: 30 } });
    const cats = new Set(v.nights.map((n) => n.moonCategory));
    expect(cats).toEqual(new Set(["dark", "grey", "bright"]));
    const sum = v.summary.byMoonCategory.dark + v.summary.byMoonCategory.grey + v.summary.byMoonCategory.bright;
    expect(sum).toBeCloseTo(v.summary.observableHours, 1);
  });

  it("an altitude curve for a night peaks where the target transits", () => {
    const { points, night } = altitudeCurve(MID, { raDeg: 150, decDeg: 5 }, "2027-03-01", 10);
    expect(points.length).toBeGreaterThan(50);
    const max = points.reduce((a, b) => (b.targetAltDeg > a.targetAltDeg ? b : a));
    expect(max.targetAltDeg).toBeCloseTo(90 - 44.2 + 5, 0);
    expect(Date.parse(points[0].time)).toBeLessThan(night.sunset!);
    expect(points.every((p) => p.sunAltDeg < 30)).toBe(true);
  });
});

describe("moon time split at moonrise and moonset (geometric altitude of the Moon's centre 0°)", () => {
  // An invented site at 55° N, 5° E (open sea, no observatory), on 2027-08-12: a waxing Moon,
  // 84 % lit, low in the south-west, sets 52 min after astronomical dusk in a 2.8 h dark interval.
  const NORTH: Site = { latitudeDeg: 55.0, longitudeDeg: 5.0, elevationM: 50, timeZone: "Europe/Amsterdam" };

  it("a bright Moon that sets soon after dusk leaves most of the night dark", () => {
    const v = computeVisibility({ site: NORTH, target: { raDeg: 90, decDeg: 80 }, from: "2027-08-12", nights: 1, limit: { minAltitudeDeg: 20 } });
    const n = v.nights[0];
    const obs = observer(NORTH);
    // Reference: astronomy-engine's SearchAltitude for the Moon's centre at 0° (no refraction, no
    // semidiameter), the same definition; SearchRiseSet (upper limb, refracted) sets ~10 min later.
    const ref = Astro.SearchAltitude(Astro.Body.Moon, obs, -1, new Date("2027-08-12T12:00:00Z"), 1, 0)!;
    const riseSet = Astro.SearchRiseSet(Astro.Body.Moon, obs, -1, new Date("2027-08-12T12:00:00Z"), 1)!;
    expect(Math.abs(Date.parse(n.moonset!) - ref.date.getTime())).toBeLessThan(60_000);
    expect((riseSet.date.getTime() - Date.parse(n.moonset!)) / 60_000).toBeGreaterThan(5);
    expect((riseSet.date.getTime() - Date.parse(n.moonset!)) / 60_000).toBeLessThan(15);
    // the Moon's illuminated fraction from astronomy-engine's Illumination (phase_fraction) at mid-darkness
    const mid = (Date.parse(n.darkStart!) + Date.parse(n.darkEnd!)) / 2;
    const k = Astro.Illumination(Astro.Body.Moon, new Date(mid)).phase_fraction;
    expect(k).toBeGreaterThan(0.7);
    expect(n.moonCategory).toBe("bright"); // the night's single category, from the phase
    // a circumpolar target: its window is the whole dark interval
    const bright = (Date.parse(n.moonset!) - Date.parse(n.darkStart!)) / 3_600_000;
    const dark = (Date.parse(n.darkEnd!) - Date.parse(n.moonset!)) / 3_600_000;
    expect(n.hoursByMoonCategory.bright).toBeCloseTo(bright, 3);
    expect(n.hoursByMoonCategory.dark).toBeCloseTo(dark, 3);
    expect(n.hoursByMoonCategory.grey).toBe(0);
    expect(n.hoursByMoonCategory.dark).toBeGreaterThan(2 * n.hoursByMoonCategory.bright);
    expect(v.summary.byMoonCategory.dark).toBeCloseTo(n.hoursByMoonCategory.dark, 2);
  });

  it("moonrise and moonset agree with astronomy-engine's SearchAltitude(Moon, 0°) within 2 s over a year, and the split hours add up", () => {
    for (const site of [MID, SOUTH, SUBARCTIC]) {
      const v = computeVisibility({ site, target: { raDeg: 201.7, decDeg: -12.3 }, from: "2027-02-01", nights: 365, limit: { maxAirmass: 2 } });
      const obs = observer(site);
      const prepared = prepareSiteNights(site, "2027-02-01", 365);
      let worst = 0;
      let events = 0;
      v.nights.forEach((n, i) => {
        const frame = prepared.nights[i];
        for (const [dir, ours] of [[+1, n.moonrise], [-1, n.moonset]] as const) {
          const a = Astro.SearchAltitude(Astro.Body.Moon, obs, dir, new Date(frame.frameStart), (frame.frameEnd - frame.frameStart) / 86_400_000, 0);
          const ref = a && a.date.getTime() < frame.frameEnd ? a.date.getTime() : null;
          expect(ours === null).toBe(ref === null);
          if (ours !== null && ref !== null) {
            worst = Math.max(worst, Math.abs(Date.parse(ours) - ref) / 1000);
            events++;
          }
        }
        const s = n.hoursByMoonCategory;
        expect(s.dark + s.grey + s.bright).toBeCloseTo(n.observableHours, 3);
        const d = n.darkHoursByMoonCategory;
        const darkHours = n.darkStart && n.darkEnd ? (Date.parse(n.darkEnd) - Date.parse(n.darkStart)) / 3_600_000 : 0;
        expect(d.dark + d.grey + d.bright).toBeCloseTo(darkHours, 3);
        // grey or bright hours only while the Moon is lit enough for them
        if (n.moon.illumination < MOON_CATEGORY_THRESHOLDS.darkBelow) expect(s.grey + s.bright).toBe(0);
      });
      expect(events).toBeGreaterThan(600);
      expect(worst).toBeLessThan(2);
      const sum = v.summary.byMoonCategory;
      expect(sum.dark + sum.grey + sum.bright).toBeCloseTo(v.summary.observableHours, 1);
    }
  });
});
