// The chair's changes to a call's allocation: positions on the board (with a required reason),
// hours and tiers, the lock and the unlock. Every change is one transaction with its audit row,
// and a change to a locked allocation is refused with a 409.
import { Refusal } from "~/lib/forms";
import { Op, type Transaction } from "sequelize";
import { writeAudit } from "~/lib/audit.server";
import type { AllocationTier, MoonCategory } from "~/lib/domain";
import { callNotFound } from "~/lib/review/chair.server";
import { chairConflicts, conflictRefusal, refuseConflicted } from "~/lib/review/chair-conflicts.server";
import { Allocation, AuditEntry, BoardEntry, Call, CallAllocation, CallOffer, DecisionLetter, Proposal, sequelize } from "~/models/index.server";
import { BOARD_STATES, callBoard, conflictedLast } from "./board.server";
import { boardOrder, fillByRank } from "./fill";

type Chair = { id: number };
export type AllocationRow = { proposalId: number; telescopeId: number; moonCategory: MoonCategory; semesterCode: string; hours: number };
export type TierRow = { proposalId: number; tier: AllocationTier | null; waitlisted?: boolean };

const lockedRefusal = () => new Refusal("The allocation is locked. The chair must unlock it, with a reason, before anything changes.", { status: 409, field: "allocation" });

/**
 * The call's allocation row exists before a transaction locks it. Created inside the transactions,
 * two first changes of a call raced to insert it (duplicate key or deadlock, a 500); created here,
 * outside them, they queue on its row lock instead.
 */
async function ensureAllocationRow(callId: number) {
  if ((await CallAllocation.count({ where: { callId } })) > 0 || (await Call.count({ where: { id: callId } })) === 0) return;
  await CallAllocation.bulkCreate([{ callId, lockedAt: null, lockedById: null }], { ignoreDuplicates: true });
}

/**
 * The call's allocation row, locked for this transaction; refuses when the allocation is locked.
 * The lock is the transaction's first read, so its snapshot (REPEATABLE READ) starts after the
 * previous holder's commit and sees that holder's board entries.
 */
async function openAllocation(callId: number, transaction: Transaction, { mustBeUnlocked = true } = {}) {
  const allocation = await CallAllocation.findOne({ where: { callId }, transaction, lock: transaction.LOCK.UPDATE });
  const call = allocation ? await Call.findByPk(callId, { transaction }) : null;
  if (!allocation || !call) callNotFound();
  if (mustBeUnlocked && allocation.lockedAt) {
    throw lockedRefusal();
  }
  return { call, allocation };
}

async function boardProposal(callId: number, proposalId: number, transaction: Transaction, field = "proposalId") {
  const proposal = await Proposal.findOne({ where: { id: proposalId, callId, status: { [Op.in]: [...BOARD_STATES] } }, transaction });
  if (!proposal) throw new Refusal(`Proposal ${proposalId} is not on this call's board.`, { status: 400, field: field });
  return proposal;
}

/**
 * The allocation's version: the id of its last audited change (save, fill, lock, unlock), 0 before
 * the first. The allocation page saves the whole sheet, so it sends the version it was read at.
 */
export async function allocationVersion(callId: number, transaction?: Transaction): Promise<number> {
  const last = await AuditEntry.max("id", { where: { entityType: "call", entityId: callId, action: { [Op.in]: ["allocation.saved", "allocation.locked", "allocation.unlocked"] } }, transaction });
  return typeof last === "number" ? last : Number(last ?? 0);
}

/** Moves a proposal to `chairRank` (null returns it to its computed rank), with a reason. */
export async function moveOnBoard({ actor, callId, proposalId, chairRank, reason }: { actor: Chair; callId: number; proposalId: number; chairRank: number | null; reason: string }) {
  await ensureAllocationRow(callId);
  return sequelize.transaction(async (transaction) => {
    await openAllocation(callId, transaction);
    const proposal = await boardProposal(callId, proposalId, transaction);
    refuseConflicted(await chairConflicts({ callId, chair: actor, transaction }), [proposalId], "move it on the board");
    const [entry] = await BoardEntry.findOrCreate({ where: { proposalId }, defaults: { callId, proposalId, chairRank: null, chairRankReason: null, tier: null }, transaction });
    const from = entry.chairRank;
    await entry.update({ chairRank, chairRankReason: chairRank === null ? null : reason, chairRankById: chairRank === null ? null : actor.id }, { transaction });
    await writeAudit({ actorId: actor.id, action: "board.rank_moved", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { from, to: chairRank, reason } }, transaction);
    return { proposalId, chairRank };
  });
}

/** A proposal's hours as one comparable text (cells with hours, sorted; hours to 1e-6 h). */
function hoursText(rows: { telescopeId: number; moonCategory: string; semesterCode: string; hours: number }[]) {
  return rows
    .filter((r) => r.hours > 0)
    .map((r) => `${r.telescopeId}|${r.moonCategory}|${r.semesterCode}|${Math.round(r.hours * 1e6)}`)
    .sort()
    .join(",");
}

/**
 * Replaces the allocation of every proposal named in `rows` or `tiers`: its hours per telescope ×
 * moon category × semester (the call's own, or a later one the proposal asks for) and its tier.
 * `by: "hand"` (the page, the API): a proposal whose hours, tier or waitlist this changes is marked
 * as set by hand, which fill by rank then keeps; `by: "fill"` clears the mark of those it names.
 */
export async function saveAllocation({ actor, callId, rows, tiers, basedOn, by = "hand" }: { actor: Chair; callId: number; rows: AllocationRow[]; tiers: TierRow[]; basedOn?: number; by?: "hand" | "fill" }) {
  await ensureAllocationRow(callId);
  return sequelize.transaction(async (transaction) => {
    const { call } = await openAllocation(callId, transaction);
    if (basedOn !== undefined && (await allocationVersion(callId, transaction)) !== basedOn) {
      throw new Refusal("Someone saved this allocation after you opened the page, so yours was not saved (it would have replaced theirs). Your values are still here: note them, reload, and enter them again.", { status: 409, field: "form" });
    }
    const offers = await CallOffer.findAll({ where: { callId }, transaction });
    const offered = new Set(offers.map((o) => `${o.telescopeId}|${o.moonCategory}`));
    const proposalIds = [...new Set([...rows.map((r) => r.proposalId), ...tiers.map((t) => t.proposalId)])];
    const proposals = new Map<number, Proposal>();
    // the field named is the first row (else tier) that names the proposal
    const pathOf = (id: number) => (rows.some((r) => r.proposalId === id) ? `rows.${rows.findIndex((r) => r.proposalId === id)}` : `tiers.${tiers.findIndex((t) => t.proposalId === id)}`);
    for (const id of proposalIds) proposals.set(id, await boardProposal(callId, id, transaction, `${pathOf(id)}.proposalId`));
    const tiered = new Set<number>();
    for (const [i, t] of tiers.entries()) {
      if (tiered.has(t.proposalId)) throw new Refusal("The same proposal appears twice among the tiers.", { status: 400, field: `tiers.${i}.proposalId` });
      tiered.add(t.proposalId);
    }
    const seen = new Set<string>();
    for (const [i, row] of rows.entries()) {
      if (!offered.has(`${row.telescopeId}|${row.moonCategory}`)) throw new Refusal(`The call offers no ${row.moonCategory} time on telescope ${row.telescopeId}.`, { status: 400, field: `rows.${i}.telescopeId` });
      const allowed = [call.semesterCode, ...(proposals.get(row.proposalId)!.semestersRequested ?? [])];
      if (!allowed.includes(row.semesterCode)) throw new Refusal(`Semester ${row.semesterCode} is neither the call's nor one the proposal asks for (${allowed.join(", ")}).`, { status: 400, field: `rows.${i}.semesterCode` });
      const key = `${row.proposalId}|${row.telescopeId}|${row.moonCategory}|${row.semesterCode}`;
      if (seen.has(key)) throw new Refusal("The same proposal, telescope, moon category and semester appear twice.", { status: 400, field: `rows.${i}` });
      seen.add(key);
    }
    const stored = new Map((await BoardEntry.findAll({ where: { proposalId: { [Op.in]: proposalIds.length ? proposalIds : [0] } }, transaction })).map((e) => [e.proposalId as number, e]));
    const before = await Allocation.findAll({ where: { callId, proposalId: { [Op.in]: proposalIds.length ? proposalIds : [0] } }, transaction });
    const kept = rows.filter((r) => r.hours > 0);
    const changesOf = (id: number) => {
      const entry = stored.get(id);
      const given = tiers.find((t) => t.proposalId === id);
      return {
        tier: given !== undefined && given.tier !== (entry?.tier ?? null),
        waitlist: given?.waitlisted !== undefined && given.waitlisted !== (entry?.waitlisted ?? false),
        hours: hoursText(before.filter((a) => a.proposalId === id).map((a) => ({ ...a.get(), telescopeId: a.telescopeId as number }))) !== hoursText(kept.filter((r) => r.proposalId === id)),
      };
    };
    if (by === "hand") {
      // a conflicted chair's sheet carries the proposal as stored; any change to it is refused
      const conflicts = await chairConflicts({ callId, chair: actor, transaction });
      for (const id of proposalIds) {
        const c = conflicts.get(id);
        const changed = c ? changesOf(id) : null;
        if (c && changed && (changed.tier || changed.waitlist || changed.hours)) throw conflictRefusal(c, "change its hours, tier or waitlist", `${pathOf(id)}.proposalId`);
      }
    }
    // as on the page: hours need a tier and rule out the waitlist (a tier not sent stays as stored)
    for (const [i, row] of rows.entries()) {
      if (row.hours <= 0) continue;
      const given = tiers.find((t) => t.proposalId === row.proposalId);
      const tier = given ? given.tier : (stored.get(row.proposalId)?.tier ?? null);
      const waitlisted = given?.waitlisted ?? stored.get(row.proposalId)?.waitlisted ?? false;
      if (tier === null) throw new Refusal(`Proposal ${row.proposalId} has hours but no tier: give it assured, queue or filler.`, { status: 400, field: `rows.${i}.hours` });
      if (waitlisted) throw new Refusal(`Proposal ${row.proposalId} is waitlisted, so it has no hours: set them to 0 or take it off the waitlist.`, { status: 400, field: `rows.${i}.hours` });
    }
    await Allocation.destroy({ where: { callId, proposalId: { [Op.in]: proposalIds.length ? proposalIds : [0] } }, transaction });
    if (kept.length) await Allocation.bulkCreate(kept.map((r) => ({ ...r, callId })), { transaction });
    for (const id of proposalIds) {
      const entry = stored.get(id);
      const given = tiers.find((t) => t.proposalId === id);
      const changed = changesOf(id);
      const changedNow = changed.tier || changed.waitlist || changed.hours;
      const byHand = by === "fill" ? false : changedNow || (entry?.allocatedByHand ?? false);
      if (!given && byHand === (entry?.allocatedByHand ?? false) && !(byHand && changedNow)) continue;
      // the setter is whoever changed it last by hand; an unchanged row keeps its setter
      const byHandById = !byHand ? null : changedNow ? actor.id : (entry?.allocatedByHandById ?? null);
      const [row] = entry ? [entry] : await BoardEntry.findOrCreate({ where: { proposalId: id }, defaults: { callId, proposalId: id, chairRank: null, chairRankReason: null, tier: null }, transaction });
      await row.update({ ...(given ? { tier: given.tier, ...(given.waitlisted === undefined ? {} : { waitlisted: given.waitlisted }) } : {}), allocatedByHand: byHand, allocatedByHandById: byHandById }, { transaction });
    }
    await writeAudit({ actorId: actor.id, action: "allocation.saved", entityType: "call", entityId: callId, details: { proposals: proposalIds, rows: kept.length, hours: kept.reduce((s, r) => s + r.hours, 0) } }, transaction);
    return { proposals: proposalIds.length, rows: kept.length };
  });
}

/** Locks the allocation; outcomes follow: hours allocated → accepted, waitlisted by choice, the rest declined. */
export async function lockAllocation({ actor, callId, now = new Date() }: { actor: Chair; callId: number; now?: Date }) {
  await ensureAllocationRow(callId);
  return sequelize.transaction(async (transaction) => {
    const { allocation } = await openAllocation(callId, transaction);
    const proposals = await Proposal.findAll({ where: { callId, status: { [Op.in]: [...BOARD_STATES] } }, transaction, lock: transaction.LOCK.UPDATE });
    const hours = new Map<number, number>();
    for (const a of await Allocation.findAll({ where: { callId }, transaction })) hours.set(a.proposalId as number, (hours.get(a.proposalId as number) ?? 0) + a.hours);
    const waitlisted = new Set((await BoardEntry.findAll({ where: { callId, waitlisted: true }, transaction })).map((e) => e.proposalId as number));
    const outcomes = { accepted: 0, waitlisted: 0, declined: 0 };
    for (const p of proposals) {
      const status = (hours.get(p.id) ?? 0) > 0 ? "accepted" : waitlisted.has(p.id) ? "waitlisted" : "declined";
      outcomes[status] += 1;
      await p.update({ status }, { transaction });
    }
    await allocation.update({ lockedAt: now, lockedById: actor.id }, { transaction });
    await writeAudit({ actorId: actor.id, action: "allocation.locked", entityType: "call", entityId: callId, details: outcomes }, transaction);
    return { lockedAt: now.toISOString(), outcomes };
  });
}

/** Unlocks with a reason; the proposals go back to in review until the next lock. */
export async function unlockAllocation({ actor, callId, reason }: { actor: Chair; callId: number; reason: string }) {
  await ensureAllocationRow(callId);
  return sequelize.transaction(async (transaction) => {
    const { allocation } = await openAllocation(callId, transaction, { mustBeUnlocked: false });
    if (!allocation.lockedAt) throw new Refusal("The allocation is not locked.", { status: 409, field: "allocation" });
    const sent = await DecisionLetter.count({ where: { callId }, transaction });
    if (sent > 0) throw new Refusal(`The decisions have been sent (${sent} letter${sent === 1 ? "" : "s"}); the allocation stays locked.`, { status: 409, field: "allocation" });
    const proposals = await Proposal.findAll({ where: { callId, status: { [Op.in]: ["accepted", "waitlisted", "declined"] } }, transaction, lock: transaction.LOCK.UPDATE });
    for (const p of proposals) await p.update({ status: "in_review" }, { transaction });
    await allocation.update({ lockedAt: null, lockedById: null }, { transaction });
    await writeAudit({ actorId: actor.id, action: "allocation.unlocked", entityType: "call", entityId: callId, details: { reason, proposals: proposals.length } }, transaction);
    return { unlocked: true };
  });
}

/**
 * Fill by rank (see `fill.ts`) over the board's order, saved as the allocation to edit from. The
 * proposals the chair set by hand are kept as they are (their hours counted in the budgets) unless
 * `replaceHandSet`, the chair's explicit choice to fill those too. On a proposal the acting chair
 * is conflicted on, only what someone else set counts: a position or hand-set hours of this chair
 * (or of nobody known) are ignored and it is filled by its computed rank, and another chair's
 * hand-set hours stay even with `replaceHandSet`.
 */
export async function fillAllocationByRank({ actor, callId, replaceHandSet = false }: { actor: Chair; callId: number; replaceHandSet?: boolean }) {
  const [board, conflicts, entries] = await Promise.all([callBoard({ callId }), chairConflicts({ callId, chair: actor }), BoardEntry.findAll({ where: { callId } })]);
  if (board.locked) throw lockedRefusal(); // before computing the fill; saveAllocation checks again under the row lock
  const settings = await CallAllocation.findOne({ where: { callId } });
  const entryOf = new Map(entries.map((e) => [e.proposalId as number, e]));
  const setByOther = (id: number, by: number | null | undefined) => !conflicts.has(id) || (by !== null && by !== undefined && by !== actor.id);
  const rows = board.proposals.map((p) => (p.chairRank !== null && !setByOther(p.proposalId, entryOf.get(p.proposalId)?.chairRankById) ? { ...p, chairRank: null } : p));
  const handSet = (p: (typeof rows)[number]) => p.allocatedByHand && setByOther(p.proposalId, entryOf.get(p.proposalId)?.allocatedByHandById);
  const keep = (p: (typeof rows)[number]) => handSet(p) && (!replaceHandSet || conflicts.has(p.proposalId));
  const filled = fillByRank({
    semesterCode: board.call.semesterCode,
    offered: board.oversubscription.map((o) => ({ telescopeId: o.telescopeId, moonCategory: o.moonCategory, hours: o.offeredHours })),
    assuredShareLimit: settings?.assuredShareLimit ?? 0.8,
    fillerMargin: settings?.fillerMargin ?? 0.3,
    ranked: boardOrder(rows).filter((p) => !keep(p)).map((p) => ({ proposalId: p.proposalId, requested: p.requested })),
    kept: rows.filter(keep).map((p) => ({ proposalId: p.proposalId, tier: p.tier, allocated: p.allocation })),
  });
  const saveRows = filled.flatMap((f) => f.rows.map((r) => ({ proposalId: f.proposalId, ...r })));
  // a proposal the fill gives hours comes off the waitlist; one left without keeps its flag
  const saved = await saveAllocation({ actor, callId, rows: saveRows, tiers: filled.map((f) => ({ proposalId: f.proposalId, tier: f.tier, ...(f.tier === null ? {} : { waitlisted: false }) })), by: "fill" });
  // the proposals this chair is conflicted on last, by id: their order here would tell their grades
  return { ...saved, tiers: conflictedLast(filled, conflicts).map((f) => ({ proposalId: f.proposalId, tier: f.tier })), kept: conflictedLast(rows.filter(keep), conflicts).map((p) => p.proposalId) };
}
