// A re-plan of an observation's remaining epochs (pure): the planner (astro/astrometry.ts
// planEpochs) over the semesters that still hold planned epochs, the same number of epochs in
// each, from tomorrow on, with the epochs already taken fixed in the fit.
import { planEpochs } from "~/lib/astro/astrometry";
import type { SemesterSpan } from "~/lib/semesters";
import { addDays, dayNumber } from "~/lib/astro/time";
import type { Site } from "~/lib/astro/visibility";

export type ReplanInput = {
  site: Site;
  target: { raDeg: number; decDeg: number; pmRaMasPerYr: number | null; pmDecMasPerYr: number | null };
  /** the programme's semesters (the call's and the later ones of its baseline) */
  semesters: SemesterSpan[];
  /** the remaining planned epochs (local night dates) */
  remaining: { date: string; semesterCode: string }[];
  /** the epochs taken so far, with their measured precision */
  executed: { time: number; sigmaMas: number }[];
  perEpochPrecisionMas: number;
  maxAirmass: number;
  requiredPmMasPerYr: number | null;
  secondsPerEpoch: number;
  toleranceNights: number;
  /** YYYY-MM-DD: the re-plan starts the night after this */
  today: string;
};

export type Replan = { dates: { date: string; semesterCode: string; parallaxFactors: { ra: number; dec: number } }[]; message?: string };

export function replanRemaining(a: ReplanInput): Replan | null {
  if (a.remaining.length === 0) return null;
  const first = addDays(a.today, 1);
  const counts = new Map<string, number>();
  for (const e of a.remaining) counts.set(e.semesterCode, (counts.get(e.semesterCode) ?? 0) + 1);
  const spans = a.semesters
    .filter((s) => counts.has(s.code) && s.end >= first)
    .map((s) => ({ ...s, start: s.start < first ? first : s.start, epochs: counts.get(s.code) as number }));
  if (spans.length === 0) return { dates: [], message: "The semesters of the remaining epochs are over: nothing is left to re-plan." };
  const last = spans[spans.length - 1].end;
  const nights = dayNumber(last) - dayNumber(first) + 1;
  const hours = a.secondsPerEpoch / 3600;
  const plan = planEpochs({
    site: a.site,
    target: { raDeg: a.target.raDeg, decDeg: a.target.decDeg, pmRaCosDecMasPerYr: a.target.pmRaMasPerYr ?? 0, pmDecMasPerYr: a.target.pmDecMasPerYr ?? 0 },
    firstDate: first,
    baselineYears: (nights - 1) / 365.25,
    perEpochPrecisionMas: a.perEpochPrecisionMas,
    limit: { maxAirmass: a.maxAirmass },
    perSemester: spans,
    ...(a.requiredPmMasPerYr !== null ? { required: { properMotionMasPerYr: a.requiredPmMasPerYr } } : {}),
    secondsPerEpoch: a.secondsPerEpoch,
    minWindowHours: Math.max(hours, 0.25),
    toleranceNights: a.toleranceNights,
    fixed: a.executed,
  });
  return {
    dates: plan.epochs.map((e) => ({ date: e.date, semesterCode: e.semester, parallaxFactors: e.parallaxFactors })),
    ...(plan.message ? { message: plan.message } : {}),
  };
}
