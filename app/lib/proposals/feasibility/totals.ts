// Totals of the sheet: hours per telescope, semester and moon category against what the call
// offers, and the hours asked for per semester.

import type { MoonCategory } from "../../astro/visibility";
import { r } from "./common";
import type { FeasibilityInput, FeasibilitySheet, Problem, SheetTelescope } from "./types";

const MOON_RANK: Record<MoonCategory, number> = { dark: 0, grey: 1, bright: 2 };

type TotalRow = { telescopeId: number; telescopeName: string; semesterCode: string; moonCategory: MoonCategory; hours: number };

/** Hours per telescope, semester and moon category, added up observation by observation. */
export function createTotals() {
  const totals = new Map<string, TotalRow>();
  const add = (telescope: SheetTelescope, semesterCode: string, moonCategory: MoonCategory, hours: number) => {
    const key = `${telescope.id}|${semesterCode}|${moonCategory}`;
    const row = totals.get(key) ?? { telescopeId: telescope.id, telescopeName: telescope.name, semesterCode, moonCategory, hours: 0 };
    row.hours += hours;
    totals.set(key, row);
  };
  return { add, rows: () => [...totals.values()] };
}

/** The sheet's totals, the call's own semester first; a warning where a request exceeds what the call offers. */
export function totalsPart(
  rows: TotalRow[],
  call: FeasibilityInput["call"],
  problems: Problem[],
): Pick<FeasibilitySheet, "totals" | "requestedHoursBySemester" | "requestedHours"> {
  const offered = (telescopeId: number, moon: MoonCategory) =>
    call.offers.find((o) => o.telescopeId === telescopeId && o.moonCategory === moon)?.hoursOffered ?? null;
  const totalRows = rows
    .map((t) => ({ ...t, hours: r(t.hours, 2), offeredHours: t.semesterCode === call.semesterCode ? offered(t.telescopeId, t.moonCategory) : null }))
    .sort(
      (a, b) =>
        Number(b.semesterCode === call.semesterCode) - Number(a.semesterCode === call.semesterCode) ||
        a.semesterCode.localeCompare(b.semesterCode) ||
        a.telescopeName.localeCompare(b.telescopeName) ||
        MOON_RANK[a.moonCategory] - MOON_RANK[b.moonCategory],
    );
  for (const t of totalRows) {
    if (t.offeredHours !== null && t.hours > t.offeredHours) {
      problems.push({ severity: "warning", message: `${t.hours} h of ${t.moonCategory} time on ${t.telescopeName} are requested in ${t.semesterCode}; the call offers ${t.offeredHours} h in all.` });
    }
  }
  const requestedHours = r(
    totalRows.reduce((s, t) => s + t.hours, 0),
    2,
  );
  const bySemester = new Map<string, number>([[call.semesterCode, 0]]);
  for (const t of totalRows) bySemester.set(t.semesterCode, (bySemester.get(t.semesterCode) ?? 0) + t.hours);
  const requestedHoursBySemester = [...bySemester.entries()].map(([semesterCode, hours]) => ({ semesterCode, hours: r(hours, 2), callSemester: semesterCode === call.semesterCode }));
  return { totals: totalRows, requestedHours, requestedHoursBySemester };
}
