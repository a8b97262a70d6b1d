// The allocation page's data: the board's order with chair positions in place, one column per
// telescope × moon category the call offers (offered net of earlier calls' commitments), each
// proposal's requested and allocated hours, and later semesters' cells for multi-semester
// programmes. Saving turns the page's rows into `saveAllocation`'s rows and maps its refusals
// back onto the page's field names.
import { Refusal } from "~/lib/forms";
import type { AllocationTier, MoonCategory } from "~/lib/domain";
import type { AllocationSheet } from "~/lib/schemas/allocation";
import { Telescope } from "~/models/index.server";
import { allocationVersion, saveAllocation } from "./allocate.server";
import { callBoard, conflictedLast, visibleComputedRanks, type HoursCell } from "./board.server";
import { boardOrder } from "./fill";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";

export type SheetColumn = { telescopeId: number; telescopeName: string; moonCategory: MoonCategory; offeredHours: number; committedHours: number };
export type SheetCell = { telescopeId: number; moonCategory: MoonCategory; semesterCode: string; requestedHours: number; allocatedHours: number };
export type SheetRow = {
  position: number;
  proposalId: number;
  code: string | null;
  title: string;
  computedRank: number | null;
  chairRank: number | null;
  chairRankReason: string | null;
  tier: AllocationTier | null;
  waitlisted: boolean;
  /** the chair set its hours, tier or waitlist by hand: fill by rank keeps them */
  allocatedByHand: boolean;
  /** one per column, in the columns' order (the call's semester) */
  cells: SheetCell[];
  /** later semesters on telescope × moon categories this call offers */
  laterCells: SheetCell[];
  /** requested hours on time this call does not offer (shown, not allocatable) */
  notOffered: HoursCell[];
  requestedError: string | null;
  /** the viewing chair is conflicted on it: why, shown beside its disabled controls (its computed rank is withheld) */
  conflictReason: string | null;
};

const cellKey = (c: { telescopeId: number; moonCategory: string; semesterCode: string }) => `${c.telescopeId}|${c.moonCategory}|${c.semesterCode}`;

/** The sheet as `chair` reads it: on a proposal they are conflicted on, no computed rank and no controls. */
export async function allocationSheet({ callId, chair }: { callId: number; chair: { id: number } }) {
  const [board, telescopes, basedOn, conflicts] = await Promise.all([callBoard({ callId }), Telescope.findAll({ attributes: ["id", "name"] }), allocationVersion(callId), chairConflicts({ callId, chair })]);
  const nameOf = new Map(telescopes.map((t) => [t.id, t.name]));
  const semester = board.call.semesterCode;
  const columns: SheetColumn[] = board.oversubscription.map((o) => ({
    telescopeId: o.telescopeId,
    telescopeName: nameOf.get(o.telescopeId) ?? `Telescope ${o.telescopeId}`,
    moonCategory: o.moonCategory,
    offeredHours: o.offeredHours,
    committedHours: o.committedHours,
  }));
  const offered = new Set(columns.map((c) => `${c.telescopeId}|${c.moonCategory}`));
  const started = board.proposals.some((p) => p.allocation.length > 0 || p.tier !== null);
  const ranks = visibleComputedRanks(board.proposals, conflicts);
  // the proposals this chair is conflicted on last, by id; the others' ranks counted among themselves
  const rows: SheetRow[] = conflictedLast(boardOrder(board.proposals), conflicts).map((p, i) => {
    const requested = new Map<string, number>();
    for (const r of p.requested) requested.set(cellKey(r), (requested.get(cellKey(r)) ?? 0) + r.hours);
    const allocated = new Map(p.allocation.map((a) => [cellKey(a), a.hours]));
    const cell = (telescopeId: number, moonCategory: MoonCategory, semesterCode: string): SheetCell => {
      const k = cellKey({ telescopeId, moonCategory, semesterCode });
      return { telescopeId, moonCategory, semesterCode, requestedHours: requested.get(k) ?? 0, allocatedHours: allocated.get(k) ?? 0 };
    };
    const laterKeys = new Set(
      [...p.requested, ...p.allocation].filter((c) => c.semesterCode !== semester && offered.has(`${c.telescopeId}|${c.moonCategory}`)).map(cellKey),
    );
    const laterCells = [...laterKeys].sort().map((k) => {
      const [t, m, s] = k.split("|");
      return cell(Number(t), m as MoonCategory, s);
    });
    return {
      position: i + 1,
      proposalId: p.proposalId,
      code: p.code,
      title: p.title,
      computedRank: ranks.get(p.proposalId) ?? null,
      chairRank: p.chairRank,
      chairRankReason: p.chairRankReason,
      tier: p.tier,
      waitlisted: p.waitlisted,
      allocatedByHand: p.allocatedByHand,
      cells: columns.map((c) => cell(c.telescopeId, c.moonCategory, semester)),
      laterCells,
      notOffered: p.requested.filter((r) => r.hours > 0 && !offered.has(`${r.telescopeId}|${r.moonCategory}`)),
      requestedError: p.requestedError,
      conflictReason: conflicts.get(p.proposalId)?.reason ?? null,
    };
  });
  return { call: board.call, locked: board.locked, settings: board.settings, started, columns, rows, basedOn };
}

/** Saves the page's rows; a refusal names the page's own field (`rows.3.cells.1.hours`). */
export async function saveAllocationSheet({ actor, callId, sheet }: { actor: { id: number }; callId: number; sheet: AllocationSheet }) {
  const flat: { proposalId: number; telescopeId: number; moonCategory: MoonCategory; semesterCode: string; hours: number }[] = [];
  const pathOf: string[] = [];
  sheet.rows.forEach((row, i) =>
    row.cells.forEach((c, j) => {
      if (c.hours <= 0) return;
      flat.push({ proposalId: row.proposalId, ...c });
      pathOf.push(`rows.${i}.cells.${j}.hours`);
    }),
  );
  try {
    return await saveAllocation({
      actor,
      callId,
      rows: flat,
      tiers: sheet.rows.map((r) => ({ proposalId: r.proposalId, tier: r.tier, waitlisted: r.waitlisted })),
      basedOn: sheet.basedOn,
    });
  } catch (error) {
    if (error instanceof Refusal) {
      // saveAllocation numbers its flat rows; a proposal off the board is no one field of the page
      const m = error.field.endsWith("proposalId") ? null : /^rows\.(\d+)/.exec(error.field);
      const field = m ? (pathOf[Number(m[1])] ?? "form") : "form";
      throw new Refusal(error.message, { status: error.status, field: field });
    }
    throw error;
  }
}
