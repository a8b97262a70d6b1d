// The ranking board's numbers for one call (SPEC §3.4): normalised scores from the submitted
// reviews, the hours each proposal requests from its feasibility sheet, the chair's positions and
// allocations, and oversubscription per telescope × moon category against the offered hours less
// what earlier calls' locked allocations already committed to this semester.
import { Op } from "sequelize";
import { moonCategories, type MoonCategory } from "~/lib/domain";
import { computeFeasibilitySheets, type FeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { blankTeamsUntilRevealed } from "~/lib/review/anonymity.server";
import { callNotFound } from "~/lib/review/chair.server";
import type { ChairConflicts } from "~/lib/review/chair-conflicts.server";
import { CONFLICT_WITHHELD } from "~/lib/review/vocabulary";
import { Allocation, BoardEntry, Call, CallAllocation, CallOffer, Proposal, ReviewAssignment, User } from "~/models/index.server";
import { applyReviewDuty, reviewDuties, type ReviewDuty } from "~/lib/review/duty.server";
import { normaliseGrades } from "./normalise";

/** Proposals that stand on the board: in review, or with an outcome from a lock. */
export const BOARD_STATES = ["in_review", "accepted", "waitlisted", "declined"] as const;

export type HoursCell = { telescopeId: number; moonCategory: MoonCategory; semesterCode: string; hours: number };

const cellKey = (telescopeId: number, moonCategory: string) => `${telescopeId}|${moonCategory}`;

/** Hours already committed to `semesterCode` by locked allocations of other calls. */
export async function committedHours({ callId, semesterCode }: { callId: number; semesterCode: string }) {
  const locked = await CallAllocation.findAll({ where: { lockedAt: { [Op.ne]: null }, callId: { [Op.ne]: callId } }, attributes: ["callId"] });
  const out = new Map<string, number>();
  if (locked.length === 0) return out;
  const rows = await Allocation.findAll({ where: { semesterCode, callId: { [Op.in]: locked.map((l) => l.callId as number) } } });
  for (const row of rows) {
    const key = cellKey(row.telescopeId as number, row.moonCategory);
    out.set(key, (out.get(key) ?? 0) + row.hours);
  }
  return out;
}

/** `sheets`, when given, receives each proposal's feasibility sheet (the page's RA pressure reuses them). */
export async function callBoard({ callId, sheets }: { callId: number; sheets?: Map<number, FeasibilitySheet> }) {
  const [call, proposals] = await Promise.all([
    Call.findByPk(callId, { include: [{ model: CallOffer, as: "offers" }] }),
    // plain rows (hundreds of proposals): no model instances
    Proposal.findAll({ where: { callId, status: { [Op.in]: [...BOARD_STATES] } }, order: [["serial", "ASC"], ["id", "ASC"]], raw: true }),
  ]);
  if (!call) callNotFound();
  const ids = proposals.map((p) => p.id);
  // the sheets load beside the grades and the allocation (the pool has connections to spare)
  const [computed, pis, grades, entries, allocations, allocation, committed] = await Promise.all([
    computeFeasibilitySheets({ proposalIds: ids, proposals, calls: [call] }),
    User.findAll({ where: { id: [...new Set(proposals.map((p) => p.createdById as number))] }, attributes: ["id", "institution"], raw: true }),
    // plain rows (hundreds of grades); DECIMAL comes back as text
    ReviewAssignment.findAll({ where: { callId, status: "submitted", overall: { [Op.ne]: null }, proposalId: { [Op.in]: ids.length ? ids : [0] } }, attributes: ["proposalId", "reviewerId", "overall"], raw: true }),
    BoardEntry.findAll({ where: { callId } }),
    Allocation.findAll({ where: { callId } }),
    CallAllocation.findOne({ where: { callId } }),
    committedHours({ callId, semesterCode: call.semesterCode }),
  ]);
  const normalised = normaliseGrades(grades.map((g) => ({ proposalId: g.proposalId as number, reviewerId: g.reviewerId as number, overall: Number(g.overall) })));
  const scoreOf = new Map(normalised.proposals.map((p) => [p.proposalId, p]));
  const entryOf = new Map(entries.map((e) => [e.proposalId as number, e]));
  const institutionOf = new Map(pis.map((u) => [u.id, u.institution]));

  const rows = [];
  for (const p of proposals) {
    let requested: HoursCell[] = [];
    let requestedError: string | null = null;
    const sheet = computed.get(p.id);
    if (sheet && !(sheet instanceof Error)) {
      sheets?.set(p.id, sheet);
      requested = sheet.totals.map((t) => ({ telescopeId: t.telescopeId, moonCategory: t.moonCategory, semesterCode: t.semesterCode, hours: t.hours }));
    } else {
      console.error(`feasibility sheet of proposal ${p.id} failed`, sheet);
      requestedError = "The feasibility sheet could not be computed; requested hours unknown.";
    }
    const score = scoreOf.get(p.id);
    const entry = entryOf.get(p.id);
    rows.push({
      proposalId: p.id,
      code: p.code,
      title: p.title,
      category: p.scienceCategory,
      status: p.status,
      piInstitution: institutionOf.get(p.createdById as number) ?? null,
      reviews: score?.reviews ?? 0,
      rawMean: score?.rawMean ?? null,
      normalisedScore: score?.normalisedScore ?? null,
      normalisedZ: score?.normalisedZ ?? null,
      zScores: score?.zScores ?? [],
      spread: score?.spread ?? null,
      disagreement: score?.disagreement ?? false,
      fallbackReviewerIds: score?.fallbackReviewerIds ?? [],
      computedRank: score?.computedRank ?? null,
      chairRank: entry?.chairRank ?? null,
      chairRankReason: entry?.chairRankReason ?? null,
      tier: entry?.tier ?? null,
      waitlisted: entry?.waitlisted ?? false,
      allocatedByHand: entry?.allocatedByHand ?? false,
      requested,
      requestedError,
      reviewDuty: null as ReviewDuty | null,
      rankWithheld: null as string | null,
      allocation: allocations
        .filter((a) => a.proposalId === p.id)
        .map((a) => ({ telescopeId: a.telescopeId as number, moonCategory: a.moonCategory, semesterCode: a.semesterCode, hours: a.hours })),
    });
  }
  applyReviewDuty(rows, await reviewDuties({ callId })); // distributed review: late teams flagged (or unranked)
  // Proposals without a submitted review (or whose rank is withheld) sort last.
  rows.sort((a, b) => (a.computedRank ?? Infinity) - (b.computedRank ?? Infinity) || a.proposalId - b.proposalId);

  const requestedByCell = new Map<string, number>();
  for (const row of rows) for (const r of row.requested) {
    if (r.semesterCode !== call.semesterCode) continue;
    const key = cellKey(r.telescopeId, r.moonCategory);
    requestedByCell.set(key, (requestedByCell.get(key) ?? 0) + r.hours);
  }
  const oversubscription = (call.offers ?? [])
    .slice()
    .sort((a, b) => (a.telescopeId as number) - (b.telescopeId as number) || moonCategories.indexOf(a.moonCategory) - moonCategories.indexOf(b.moonCategory))
    .map((o) => {
      const key = cellKey(o.telescopeId as number, o.moonCategory);
      const requestedHours = requestedByCell.get(key) ?? 0;
      const committedHoursHere = committed.get(key) ?? 0;
      const offeredHours = Math.max(0, o.hoursOffered - committedHoursHere);
      return {
        telescopeId: o.telescopeId as number,
        moonCategory: o.moonCategory,
        requestedHours,
        offeredHours,
        committedHours: committedHoursHere,
        ratio: offeredHours > 0 ? requestedHours / offeredHours : null,
      };
    });

  return {
    call: { id: call.id, semesterCode: call.semesterCode, semesterStart: call.semesterStart, semesterEnd: call.semesterEnd },
    panel: normalised.panel,
    reviewers: normalised.reviewers,
    locked: Boolean(allocation?.lockedAt),
    settings: { assuredShareLimit: allocation?.assuredShareLimit ?? 0.8, fillerMargin: allocation?.fillerMargin ?? 0.3 },
    proposals: await blankTeamsUntilRevealed(callId, rows), // dual-anonymous: no PI institution before the reveal
    oversubscription,
  };
}

export type BoardRow = Awaited<ReturnType<typeof callBoard>>["proposals"][number];

type Scored = { reviews: number; rawMean: number | null; normalisedScore: number | null; normalisedZ: number | null; zScores: number[]; spread: number | null; disagreement: boolean; fallbackReviewerIds: number[]; computedRank: number | null };
/** `R`'s own `rankInterval` and `probabilityAboveLine`, when it has them, must admit null. */
export type WithheldRow<R> = Omit<R, keyof Scored> & {
  reviews: number | null;
  rawMean: number | null;
  normalisedScore: number | null;
  normalisedZ: number | null;
  zScores: number[];
  spread: number | null;
  disagreement: boolean | null;
  fallbackReviewerIds: number[];
  computedRank: number | null;
  /** the conflicted chair's message in place of the grades and what follows from them; null otherwise */
  withheld: string | null;
};

/**
 * The board's rows as a chair with `conflicts` may read them: a conflicted proposal keeps its code,
 * title, requested and allocated hours, tier and position, and loses its grades, scores, computed
 * rank (it follows from them) and bootstrap figures. Apply after the numbers that need every
 * grade (the bootstrap, fill by rank) are computed.
 */
export function withholdConflicted<R extends Scored & { proposalId: number }>(rows: readonly R[], conflicts: ChairConflicts): WithheldRow<R>[] {
  const ranks = visibleComputedRanks(rows, conflicts);
  return rows.map((row) => {
    if (!conflicts.has(row.proposalId)) return { ...row, computedRank: ranks.get(row.proposalId) ?? null, withheld: null } as WithheldRow<R>;
    const out: Record<string, unknown> = {
      ...row,
      reviews: null,
      rawMean: null,
      normalisedScore: null,
      normalisedZ: null,
      zScores: [],
      spread: null,
      disagreement: null,
      fallbackReviewerIds: [],
      computedRank: null,
      withheld: CONFLICT_WITHHELD,
    };
    if ("rankInterval" in row) out.rankInterval = null;
    if ("probabilityAboveLine" in row) out.probabilityAboveLine = null;
    return out as WithheldRow<R>;
  });
}

/**
 * `rows` (in the board's order) as a chair with `conflicts` reads them: the proposals they are
 * conflicted on last, by proposal id. Where such a proposal sits, among the others or among
 * themselves, would tell its grades.
 */
export function conflictedLast<R extends { proposalId: number }>(rows: readonly R[], conflicts: ChairConflicts): R[] {
  if (conflicts.size === 0) return [...rows];
  return [...rows.filter((r) => !conflicts.has(r.proposalId)), ...rows.filter((r) => conflicts.has(r.proposalId)).sort((a, b) => a.proposalId - b.proposalId)];
}

/**
 * Each proposal's computed rank among those the chair with `conflicts` may see (1 + how many of
 * them rank higher): a gap in the ranks shown would tell a conflicted proposal's. Null for a
 * conflicted or unranked proposal.
 */
export function visibleComputedRanks(rows: readonly { proposalId: number; computedRank: number | null }[], conflicts: ChairConflicts): Map<number, number | null> {
  const shown = rows.filter((r) => !conflicts.has(r.proposalId) && r.computedRank !== null).map((r) => r.computedRank!);
  return new Map(rows.map((r) => [r.proposalId, conflicts.has(r.proposalId) || r.computedRank === null ? null : 1 + shown.filter((x) => x < r.computedRank!).length]));
}
