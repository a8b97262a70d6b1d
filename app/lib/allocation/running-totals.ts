// Running totals down the ranked list (issue 12, "Allocation"): for each telescope × moon category
// offered in the call's semester, the hours allocated so far at each row of the board's order, the
// row at which offered runs out, and the two warnings the chair must see before locking:
//   - assured hours above assuredShareLimit × offered;
//   - all tiers above offered × (1 + fillerMargin).
// Pure: the allocation page runs it in the browser on every keystroke and the server runs it on save.
import type { AllocationTier, MoonCategory } from "~/lib/domain";

export type OfferedCell = { telescopeId: number; moonCategory: MoonCategory; hours: number };
export type RankedAllocation = {
  proposalId: number;
  tier: AllocationTier | null;
  /** hours in the call's semester (other semesters are commitments on later calls and do not count here) */
  cells: { telescopeId: number; moonCategory: MoonCategory; hours: number }[];
};
export type CellTotals = {
  telescopeId: number;
  moonCategory: MoonCategory;
  offeredHours: number;
  assuredLimit: number;
  allLimit: number;
  assuredHours: number;
  allHours: number;
  /** running total of all tiers after each row, aligned with the input rows */
  runningHours: number[];
  /** index of the first row whose running total passes offered: the offered line lies above it (null: offered never runs out) */
  firstRowOver: number | null;
};
export type AllocationWarning = { telescopeId: number; moonCategory: MoonCategory; kind: "assured-share" | "over-margin"; hours: number; limit: number };

const EPS = 1e-9;
const key = (c: { telescopeId: number; moonCategory: string }) => `${c.telescopeId}|${c.moonCategory}`;

export function runningTotals(input: { offered: OfferedCell[]; assuredShareLimit: number; fillerMargin: number; rows: RankedAllocation[] }) {
  const cells = input.offered.map<CellTotals>((o) => ({
    telescopeId: o.telescopeId,
    moonCategory: o.moonCategory,
    offeredHours: o.hours,
    assuredLimit: o.hours * input.assuredShareLimit,
    allLimit: o.hours * (1 + input.fillerMargin),
    assuredHours: 0,
    allHours: 0,
    runningHours: [],
    firstRowOver: null,
  }));
  const byKey = new Map(cells.map((c) => [key(c), c]));
  /** hours on cells the call does not offer (refused on save; shown so the chair sees why) */
  const unoffered: { proposalId: number; telescopeId: number; moonCategory: MoonCategory; hours: number }[] = [];
  input.rows.forEach((row, i) => {
    for (const c of row.cells) {
      if (!(c.hours > 0)) continue;
      const cell = byKey.get(key(c));
      if (!cell) {
        unoffered.push({ proposalId: row.proposalId, ...c });
        continue;
      }
      cell.allHours += c.hours;
      if (row.tier === "assured") cell.assuredHours += c.hours;
    }
    for (const cell of cells) {
      cell.runningHours.push(cell.allHours);
      if (cell.firstRowOver === null && cell.allHours > cell.offeredHours + EPS) cell.firstRowOver = i;
    }
  });
  const warnings: AllocationWarning[] = [];
  for (const c of cells) {
    if (c.assuredHours > c.assuredLimit + EPS) warnings.push({ telescopeId: c.telescopeId, moonCategory: c.moonCategory, kind: "assured-share", hours: c.assuredHours, limit: c.assuredLimit });
    if (c.allHours > c.allLimit + EPS) warnings.push({ telescopeId: c.telescopeId, moonCategory: c.moonCategory, kind: "over-margin", hours: c.allHours, limit: c.allLimit });
  }
  return { cells, warnings, unoffered };
}
