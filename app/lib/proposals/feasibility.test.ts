import { describe, expect, it } from "vitest";
import { computeVisibility } from "../astro/visibility";
import { buildFeasibilitySheet, type FeasibilityInput, type SheetObservation, type SheetTarget } from "./feasibility";

// The invented Kestrel Ridge site and its 2.4 m imager, as the demo seed has them.
const site = { latitudeDeg: 38.9124, longitudeDeg: -112.5407, elevationM: 2350, timeZone: "America/Denver" };
const base: Omit<FeasibilityInput, "targets" | "observations"> = {
  proposalId: 1,
  call: {
    semesterCode: "2027A",
    semesterStart: "2027-02-01",
    semesterEnd: "2027-07-31",
    offers: [
      { telescopeId: 1, moonCategory: "dark", hoursOffered: 420 },
      { telescopeId: 1, moonCategory: "grey", hoursOffered: 380 },
      { telescopeId: 1, moonCategory: "bright", hoursOffered: 400 },
    ],
  },
  isMultiSemester: false,
  semestersRequested: ["2027A"],
  telescopes: [{ id: 1, name: "KRO 2.4 m", site, apertureM: 2.4, centralObstruction: 0.33 }],
  instruments: [
    {
      id: 10, telescopeId: 1, name: "Ridge Imager 4K", pixelScaleArcsec: 0.3, readNoiseE: 4.5, darkEPerPixelPerS: 0.0008,
      gainEPerAdu: 1.5, fullWellE: 150_000, readoutSeconds: 35, acquisitionSeconds: 240, astrometricFloorMas: 2.5, throughput: 0.42,
    },
  ],
  filters: [
    { id: 100, instrumentId: 10, band: "V", zeroPointPhotons: 866_000, extinctionMagPerAirmass: 0.14, skyDarkMag: 21.8, skyGreyMag: 21.0, skyBrightMag: 19.6 },
    { id: 101, instrumentId: 10, band: "I", zeroPointPhotons: 680_000, extinctionMagPerAirmass: 0.06, skyDarkMag: 19.9, skyGreyMag: 19.6, skyBrightMag: 19.0 },
  ],
};

const target = (over: Partial<SheetTarget> & { id: number }): SheetTarget => {
  const t = { name: `Field ${over.id}`, raDeg: 180, decDeg: 30, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 17, band: "V", ...over };
  return { ...t, magnitudes: over.magnitudes ?? (t.magnitude !== null && t.band ? { [t.band]: t.magnitude } : {}) };
};

const observation = (over: Partial<SheetObservation> & { id: number; targetId: number }): SheetObservation => ({
  instrumentId: 10,
  filterId: 100,
  snrGoal: 50,
  exposureSeconds: null,
  framesPerEpoch: 3,
  epochsPerSemester: 1,
  baselineYears: null,
  requiredPmPrecisionMasPerYr: null,
  moonCategory: "dark",
  maxAirmass: 1.6,
  seeingArcsec: 1.2,
  epochs: [],
  ...over,
});

const sheetFor = (targets: SheetTarget[], observations: SheetObservation[], extra: Partial<FeasibilityInput> = {}) =>
  buildFeasibilitySheet({ ...base, targets, observations, ...extra });

const blocking = (s: ReturnType<typeof sheetFor>, observationId?: number) =>
  s.problems.filter((p) => p.severity === "blocking" && (observationId === undefined || p.observationId === observationId));

describe("feasibility sheet", () => {
  it("finds nothing blocking for a well-placed spring target", () => {
    // RA 12 h transits at local midnight in late March; Dec +30° passes 81° high at +38.9°.
    const s = sheetFor([target({ id: 1 })], [observation({ id: 1, targetId: 1 })]);
    expect(blocking(s)).toEqual([]);
    const o = s.observations[0];
    expect(o.visibility.observableHours).toBeGreaterThan(100);
    expect(o.visibility.bestMonths[0].month).toMatch(/^2027-0[3-5]$/);
    expect(o.visibility.hoursPerNight).toHaveLength(181);
    expect(o.exposure?.snr).toBeCloseTo(50, 6);
    // noise terms add up to (N*/SNR)²
    const n = o.exposure!.noise;
    expect(n.source + n.sky + n.dark + n.read).toBeCloseTo((o.exposure!.sourceElectrons / 50) ** 2, 3);
    // frames × (exposure + readout) + acquisition
    expect(o.timePerEpoch.totalSeconds).toBeCloseTo(3 * (o.exposure!.exposureSeconds + 35) + 240, 6);
  });

  it("blocks a target that never rises above the airmass limit in the dark", () => {
    const s = sheetFor([target({ id: 1, decDeg: -65 })], [observation({ id: 7, targetId: 1 })]);
    const problems = blocking(s, 7);
    expect(problems.map((p) => p.message).join("\n")).toMatch(/never rises above airmass 1.6/);
    expect(s.observations[0].visibility.observableHours).toBe(0);
  });

  it("blocks a saturating exposure and says how short the frames must be", () => {
    const s = sheetFor([target({ id: 1, magnitude: 12 })], [observation({ id: 3, targetId: 1, snrGoal: null, exposureSeconds: 120 })]);
    const p = blocking(s, 3).find((x) => /saturate/.test(x.message));
    expect(p).toBeDefined();
    const e = s.observations[0].exposure!;
    expect(e.saturated).toBe(true);
    expect(e.peakAtBestAirmassElectrons).toBeGreaterThan(150_000);
    expect(e.maxUnsaturatedSeconds).toBeLessThan(120);
    expect(p!.message).toContain(`${Math.round(e.maxUnsaturatedSeconds * 10) / 10} s`);
  });

  it("blocks when more hours are requested than the target is observable", () => {
    // A late-autumn target in spring: only a short window at the start of the semester.
    const s = sheetFor([target({ id: 1, raDeg: 45, decDeg: 20 })], [observation({ id: 4, targetId: 1, snrGoal: null, exposureSeconds: 900, framesPerEpoch: 4, epochsPerSemester: 60 })]);
    const o = s.observations[0];
    expect(o.requestedHoursThisSemester).toBeGreaterThan(o.visibility.usableHours);
    expect(blocking(s, 4).some((p) => /requested in 2027A but the target is observable for only/.test(p.message))).toBe(true);
  });

  it("blocks an astrometric plan that cannot reach the required precision", () => {
    const s = sheetFor(
      [target({ id: 1, magnitude: 18 })],
      [observation({ id: 5, targetId: 1, snrGoal: 30, epochsPerSemester: 2, baselineYears: 1, requiredPmPrecisionMasPerYr: 0.01 })],
    );
    const a = s.observations[0].astrometry!;
    expect(a.source).toBe("proposed");
    expect(a.epochs.length).toBeGreaterThanOrEqual(3);
    expect(a.met).toBe(false);
    expect(blocking(s, 5).some((p) => /proper-motion precision of .* mas\/yr; 0.01 mas\/yr is required/.test(p.message))).toBe(true);
    // and says that no number of epochs over this baseline gets there
    expect(blocking(s, 5).some((p) => /no number of epochs per semester over the 1-year baseline \(2027A, 2027B\) meets it/.test(p.message))).toBe(true);
  });

  it("accepts an astrometric plan that reaches a modest precision, and counts its epochs per semester", () => {
    const s = sheetFor(
      [target({ id: 1, magnitude: 16 })],
      [observation({ id: 6, targetId: 1, snrGoal: 100, epochsPerSemester: 2, baselineYears: 2, requiredPmPrecisionMasPerYr: 3 })],
    );
    const a = s.observations[0].astrometry!;
    expect(a.met).toBe(true);
    expect(blocking(s, 6)).toEqual([]);
    const epochs = a.perSemester.reduce((n, p) => n + p.epochs, 0);
    expect(epochs).toBe(a.epochs.length);
    // totals carry future semesters too
    expect(s.totals.map((t) => t.semesterCode)).toEqual(expect.arrayContaining(["2027A", "2028A"]));
  });

  it("blocks planned epochs on nights when the target cannot be observed", () => {
    const s = sheetFor(
      [target({ id: 1, magnitude: 16 })],
      [
        observation({
          id: 8, targetId: 1, baselineYears: 1, requiredPmPrecisionMasPerYr: 50,
          epochs: [
            { date: "2027-03-20", semesterCode: "2027A", status: "planned" },
            { date: "2027-05-10", semesterCode: "2027A", status: "planned" },
            // RA 12 h is in conjunction with the Sun in late September
            { date: "2027-09-25", semesterCode: "2027B", status: "planned" },
          ],
        }),
      ],
    );
    const a = s.observations[0].astrometry!;
    expect(a.source).toBe("planned");
    expect(a.epochs.find((e) => e.date === "2027-09-25")?.inWindow).toBe(false);
    expect(blocking(s, 8).some((p) => /on 2027-09-25 the target is not above airmass/.test(p.message))).toBe(true);
  });

  it("adds up the totals per telescope, moon category and semester", () => {
    const s = sheetFor(
      [target({ id: 1 }), target({ id: 2, raDeg: 200, decDeg: 10 })],
      [
        observation({ id: 1, targetId: 1, moonCategory: "dark" }),
        observation({ id: 2, targetId: 2, moonCategory: "dark", epochsPerSemester: 2 }),
        observation({ id: 3, targetId: 2, moonCategory: "grey", filterId: 101 }),
      ],
    );
    const dark = s.totals.find((t) => t.moonCategory === "dark")!;
    const grey = s.totals.find((t) => t.moonCategory === "grey")!;
    const byObs = (id: number) => s.observations.find((o) => o.observationId === id)!.requestedHoursThisSemester;
    expect(dark.hours).toBeCloseTo(byObs(1) + byObs(2), 2);
    expect(grey.hours).toBeCloseTo(byObs(3), 2);
    expect(s.requestedHours).toBeCloseTo(dark.hours + grey.hours, 2);
    expect(dark.offeredHours).toBe(420);
    expect(byObs(2)).toBeCloseTo(2 * (s.observations[1].timePerEpoch.totalSeconds! / 3600), 3);
  });

  it("says what is missing rather than inventing numbers", () => {
    const s = sheetFor([target({ id: 1, magnitude: null })], [observation({ id: 9, targetId: 1 })]);
    expect(blocking(s, 9)[0].message).toMatch(/no magnitude/);
    expect(s.observations[0].exposure).toBeNull();
    expect(sheetFor([], []).problems[0]).toMatchObject({ severity: "blocking", message: expect.stringMatching(/no observations/) });
  });

  it("places exactly the epochs per semester asked for, inside each semester's dates (the office's own where a call exists)", () => {
    // 2027B as the office set it (invented dates, not the six-month default): 15 Aug – 14 Feb
    const laterSemesters = [{ code: "2027B", start: "2027-08-15", end: "2028-02-14" }];
    const s = sheetFor(
      [target({ id: 1, magnitude: 16 })],
      [observation({ id: 11, targetId: 1, snrGoal: 100, epochsPerSemester: 2, baselineYears: 1.5, requiredPmPrecisionMasPerYr: 5 })],
      { call: { ...base.call, laterSemesters } },
    );
    const a = s.observations[0].astrometry!;
    expect(a.perSemester).toEqual([
      { semesterCode: "2027A", epochs: 2, hours: expect.any(Number) },
      { semesterCode: "2027B", epochs: 2, hours: expect.any(Number) },
      { semesterCode: "2028A", epochs: 2, hours: expect.any(Number) },
    ]);
    const ranges: Record<string, [string, string]> = { "2027A": ["2027-02-01", "2027-07-31"], "2027B": ["2027-08-15", "2028-02-14"], "2028A": ["2028-02-15", "2028-08-14"] };
    for (const e of a.epochs) {
      const [from, to] = ranges[e.semesterCode];
      expect(e.date >= from && e.date <= to).toBe(true);
    }
    const epochHours = s.observations[0].timePerEpoch.totalSeconds! / 3600;
    expect(s.observations[0].epochsThisSemester).toBe(2);
    expect(s.observations[0].requestedHoursThisSemester).toBeCloseTo(2 * epochHours, 3);
    expect(s.totals.filter((t) => t.semesterCode === "2027B")[0].hours).toBeCloseTo(2 * epochHours, 2);
  });

  it("refuses fewer than 3 epochs in all instead of adding some silently", () => {
    const s = sheetFor([target({ id: 1, magnitude: 16 })], [observation({ id: 12, targetId: 1, epochsPerSemester: 1, baselineYears: 1, requiredPmPrecisionMasPerYr: 5 })]);
    expect(s.observations[0].astrometry!.epochs).toEqual([]);
    expect(blocking(s, 12).some((p) => /1 epoch per semester over 2 semesters make 2; .* at least 3 epochs/.test(p.message))).toBe(true);
  });

  it("says how many epochs per semester would meet the requirement, and that many do", () => {
    const first = sheetFor([target({ id: 1, magnitude: 16 })], [observation({ id: 13, targetId: 1, snrGoal: 100, epochsPerSemester: 2, baselineYears: 1, requiredPmPrecisionMasPerYr: 50 })]);
    const reached = Math.max(...Object.values(first.observations[0].astrometry!.properMotionPrecisionMasPerYr!));
    // ask for 20 % better than two epochs per semester give
    const required = Math.round(reached * 0.8 * 1000) / 1000;
    const s = sheetFor([target({ id: 1, magnitude: 16 })], [observation({ id: 13, targetId: 1, snrGoal: 100, epochsPerSemester: 2, baselineYears: 1, requiredPmPrecisionMasPerYr: required })]);
    const message = blocking(s, 13).find((p) => /would meet it/.test(p.message))!.message;
    const k = Number(/(\d+) epochs per semester \((\d+) in all\)/.exec(message)![1]);
    expect(k).toBeGreaterThan(2);
    const again = sheetFor([target({ id: 1, magnitude: 16 })], [observation({ id: 13, targetId: 1, snrGoal: 100, epochsPerSemester: k, baselineYears: 1, requiredPmPrecisionMasPerYr: required })]);
    expect(again.observations[0].astrometry!.met).toBe(true);
    const fewer = sheetFor([target({ id: 1, magnitude: 16 })], [observation({ id: 13, targetId: 1, snrGoal: 100, epochsPerSemester: k - 1, baselineYears: 1, requiredPmPrecisionMasPerYr: required })]);
    expect(fewer.observations[0].astrometry!.met).toBe(false);
  });

  it("says when the instrument's floor sets the per-epoch precision, and that more frames cannot help", () => {
    // photon part: 1200 mas / (2.3548 · 300) / √3 = 0.98 mas, below the 2.5 mas floor
    const s = sheetFor([target({ id: 1, magnitude: 12 })], [observation({ id: 14, targetId: 1, snrGoal: 300, epochsPerSemester: 3, baselineYears: 1, requiredPmPrecisionMasPerYr: 5 })]);
    const a = s.observations[0].astrometry!;
    expect(a.photonPrecisionMas).toBeCloseTo(1200 / (2.3548 * 300) / Math.sqrt(3), 2);
    expect(a.floorDominated).toBe(true);
    expect(s.problems.some((p) => p.observationId === 14 && /systematic floor of 2.5 mas .* more frames or longer exposures cannot improve it; more epochs or a longer baseline can/.test(p.message))).toBe(true);
    const faint = sheetFor([target({ id: 1, magnitude: 16 })], [observation({ id: 15, targetId: 1, snrGoal: 20, epochsPerSemester: 3, baselineYears: 1, requiredPmPrecisionMasPerYr: 50 })]);
    expect(faint.observations[0].astrometry!.floorDominated).toBe(false);
  });

  it("gives each epoch a ±7-night window, counts its usable nights as the visibility API does, and flags fragile ones", () => {
    // RA 12 h from +38.9° N: by late August the target sets in evening twilight; a long visit
    // (20 frames) fits on fewer and fewer nights.
    const obs = observation({
      id: 16, targetId: 1, snrGoal: 50, framesPerEpoch: 20, baselineYears: 1, requiredPmPrecisionMasPerYr: 50, maxAirmass: 2,
      epochs: [
        { date: "2027-03-20", semesterCode: "2027A", status: "planned" },
        { date: "2027-05-10", semesterCode: "2027A", status: "planned" },
        { date: "2027-08-01", semesterCode: "2027B", status: "planned" },
        { date: "2027-08-20", semesterCode: "2027B", status: "planned" },
      ],
    });
    const s = sheetFor([target({ id: 1, magnitude: 16 })], [obs]);
    const o = s.observations[0];
    const visit = o.timePerEpoch.totalSeconds! / 3600;
    for (const e of o.astrometry!.epochs) {
      const from = new Date(Date.parse(`${e.date}T00:00:00Z`) - 7 * 86_400_000).toISOString().slice(0, 10);
      const v = computeVisibility({ site, target: { raDeg: 180, decDeg: 30 }, from, nights: 15, limit: { maxAirmass: 2 } });
      const usable = v.nights.filter((n) => n.observableHours >= visit).length;
      expect(e.window).toEqual({ from, to: v.nights[14].date, usableNights: usable });
      expect(e.fragile).toBe(usable < 3);
    }
    expect(o.astrometry!.epochs.find((e) => e.date === "2027-03-20")!.fragile).toBe(false);
    expect(o.astrometry!.epochs.some((e) => e.fragile)).toBe(true);
    expect(s.problems.some((p) => p.observationId === 16 && /is fragile: within ±7 nights/.test(p.message))).toBe(true);
  });

  it("uses the magnitude of the observation's band, and states the assumption when the band is missing", () => {
    const s = sheetFor(
      [target({ id: 1, magnitudes: { V: 16, R: 15.2 } }), target({ id: 2, raDeg: 181, magnitudes: { R: 15.2 } })],
      [observation({ id: 17, targetId: 1, filterId: 100 }), observation({ id: 18, targetId: 2, filterId: 100 }), observation({ id: 19, targetId: 1, filterId: 101 })],
    );
    const byId = (id: number) => s.observations.find((o) => o.observationId === id)!;
    expect(byId(17).magnitudeUsed).toEqual({ band: "V", magnitude: 16, assumed: false });
    expect(byId(18).magnitudeUsed).toEqual({ band: "R", magnitude: 15.2, assumed: true });
    // I has no magnitude on target 1: the nearest band it has is R
    expect(byId(19).magnitudeUsed).toEqual({ band: "R", magnitude: 15.2, assumed: true });
    const warnings = s.problems.filter((p) => p.severity === "warning").map((p) => p.message);
    expect(warnings.some((m) => /Field 2 .*no V magnitude\. The exposure assumes V = R = 15\.2 \(colour V − R = 0\)/.test(m))).toBe(true);
    expect(warnings.some((m) => /Field 1 \(KRO 2\.4 m, V\).*no V magnitude/.test(m))).toBe(false);
  });

  it("counts moon time by the Moon's altitude: usable dark hours include moonlit nights' hours after moonset", () => {
    const s = sheetFor([target({ id: 1 })], [observation({ id: 20, targetId: 1, moonCategory: "dark" })]);
    const v = s.observations[0].visibility;
    // reference: the visibility API's per-night split for the same target and limit
    const api = computeVisibility({ site, target: { raDeg: 180, decDeg: 30 }, from: "2027-02-01", nights: 181, limit: { maxAirmass: 1.6 } });
    const darkSplit = api.nights.reduce((h, n) => h + n.hoursByMoonCategory.dark, 0);
    const darkNights = api.nights.filter((n) => n.moonCategory === "dark").reduce((h, n) => h + n.observableHours, 0);
    expect(v.usableHours).toBeCloseTo(darkSplit, 1);
    expect(v.usableHours).toBeGreaterThan(darkNights + 5);
    expect(v.byMoonCategory.dark + v.byMoonCategory.grey + v.byMoonCategory.bright).toBeCloseTo(v.observableHours, 1);
  });
});
