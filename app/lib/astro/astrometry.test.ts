import * as Astro from "astronomy-engine";
import { describe, expect, it } from "vitest";
import { DEG } from "./coordinates";
import {
  KM_S_PER_ARCSEC_YR_PC,
  astrometryForDates,
  centroidPrecisionMas,
  epochPrecisionMas,
  fitPrecision,
  parallaxFactors,
  planEpochs,
  precisionForMovedEpochs,
  properMotionForVelocity,
  tangentialVelocityKmS,
} from "./astrometry";
import type { Site } from "./visibility";

const DAY = 86_400_000;
const YEAR = 365.25 * DAY;
const T0 = Date.UTC(2027, 1, 10);

describe("constants", () => {
  it("4.74047 km/s = 1 au per Julian year (IAU 2012 au = 149 597 870.7 km; Julian year 365.25 d)", () => {
    const k = 149_597_870.7 / (365.25 * 86_400);
    expect(k).toBeCloseTo(4.740470464, 8);
    expect(Math.abs(KM_S_PER_ARCSEC_YR_PC - k)).toBeLessThan(5e-6);
    expect(tangentialVelocityKmS(1000, 1)).toBeCloseTo(4.74047, 6);
    expect(properMotionForVelocity(tangentialVelocityKmS(3.2, 2500), 2500)).toBeCloseTo(3.2, 10);
  });
});

describe("per-epoch precision", () => {
  it("σ = FWHM / (2.355 SNR), /√N over frames, floor in quadrature", () => {
    expect(centroidPrecisionMas(1.0, 100)).toBeCloseTo(1000 / 235.48, 8);
    expect(epochPrecisionMas({ fwhmArcsec: 1, snr: 100, frames: 4, floorMas: 0 })).toBeCloseTo(1000 / 235.48 / 2, 8);
    expect(epochPrecisionMas({ fwhmArcsec: 1, snr: 100, frames: 4, floorMas: 3 })).toBeCloseTo(Math.hypot(1000 / 235.48 / 2, 3), 8);
  });
});

describe("least-squares fit", () => {
  it("closed form σμ = σ·sqrt(12(N−1)/(N(N+1)))/T for N equally spaced epochs (parallax held fixed)", () => {
    const sigma = 2;
    for (const N of [3, 5, 10, 25]) {
      const T = 3;
      const epochs = Array.from({ length: N }, (_, i) => ({ time: T0 + (i * T * YEAR) / (N - 1), sigmaMas: sigma }));
      const fit = fitPrecision(120, 30, epochs, 4);
      const closed = (sigma * Math.sqrt((12 * (N - 1)) / (N * (N + 1)))) / T;
      expect(fit.properMotionPrecisionMasPerYr.ra).toBeCloseTo(closed, 10);
      expect(fit.properMotionPrecisionMasPerYr.dec).toBeCloseTo(closed, 10);
    }
  });

  it("with the parallax fitted too, many epochs at incommensurate spacing approach the closed form (within 3 %)", () => {
    const N = 400;
    const T = 4;
    const epochs = Array.from({ length: N }, (_, i) => ({ time: T0 + (i * T * YEAR) / (N - 1), sigmaMas: 1 }));
    const fit = fitPrecision(120, 30, epochs, 5);
    const closed = Math.sqrt((12 * (N - 1)) / (N * (N + 1))) / T;
    expect(Math.abs(fit.properMotionPrecisionMasPerYr.ra / closed - 1)).toBeLessThan(0.03);
    expect(fit.parallaxPrecisionMas).toBeGreaterThan(0);
  });

  it("too few or degenerate epochs are reported as undetermined, not as numbers", () => {
    expect(fitPrecision(10, 10, [{ time: T0, sigmaMas: 1 }]).determined).toBe(false);
    const sameDay = [0, 0, 0].map(() => ({ time: T0, sigmaMas: 1 }));
    expect(fitPrecision(10, 10, sameDay).determined).toBe(false);
  });
});

describe("parallax factors", () => {
  it("trace the parallax ellipse: semi-axes 1 and |sin β| in ecliptic coordinates (±3 %: orbital eccentricity 1.7 % plus the Sun's ≤ 1 % offset from the barycentre)", () => {
    const eps = 23.4392911 * DEG; // J2000 obliquity (IAU)
    const pole = [0, -Math.sin(eps), Math.cos(eps)];
    for (const [ra, dec] of [
      [50, 20],
      [200, -45],
      [280, 66],
    ]) {
      const a = ra * DEG;
      const d = dec * DEG;
      const u = [Math.cos(d) * Math.cos(a), Math.cos(d) * Math.sin(a), Math.sin(d)];
      const sinBeta = u[0] * pole[0] + u[1] * pole[1] + u[2] * pole[2];
      // local unit vectors: east p, north q, ecliptic-longitude direction eL = (pole × u)/|…|
      const p = [-Math.sin(a), Math.cos(a), 0];
      const q = [-Math.sin(d) * Math.cos(a), -Math.sin(d) * Math.sin(a), Math.cos(d)];
      const c = [pole[1] * u[2] - pole[2] * u[1], pole[2] * u[0] - pole[0] * u[2], pole[0] * u[1] - pole[1] * u[0]];
      const cn = Math.hypot(c[0], c[1], c[2]);
      const eL = c.map((x) => x / cn);
      const eB = [u[1] * eL[2] - u[2] * eL[1], u[2] * eL[0] - u[0] * eL[2], u[0] * eL[1] - u[1] * eL[0]];
      let maxL = 0;
      let maxB = 0;
      for (let day = 0; day < 366; day++) {
        const f = parallaxFactors(ra, dec, T0 + day * DAY);
        const s = [0, 1, 2].map((i) => f.ra * p[i] + f.dec * q[i]);
        maxL = Math.max(maxL, Math.abs(s[0] * eL[0] + s[1] * eL[1] + s[2] * eL[2]));
        maxB = Math.max(maxB, Math.abs(s[0] * eB[0] + s[1] * eB[1] + s[2] * eB[2]));
      }
      expect(Math.abs(maxL - 1)).toBeLessThan(0.03);
      expect(Math.abs(maxB / Math.abs(sinBeta) - 1)).toBeLessThan(0.03);
    }
  });

  it("point away from the Earth's barycentric position (shift = −ϖ b⊥)", () => {
    const t = T0 + 40 * DAY;
    const b = Astro.BaryState(Astro.Body.Earth, new Date(t));
    // a star at the point on the sky the Earth's position vector points to shows no shift
    const ra = (Math.atan2(b.y, b.x) / DEG + 360) % 360;
    const dec = Math.asin(b.z / Math.hypot(b.x, b.y, b.z)) / DEG;
    const f = parallaxFactors(ra, dec, t);
    expect(Math.hypot(f.ra, f.dec)).toBeLessThan(2e-6); // our Earth position is within 1e-6 au of BaryState's
    // and 90° from it, the full |b| (≈ 1 au)
    const g = parallaxFactors((ra + 90) % 360, 0, t);
    expect(Math.hypot(g.ra, g.dec)).toBeGreaterThan(0.97);
  });
});

describe("Earth's barycentric position", () => {
  it("matches astronomy-engine's BaryState(Earth) within 1e-6 au (the interpolated Sun offset)", async () => {
    const { earthBarycentric } = await import("./astrometry");
    for (let i = 0; i < 40; i++) {
      const t = T0 + i * 37.3 * DAY;
      const b = Astro.BaryState(Astro.Body.Earth, new Date(t));
      const e = earthBarycentric(t);
      expect(Math.hypot(e[0] - b.x, e[1] - b.y, e[2] - b.z)).toBeLessThan(1e-6);
    }
  });
});

describe("API-shaped fit and moved epochs", () => {
  it("answers for dates and changes when an epoch moves", () => {
    const dates = ["2027-02-10", "2027-05-10", "2027-08-10", "2028-02-10", "2028-05-10", "2028-08-10"];
    const r = astrometryForDates({ raDeg: 130, decDeg: 20, epochs: dates, positionalPrecisionMas: 3 });
    expect(r.determined).toBe(true);
    expect(r.parallaxFactors).toHaveLength(6);
    expect(r.properMotionPrecisionMasPerYr.ra).toBeGreaterThan(0);
    const moved = precisionForMovedEpochs(130, 20, [...dates.slice(0, 5), "2029-08-10"], 3);
    expect(moved.properMotionPrecisionMasPerYr.ra).toBeLessThan(r.properMotionPrecisionMasPerYr.ra);
  });
});

describe("epoch planner", () => {
  const site: Site = { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" }; // invented
  const target = { raDeg: 84.2, decDeg: 18.5 };

  it("places a fixed number of epochs inside visibility windows, spread over the baseline", () => {
    const plan = planEpochs({ site, target, firstDate: "2027-08-01", baselineYears: 2, epochs: 8, perEpochPrecisionMas: 4, limit: { maxAirmass: 1.6 }, secondsPerEpoch: 1800 });
    expect(plan.epochs).toHaveLength(8);
    const times = plan.epochs.map((e) => Date.parse(e.time));
    expect((times[7] - times[0]) / YEAR).toBeGreaterThan(1.4);
    const reference = fitPrecision(target.raDeg, target.decDeg, times.map((time) => ({ time, sigmaMas: 4 })));
    expect(plan.precision.properMotionPrecisionMasPerYr.ra).toBeCloseTo(reference.properMotionPrecisionMasPerYr.ra, 10);
    expect(plan.perSemester.reduce((s, x) => s + x.epochs, 0)).toBe(8);
    expect(plan.perSemester.reduce((s, x) => s + x.hours, 0)).toBeCloseTo(4, 10);
    // every epoch sits in a window: altitude at the epoch ≥ the limit's altitude
    const obs = new Astro.Observer(site.latitudeDeg, site.longitudeDeg, site.elevationM);
    Astro.DefineStar(Astro.Body.Star3, target.raDeg / 15, target.decDeg, 1e6);
    for (const e of plan.epochs) {
      const eq = Astro.Equator(Astro.Body.Star3, new Date(e.time), obs, true, true);
      expect(Astro.Horizon(new Date(e.time), obs, eq.ra, eq.dec).altitude).toBeGreaterThan(38.5);
    }
    // greedy placement beats the same number of epochs bunched in the first season
    const bunched = fitPrecision(target.raDeg, target.decDeg, times.map((_, i) => ({ time: times[0] + i * 10 * DAY, sigmaMas: 4 })));
    expect(plan.precision.properMotionPrecisionMasPerYr.ra).toBeLessThan(bunched.properMotionPrecisionMasPerYr.ra);
  });

  it("names each epoch's semester by the office's dates for the calls, not by a fixed Feb/Aug rule", () => {
    // invented calls whose semesters run October–March and April–September
    const semesters = [
      { code: "2027B", start: "2027-10-01", end: "2028-03-31" },
      { code: "2028A", start: "2028-04-01", end: "2028-09-30" },
    ];
    const plan = planEpochs({ site, target, firstDate: "2027-10-01", baselineYears: 1, epochs: 8, perEpochPrecisionMas: 4, limit: { maxAirmass: 1.6 }, secondsPerEpoch: 1800, semesters });
    expect(plan.epochs).toHaveLength(8);
    // the months where the two rules disagree (Feb–Mar: 2027B here, 2028A by Feb/Aug) hold epochs
    expect(plan.epochs.filter((e) => e.date >= "2028-02-01" && e.date <= "2028-03-31").length).toBeGreaterThan(0);
    for (const e of plan.epochs) expect([e.date, e.semester]).toEqual([e.date, e.date <= "2028-03-31" ? "2027B" : "2028A"]);
    const count = (code: string) => plan.epochs.filter((e) => (code === "2027B" ? e.date <= "2028-03-31" : e.date > "2028-03-31")).length;
    expect(plan.perSemester).toEqual([
      { semester: "2027B", epochs: count("2027B"), hours: count("2027B") / 2 },
      ...(count("2028A") ? [{ semester: "2028A", epochs: count("2028A"), hours: count("2028A") / 2 }] : []),
    ]);
  });

  it("re-plans after epochs already taken (fixed): they enter the fit with their own precision", () => {
    const fixed = ["2027-08-20T07:00:00Z", "2027-10-15T05:00:00Z", "2028-01-10T03:00:00Z"].map((t, i) => ({ time: Date.parse(t), sigmaMas: 3 + i }));
    const plan = planEpochs({ site, target, firstDate: "2028-02-01", baselineYears: 1.5, epochs: 4, perEpochPrecisionMas: 4, limit: { maxAirmass: 1.6 }, secondsPerEpoch: 1800, fixed });
    expect(plan.epochs).toHaveLength(4);
    const times = plan.epochs.map((e) => Date.parse(e.time));
    for (const t of times) expect(t).toBeGreaterThan(Date.parse("2028-02-01T00:00:00Z"));
    // the reported precision is the fit over the taken epochs (their own σ) and the new ones
    const all = fitPrecision(target.raDeg, target.decDeg, [...fixed, ...times.map((time) => ({ time, sigmaMas: 4 }))]);
    expect(plan.precision.properMotionPrecisionMasPerYr.ra).toBeCloseTo(all.properMotionPrecisionMasPerYr.ra, 10);
    expect(plan.precision.parallaxPrecisionMas).toBeCloseTo(all.parallaxPrecisionMas as number, 10);
    // and better than the new epochs alone
    const alone = fitPrecision(target.raDeg, target.decDeg, times.map((time) => ({ time, sigmaMas: 4 })));
    expect(plan.precision.properMotionPrecisionMasPerYr.ra).toBeLessThan(alone.properMotionPrecisionMasPerYr.ra);
  });

  it("adds epochs until a required tangential-velocity precision is met", () => {
    const plan = planEpochs({
      site,
      target,
      firstDate: "2027-08-01",
      baselineYears: 3,
      perEpochPrecisionMas: 5,
      limit: { minAltitudeDeg: 35 },
      required: { tangentialVelocityKmS: 15, distancePc: 2000 },
    });
    const required = properMotionForVelocity(15, 2000);
    expect(plan.requiredProperMotionMasPerYr).toBeCloseTo(required, 10);
    expect(plan.met).toBe(true);
    const p = plan.precision.properMotionPrecisionMasPerYr;
    expect(Math.max(p.ra, p.dec)).toBeLessThanOrEqual(required);
  });

  it("reports an unreachable requirement honestly", () => {
    const plan = planEpochs({ site, target, firstDate: "2027-08-01", baselineYears: 1, perEpochPrecisionMas: 50, limit: { minAltitudeDeg: 35 }, required: { properMotionMasPerYr: 0.01 }, maxEpochs: 10 });
    expect(plan.met).toBe(false);
    expect(plan.epochs.length).toBeLessThanOrEqual(10);
  });

  it("says so when the target never rises", () => {
    const plan = planEpochs({ site, target: { raDeg: 10, decDeg: -80 }, firstDate: "2027-08-01", baselineYears: 1, epochs: 5, perEpochPrecisionMas: 3, limit: { minAltitudeDeg: 30 } });
    expect(plan.epochs).toEqual([]);
    expect(plan.message).toMatch(/not observable/);
  });
});
