import { computeFeasibilitySheet } from "~/lib/feasibility.server";

/** Requested hours from each proposal's feasibility sheet (0 without observations; null if it cannot be computed). */
export async function withRequestedHours<T extends { id: number; observations: number }>(rows: T[]) {
  const out: (T & { requestedHours: number | null })[] = [];
  for (const row of rows) {
    let requestedHours: number | null = 0;
    if (row.observations > 0) {
      try {
        requestedHours = (await computeFeasibilitySheet({ proposalId: row.id })).requestedHours;
      } catch (error) {
        console.error(`feasibility sheet of proposal ${row.id} failed`, error);
        requestedHours = null;
      }
    }
    out.push({ ...row, requestedHours });
  }
  return out;
}

