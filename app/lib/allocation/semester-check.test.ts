// The semester check on hand-built nights (invented): the three cases, tiers first, moon
// time, epoch windows, determinism by seed, and weather at a clear fraction of 0.5 against the
// binomial distribution of simple-statistics 7.8.8 (registry) and its closed form.
import { binomialDistribution } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { fitPrecision, parallaxFactors } from "~/lib/astro/astrometry";
import type { AllocationTier, MoonCategory } from "~/lib/domain";
import { runSemesterCheck, type CheckInput, type CheckObservation, type CheckProgramme, type CheckTelescope } from "./semester-check";

const DAY = 86_400_000;
const HOUR = 3_600_000;
const T0 = Date.UTC(2027, 1, 1, 20, 0, 0); // darkness of night 0 starts 2027-02-01 20:00 UTC

function telescope(nights: number, { id = 1, darkHours = 8, clear = 1 as number | null, siteKey = "site", moon = null as null | { upCategory: MoonCategory; upHours: [number, number] } } = {}): CheckTelescope {
  return {
    telescopeId: id,
    name: `Test telescope ${id}`,
    siteKey,
    clearFractions: Array(12).fill(clear),
    nights: Array.from({ length: nights }, (_, n) => {
      const start = T0 + n * DAY;
      return {
        date: new Date(start).toISOString().slice(0, 10),
        month: new Date(start).getUTCMonth() + 1,
        darkStart: start,
        darkEnd: start + darkHours * HOUR,
        moonUp: moon ? [{ start: start + moon.upHours[0] * HOUR, end: start + moon.upHours[1] * HOUR }] : [],
        upCategory: moon?.upCategory ?? "dark",
      };
    }),
  };
}

/** Windows (hours after the start of darkness) on every night. */
const every = (nights: number, from: number, to: number) => Array.from({ length: nights }, (_, n) => [{ start: T0 + n * DAY + from * HOUR, end: T0 + n * DAY + to * HOUR }]);

function observation(o: Partial<CheckObservation> & { windows: CheckObservation["windows"] }): CheckObservation {
  return { observationId: 1, label: "obs", telescopeId: 1, moonCategory: "dark", visitHours: 1, visits: 1, astrometry: null, ...o };
}

function programme(id: number, tier: AllocationTier, hours: number, observations: CheckObservation[], position = id): CheckProgramme {
  return { proposalId: id, code: `${String(id).padStart(3, "0")}/27A`, title: `Programme ${id}`, tier, position, allocation: [{ telescopeId: 1, moonCategory: "dark", hours }], observations };
}

const byId = (result: ReturnType<typeof runSemesterCheck>, id: number) => result.programmes.find((p) => p.proposalId === id)!;

describe("the issue's hand-built cases", () => {
  it("a programme with no observable windows never completes", () => {
    const nights = 30;
    const input: CheckInput = {
      semesterCode: "27A",
      telescopes: [telescope(nights)],
      programmes: [programme(1, "assured", 5, [observation({ visits: 5, windows: Array.from({ length: nights }, () => []) })])],
    };
    const result = runSemesterCheck(input, { realisations: 50, seed: 1 });
    const p = byId(result, 1);
    expect(p.plannedVisits).toBe(5);
    expect(p.completionProbability).toBe(0);
    expect(p.expectedExecutedHours).toBe(0);
    expect(p.flag).toBe("assured-below-goal");
  });

  it("with a clear fraction of 1 and enough time, every assured programme completes", () => {
    // 5 programmes × 3 visits of 1 h = 15 h into 10 nights × 8 h
    const nights = 10;
    const programmes = [1, 2, 3, 4, 5].map((id) => programme(id, "assured", 3, [observation({ observationId: id, visits: 3, windows: every(nights, 0, 8) })]));
    const result = runSemesterCheck({ semesterCode: "27A", telescopes: [telescope(nights)], programmes }, { realisations: 20, seed: 7 });
    for (const p of result.programmes) {
      expect(p.completionProbability).toBe(1);
      expect(p.expectedExecutedFraction).toBe(1);
      expect(p.flag).toBeNull();
    }
    expect(result.telescopes[0].expectedUsedHours).toBe(15);
    expect(result.telescopes[0].darkHours).toBe(80);
  });

  it("hours executed never exceed the dark hours of a night, nor a programme's allocation", () => {
    // 40 programmes of 20 visits × 1.5 h on overlapping windows: far more than 30 nights × 8 h
    const nights = 30;
    const programmes = Array.from({ length: 40 }, (_, i) =>
      programme(i + 1, i < 10 ? "assured" : i < 30 ? "queue" : "filler", 25, [
        observation({ observationId: i + 1, visitHours: 1.5, visits: 20, windows: every(nights, (i % 5) * 0.7, (i % 5) * 0.7 + 4.5) }),
      ]),
    );
    for (const seed of [1, 2, 3]) {
      const result = runSemesterCheck({ semesterCode: "27A", telescopes: [telescope(nights, { clear: 0.7 })], programmes }, { realisations: 30, seed, trace: true });
      const trace = result.trace![0];
      for (let n = 0; n < nights; n++) expect(trace.usedHours[n]).toBeLessThanOrEqual(trace.darkHours[n] + 1e-9);
      expect(trace.usedHours.some((h) => h >= 6)).toBe(true); // the nights do fill up (windows span 0–7.3 h)
      expect(result.telescopes[0].maxUsedHours).toBeLessThanOrEqual(result.telescopes[0].darkHours);
      for (const p of result.programmes) {
        // 25 h buy 16 whole visits of 1.5 h
        expect(p.plannedVisits).toBe(16);
        expect(p.expectedExecutedHours).toBeLessThanOrEqual(p.allocatedHours);
      }
      expect(result.programmes.some((p) => p.completionProbability === 0)).toBe(true);
    }
  });
});

describe("scheduling rules", () => {
  it("schedules assured before queue, whatever the board position", () => {
    // one 2-h window a night on 3 nights: room for 3 visits of 2 h; assured wants 3, queue 1
    const nights = 3;
    const programmes = [
      programme(1, "queue", 2, [observation({ observationId: 1, visitHours: 2, visits: 1, windows: every(nights, 1, 3) })], 1),
      programme(2, "assured", 6, [observation({ observationId: 2, visitHours: 2, visits: 3, windows: every(nights, 1, 3) })], 2),
    ];
    const result = runSemesterCheck({ semesterCode: "27A", telescopes: [telescope(nights)], programmes }, { realisations: 5, seed: 3 });
    expect(byId(result, 2).completionProbability).toBe(1);
    expect(byId(result, 1).completionProbability).toBe(0);
    expect(byId(result, 1).flag).toBe("queue-below-goal");
    expect(result.programmes.map((p) => p.proposalId)).toEqual([2, 1]);
  });

  it("keeps dark-time visits out of Moon-up time of a bright night; grey and bright time may use it", () => {
    // the Moon is up 0–6 h of every 8-h night and the nights are bright: 2 h of dark time remain
    const nights = 4;
    const tel = telescope(nights, { moon: { upCategory: "bright", upHours: [0, 6] } });
    const programmes = [
      programme(1, "assured", 4, [observation({ observationId: 1, moonCategory: "dark", visitHours: 1, visits: 4, windows: every(nights, 0, 5) })]),
      { ...programme(2, "assured", 4, [observation({ observationId: 2, moonCategory: "bright", visitHours: 1, visits: 4, windows: every(nights, 0, 5) })]), allocation: [{ telescopeId: 1, moonCategory: "bright" as const, hours: 4 }] },
    ];
    const result = runSemesterCheck({ semesterCode: "27A", telescopes: [tel], programmes }, { realisations: 3, seed: 5 });
    expect(byId(result, 1).expectedExecutedHours).toBe(0);
    expect(byId(result, 2).completionProbability).toBe(1);
  });

  it("never runs more than the allocation: 5 h allocated to visits of 2 h buy 2 of 4", () => {
    const nights = 10;
    const result = runSemesterCheck(
      { semesterCode: "27A", telescopes: [telescope(nights)], programmes: [programme(1, "assured", 5, [observation({ visitHours: 2, visits: 4, windows: every(nights, 0, 8) })])] },
      { realisations: 5, seed: 1 },
    );
    const p = byId(result, 1);
    expect(p.plannedVisits).toBe(2);
    expect(p.expectedExecutedHours).toBe(4);
    expect(p.completionProbability).toBe(1);
    expect(p.notes.join(" ")).toMatch(/covers 2 of its 4 visits/);
  });

  it("shares the weather between telescopes of one site and says which months have no clear fraction", () => {
    const nights = 40;
    const a = telescope(nights, { id: 1, clear: 0.6 });
    const b = telescope(nights, { id: 2, clear: 0.6 });
    const c = { ...telescope(nights, { id: 3, clear: 0.6, siteKey: "elsewhere" }), clearFractions: [0.6, null, ...Array(10).fill(0.6)] };
    const result = runSemesterCheck({ semesterCode: "27A", telescopes: [a, b, c], programmes: [] }, { realisations: 1, seed: 11, trace: true });
    const [ta, tb, tc] = result.trace!;
    expect(tb.clear).toEqual(ta.clear);
    expect(tc.clear).not.toEqual(ta.clear);
    // February has no setting at telescope 3: its 28 February nights are all clear
    expect(tc.clear.slice(0, 28).every(Boolean)).toBe(true);
    expect(result.notes).toEqual(["Test telescope 3: no clear fraction is set for February; those nights count as clear (fraction 1)."]);
  });
});

describe("weather", () => {
  it("the same seed gives the same answer; another seed other draws", () => {
    const nights = 60;
    const programmes = [1, 2, 3].map((id) => programme(id, "queue", 10, [observation({ observationId: id, visits: 10, windows: every(nights, id, id + 3) })]));
    const input: CheckInput = { semesterCode: "27A", telescopes: [telescope(nights, { clear: 0.5 })], programmes };
    const first = runSemesterCheck(input, { realisations: 100, seed: 42, trace: true });
    const again = runSemesterCheck(input, { realisations: 100, seed: 42, trace: true });
    const other = runSemesterCheck(input, { realisations: 100, seed: 43, trace: true });
    expect(again).toEqual(first);
    expect(other.trace![0].clear).not.toEqual(first.trace![0].clear);
  });

  it("completion at a clear fraction of 0.5 follows the binomial distribution", () => {
    // 10 nights, 3 visits wanted, one per night: it completes when at least 3 of 10 nights are
    // clear. P = 1 − (C(10,0) + C(10,1) + C(10,2)) / 2¹⁰ = 1 − 56/1024 = 0.9453125 (closed form);
    // the expected executed fraction is E[min(X, 3)] / 3 = 1 − (3·1 + 2·10 + 1·45) / (3·1024) = 0.977865.
    const nights = 10;
    const binomial = binomialDistribution(10, 0.5);
    const pComplete = 1 - binomial[0] - binomial[1] - binomial[2];
    expect(pComplete).toBeCloseTo(1 - 56 / 1024, 12);
    const R = 20_000;
    const result = runSemesterCheck(
      { semesterCode: "27A", telescopes: [telescope(nights, { clear: 0.5 })], programmes: [programme(1, "assured", 3, [observation({ visits: 3, windows: every(nights, 0, 8) })])] },
      { realisations: R, seed: 2027 },
    );
    const p = byId(result, 1);
    const se = Math.sqrt((pComplete * (1 - pComplete)) / R); // ≈ 0.0016
    expect(Math.abs(p.completionProbability! - pComplete)).toBeLessThan(4 * se);
    expect(Math.abs(p.expectedExecutedFraction! - (1 - 68 / 3072))).toBeLessThan(0.005);
    expect(p.flag).toBeNull();
    // the dark hours used: 8 h × (nights clear) on average 40 h, of which the programme uses its 3 × 1 h
    expect(Math.abs(result.telescopes[0].expectedClearDarkHours - 40)).toBeLessThan(0.3);
  });

  it("an epoch with a 3-night window at a clear fraction of 0.5 is achieved with probability 1 − 0.5³", () => {
    const nights = 20;
    const raDeg = 196.33;
    const decDeg = 22.17;
    const other = [Date.UTC(2027, 7, 20), Date.UTC(2028, 1, 20), Date.UTC(2028, 7, 20), Date.UTC(2029, 1, 20)];
    const astro = (required: number | null) => ({
      raDeg,
      decDeg,
      perEpochPrecisionMas: 5,
      requiredPmPrecisionMasPerYr: required,
      epochs: [{ date: "2027-02-10", fromNight: 8, toNight: 10 }],
      otherEpochTimes: other,
    });
    const obs = (required: number | null) => observation({ visits: 1, windows: every(nights, 0, 8), astrometry: astro(required) });
    const R = 20_000;
    const result = runSemesterCheck(
      { semesterCode: "27A", telescopes: [telescope(nights, { clear: 0.5 })], programmes: [programme(1, "assured", 1, [obs(100)])] },
      { realisations: R, seed: 99 },
    );
    const p = byId(result, 1);
    expect(Math.abs(p.completionProbability! - 0.875)).toBeLessThan(4 * Math.sqrt((0.875 * 0.125) / R));
    expect(p.epochs).toMatchObject({ wanted: 1, planned: 1 });
    expect(Math.abs(p.epochs!.expectedAchieved - 0.875)).toBeLessThan(0.01);
    // four other epochs alone determine the fit, so every realisation has a precision
    const a = p.astrometry[0];
    expect(a.undeterminedFraction).toBe(0);
    expect(a.probabilityMet).toBe(1);
    // the fit over the four other epochs only (the realisations that lose the epoch) and over all
    // five bracket the expected value; the exact weights are 0.125 and 0.875
    const fit = (times: number[]) => {
      const f = fitPrecision(raDeg, decDeg, times.map((time) => ({ time, sigmaMas: 5, factors: parallaxFactors(raDeg, decDeg, time) })));
      return Math.max(f.properMotionPrecisionMasPerYr.ra, f.properMotionPrecisionMasPerYr.dec);
    };
    const without = fit(other);
    expect(a.expectedPmPrecisionMasPerYr!).toBeLessThan(without);
    expect(a.expectedPmPrecisionMasPerYr!).toBeGreaterThan(a.plannedPmPrecisionMasPerYr!);
  });
});
