// The one home of the semester rules: semester codes (2027A, 2027B), the order of semesters, and
// which dates a semester covers. The office sets each call's semester dates; where no call has
// set them, a semester follows on from the one before it and lasts six months, and before any
// call the default rule holds (A = 1 Feb – 31 Jul, B = 1 Aug – 31 Jan).
// Pure and browser-safe: the forms, the planner and the server use it.
import { addDays } from "./astro/time";

/** A semester code: the year and A or B, like 2027A. */
export const SEMESTER_CODE = /^\d{4}[AB]$/;

export function isSemesterCode(code: string): boolean {
  return SEMESTER_CODE.test(code);
}

/** 2027A → 2027B → 2028A; null for a string that is not a semester code. */
export function nextSemesterCode(code: string): string | null {
  if (!isSemesterCode(code)) return null;
  const year = Number(code.slice(0, 4));
  return code.endsWith("A") ? `${year}B` : `${year + 1}A`;
}

/** The call's own semester and the next `count − 1` ones: 2027A → 2027A, 2027B, 2028A, 2028B. */
export function upcomingSemesters(first: string, count = 4): string[] {
  if (!isSemesterCode(first)) return [first];
  const out = [first];
  while (out.length < count) out.push(nextSemesterCode(out[out.length - 1]) as string);
  return out;
}

/** 2027A → 27A: the short semester of proposal codes. */
export function shortSemester(semesterCode: string): string {
  return isSemesterCode(semesterCode) ? semesterCode.slice(2) : semesterCode;
}

/** One semester: its code and first and last nights (local dates, YYYY-MM-DD), as the office set them. */
export type SemesterSpan = { code: string; start: string; end: string };

/** `date` plus whole months; a day the month does not have becomes its last (31 Aug + 6 → 29 Feb). */
export function addMonths(date: string, months: number): string {
  const y = Number(date.slice(0, 4));
  const m = Number(date.slice(5, 7)) - 1 + months;
  const yy = y + Math.floor(m / 12);
  const mm = ((m % 12) + 12) % 12;
  const lastDay = new Date(Date.UTC(yy, mm + 1, 0)).getUTCDate();
  const d = Math.min(Number(date.slice(8, 10)), lastDay);
  return `${String(yy).padStart(4, "0")}-${String(mm + 1).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
}

/** The semester after `prev` when no call has set its dates: from the day after `prev` ends, six months. */
export function semesterAfter(prev: Pick<SemesterSpan, "code" | "end">, code = nextSemesterCode(prev.code) ?? `${prev.code}+1`): SemesterSpan {
  const start = addDays(prev.end, 1);
  return { code, start, end: addDays(addMonths(start, 6), -1) };
}

/**
 * `count` consecutive semesters from `first` (the call's own). A later semester takes the dates
 * of a call the office has set up for it (`known`) when there is one; otherwise it follows on
 * from the previous one (`semesterAfter`).
 */
export function semesterSequence(first: SemesterSpan, count: number, known: SemesterSpan[] = []): SemesterSpan[] {
  const out: SemesterSpan[] = [first];
  for (let i = 1; i < count; i++) {
    const prev = out[i - 1];
    const code = nextSemesterCode(prev.code) ?? `${first.code}+${i}`;
    out.push(known.find((k) => k.code === code) ?? semesterAfter(prev, code));
  }
  return out;
}

/** The default rule before any call: A from 1 February, B from 1 August (months 1–12). */
export const DEFAULT_SEMESTER_MONTHS = { aStartMonth: 2, bStartMonth: 8 } as const;

/** A semester's dates by the default rule (A 1 Feb – 31 Jul, B 1 Aug – 31 Jan); null for a string that is no code. */
export function defaultSemesterSpan(code: string): SemesterSpan | null {
  if (!isSemesterCode(code)) return null;
  const month = code.endsWith("A") ? DEFAULT_SEMESTER_MONTHS.aStartMonth : DEFAULT_SEMESTER_MONTHS.bStartMonth;
  const start = `${code.slice(0, 4)}-${String(month).padStart(2, "0")}-01`;
  return { code, start, end: addDays(addMonths(start, 6), -1) };
}

function defaultSemesterOf(date: string): string {
  const y = Number(date.slice(0, 4));
  const m = Number(date.slice(5, 7));
  const { aStartMonth, bStartMonth } = DEFAULT_SEMESTER_MONTHS;
  if (m >= aStartMonth && m < bStartMonth) return `${y}A`;
  return m >= bStartMonth ? `${y}B` : `${y - 1}B`;
}

/**
 * The code of the semester a night (local date) belongs to: the office's semester that holds it
 * (`known`, the calls' dates); after or between them, the semesters that follow on from the last
 * known one before it; before them all (or with none known), the default rule.
 */
export function semesterOf(date: string, known: readonly SemesterSpan[] = []): string {
  const hit = known.find((s) => date >= s.start && date <= s.end);
  if (hit) return hit.code;
  const before = known.filter((s) => s.end < date).sort((a, b) => (a.end < b.end ? 1 : -1))[0];
  if (!before || !isSemesterCode(before.code)) return defaultSemesterOf(date);
  let span = before;
  // each step is six months, so this ends; a later known semester takes over where it begins
  while (span.end < date) {
    const code = nextSemesterCode(span.code) as string;
    span = known.find((k) => k.code === code) ?? semesterAfter(span, code);
  }
  return span.code;
}
