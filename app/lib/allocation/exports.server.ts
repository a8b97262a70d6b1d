// The board's exports: the ranked list and the allocation as CSV (`csvText`: RFC 4180, text cells
// safe for spreadsheets),
// and an accepted programme's planned astrometric epochs as iCalendar (RFC 5545, via ics).
import { csvText } from "~/lib/csv.server";
import { Refusal } from "~/lib/forms";
import { Op } from "sequelize";
import { createEvents, type EventAttributes } from "ics";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { notFound } from "~/lib/proposals/proposals.server";
import { Proposal, Telescope } from "~/models/index.server";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";
import { BOARD_STATES, callBoard, conflictedLast, withholdConflicted } from "./board.server";
import { boardOrder } from "./fill";

const num = (x: number | null, digits: number) => (x === null ? "" : x.toFixed(digits));

async function telescopeNames() {
  return new Map((await Telescope.findAll({ attributes: ["id", "name"] })).map((t) => [t.id, t.name]));
}

/** One line per proposal in the board's order; on a proposal `chair` is conflicted on, the grades' columns say they are withheld. */
export async function rankedListCsv({ callId, chair }: { callId: number; chair: { id: number } }): Promise<{ filename: string; csv: string }> {
  const [board, conflicts] = await Promise.all([callBoard({ callId }), chairConflicts({ callId, chair })]);
  const semester = board.call.semesterCode;
  const sum = (cells: { semesterCode: string; hours: number }[], here: boolean) => cells.filter((c) => (c.semesterCode === semester) === here).reduce((s, c) => s + c.hours, 0);
  const shown = new Map(withholdConflicted(board.proposals, conflicts).map((p) => [p.proposalId, p]));
  const rows = conflictedLast(boardOrder(board.proposals), conflicts).map((full) => shown.get(full.proposalId)!).map((p, i) => [
    i + 1,
    p.withheld ?? p.computedRank ?? "",
    p.chairRank ?? "",
    p.chairRankReason ?? "",
    p.code ?? "",
    p.title,
    p.category ?? "",
    p.piInstitution ?? "",
    ...(p.withheld
      ? Array<string>(7).fill(p.withheld)
      : [p.reviews ?? "", num(p.rawMean, 3), num(p.normalisedScore, 3), num(p.normalisedZ, 3), num(p.spread, 3), p.disagreement ? "yes" : "no", p.fallbackReviewerIds.length]),
    p.requestedError ? "" : num(sum(p.requested, true), 2),
    p.requestedError ? "" : num(sum(p.requested, false), 2),
    p.tier ?? "",
    num(sum(p.allocation, true), 2),
    num(sum(p.allocation, false), 2),
    p.status,
  ]);
  const header = [
    "position", "computed_rank", "chair_rank", "chair_rank_reason", "code", "title", "category", "pi_institution", "reviews",
    "raw_mean", "normalised_score", "normalised_z", "spread_z", "disagreement", "reviewers_on_panel_scale",
    `requested_${semester}_h`, "requested_later_h", "tier", `allocated_${semester}_h`, "allocated_later_h", "state",
  ];
  return { filename: `ranked-list-${semester}.csv`, csv: csvText([header, ...rows]) };
}

/** One line per proposal × telescope × moon category × semester with hours, in the board's order (the proposals `chair` is conflicted on last). */
export async function allocationCsv({ callId, chair }: { callId: number; chair: { id: number } }): Promise<{ filename: string; csv: string }> {
  const [board, names, conflicts] = await Promise.all([callBoard({ callId }), telescopeNames(), chairConflicts({ callId, chair })]);
  const lines: (string | number)[][] = [["position", "code", "title", "tier", "telescope", "moon_category", "semester", "hours", "requested_hours", "locked"]];
  conflictedLast(boardOrder(board.proposals), conflicts).forEach((p, i) => {
    for (const a of p.allocation) {
      const requested = p.requested.filter((r) => r.telescopeId === a.telescopeId && r.moonCategory === a.moonCategory && r.semesterCode === a.semesterCode).reduce((s, r) => s + r.hours, 0);
      lines.push([i + 1, p.code ?? "", p.title, p.tier ?? "", names.get(a.telescopeId) ?? String(a.telescopeId), a.moonCategory, a.semesterCode, a.hours.toFixed(2), requested.toFixed(2), board.locked ? "yes" : "no"]);
    }
  });
  return { filename: `allocation-${board.call.semesterCode}.csv`, csv: csvText(lines) };
}

const dateParts = (iso: string): [number, number, number] => {
  const [y, m, d] = iso.split("-").map(Number);
  return [y, m, d];
};

/**
 * The planned epochs of an accepted programme of this call, one all-day event per epoch on the
 * local date on which its night begins (as the feasibility sheet dates nights), with the target,
 * telescope, time per visit and the ± window in which it may be taken.
 */
export async function epochsIcs({ callId, proposalId }: { callId: number; proposalId: number }): Promise<{ filename: string; ics: string }> {
  // a draft or another call's proposal is not on this board: as if it did not exist
  const proposal = await Proposal.findOne({ where: { id: proposalId, callId, status: { [Op.in]: [...BOARD_STATES] } } });
  if (!proposal) notFound();
  if (proposal.status !== "accepted") throw new Refusal("Only an accepted programme has planned epochs to export; lock the allocation first.", { status: 409, field: "proposalId" });
  const sheet = await computeFeasibilitySheet({ proposalId });
  const code = proposal.code ?? `proposal-${proposal.id}`;
  const events: EventAttributes[] = [];
  for (const o of sheet.observations) {
    if (!o.astrometry) continue;
    for (const e of o.astrometry.epochs) {
      const minutes = o.timePerEpoch.totalSeconds === null ? null : Math.round(o.timePerEpoch.totalSeconds / 60);
      events.push({
        uid: `${code}-obs${o.observationId}-${e.date}@nightshare`,
        title: `${code} epoch: ${o.targetName} (${o.telescopeName})`,
        start: dateParts(e.date),
        duration: { days: 1 },
        description: [
          `Night beginning ${e.date} (local date at the site), semester ${e.semesterCode}, state ${e.status}.`,
          `Target ${o.targetName} with ${o.instrumentName} ${o.band}, ${o.moonCategory} time or darker, airmass ≤ ${o.maxAirmass}.`,
          minutes === null ? "Time per visit unknown." : `Time per visit ${minutes} min.`,
          e.window ? `May be taken from ${e.window.from} to ${e.window.to} (${e.window.usableNights} nights with time for the visit).` : "",
        ].filter(Boolean).join("\n"),
        categories: ["Nightshare", "astrometric epoch"],
        status: "CONFIRMED",
        productId: "nightshare/epochs",
        calName: `${code} planned epochs`,
      });
    }
  }
  if (events.length === 0) throw new Refusal("This programme has no astrometric epochs to export.", { status: 409, field: "proposalId" });
  const { error, value } = createEvents(events);
  if (error || !value) throw error ?? new Error("iCalendar could not be written");
  return { filename: `${code.replace(/[^\w.-]+/g, "-")}-epochs.ics`, ics: value };
}
