import { computeFeasibilitySheets } from "~/lib/proposals/feasibility.server";

export type SemesterHours = { semesterCode: string; hours: number; callSemester: boolean };

/**
 * Requested hours from each proposal's feasibility sheet, per semester: the call's own semester
 * first (`requestedHoursThisSemester`), then each later one; `requestedHours` adds them all
 * (0 without observations; null if the sheet cannot be computed). The sheets' inputs are read
 * for all the rows at once (a fixed number of statements, however many proposals).
 */
export async function withRequestedHours<T extends { id: number; observations: number; semesterCode: string }>(rows: T[]) {
  const sheets = await computeFeasibilitySheets({ proposalIds: rows.filter((r) => r.observations > 0).map((r) => r.id) });
  return rows.map((row) => {
    const sheet = row.observations > 0 ? sheets.get(row.id) : undefined;
    if (sheet instanceof Error) {
      console.error(`feasibility sheet of proposal ${row.id} failed`, sheet);
      return { ...row, requestedHours: null as number | null, requestedHoursThisSemester: null as number | null, requestedHoursBySemester: [] as SemesterHours[] };
    }
    if (!sheet) return { ...row, requestedHours: 0 as number | null, requestedHoursThisSemester: 0 as number | null, requestedHoursBySemester: [{ semesterCode: row.semesterCode, hours: 0, callSemester: true }] as SemesterHours[] };
    return { ...row, requestedHours: sheet.requestedHours as number | null, requestedHoursThisSemester: sheet.requestedHoursThisSemester as number | null, requestedHoursBySemester: sheet.requestedHoursBySemester as SemesterHours[] };
  });
}
