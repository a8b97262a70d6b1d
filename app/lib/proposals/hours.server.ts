import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";

export type SemesterHours = { semesterCode: string; hours: number; callSemester: boolean };

/**
 * Requested hours from each proposal's feasibility sheet, per semester: the call's own semester
 * first (`requestedHoursThisSemester`), then each later one; `requestedHours` adds them all
 * (0 without observations; null if the sheet cannot be computed).
 */
export async function withRequestedHours<T extends { id: number; observations: number; semesterCode: string }>(rows: T[]) {
  const out: (T & { requestedHours: number | null; requestedHoursThisSemester: number | null; requestedHoursBySemester: SemesterHours[] })[] = [];
  for (const row of rows) {
    let requestedHours: number | null = 0;
    let requestedHoursThisSemester: number | null = 0;
    let requestedHoursBySemester: SemesterHours[] = [{ semesterCode: row.semesterCode, hours: 0, callSemester: true }];
    if (row.observations > 0) {
      try {
        const sheet = await computeFeasibilitySheet({ proposalId: row.id });
        requestedHours = sheet.requestedHours;
        requestedHoursThisSemester = sheet.requestedHoursThisSemester;
        requestedHoursBySemester = sheet.requestedHoursBySemester;
      } catch (error) {
        console.error(`feasibility sheet of proposal ${row.id} failed`, error);
        requestedHours = null;
        requestedHoursThisSemester = null;
        requestedHoursBySemester = [];
      }
    }
    out.push({ ...row, requestedHours, requestedHoursThisSemester, requestedHoursBySemester });
  }
  return out;
}
