// The office's calls: dates, rules and the hours each telescope offers per moon category; and the
// public list of calls not yet closed. Every change and its audit entry are one transaction.
import { Refusal } from "~/lib/forms";
import { Op, UniqueConstraintError, type Transaction } from "sequelize";
import { callPhase, type CallPhase } from "~/lib/call-phase";
import { currentCallsWhere } from "~/lib/call-phase.server";
import { moonCategories, type MoonCategory } from "~/lib/domain";
import type { CallInput } from "~/lib/schemas/office";
import { Call, CallOffer, Proposal, sequelize, Telescope } from "~/models/index.server";
import { audit, changes, notFound, type Actor } from "./shared.server";

type OfferGrid = Record<number, Record<MoonCategory, number>>;

function offerGrid(offers: CallOffer[]): OfferGrid {
  const grid: OfferGrid = {};
  for (const o of offers) {
    grid[o.telescopeId] ??= { dark: 0, grey: 0, bright: 0 };
    grid[o.telescopeId][o.moonCategory] = o.hoursOffered;
  }
  return grid;
}

function plainCall(c: Call) {
  return {
    id: c.id,
    semesterCode: c.semesterCode,
    title: c.title,
    opensAt: c.opensAt.toISOString(),
    deadlineAt: c.deadlineAt.toISOString(),
    semesterStart: c.semesterStart,
    semesterEnd: c.semesterEnd,
    pageLimit: c.pageLimit,
    currency: c.currency,
    accessFeePerHourCents: c.accessFeePerHourCents,
    pageChargeCents: c.pageChargeCents,
    teamVisibility: c.teamVisibility,
    reviewMode: c.reviewMode,
    reviewsPerSubmitter: c.reviewsPerSubmitter,
    separateCompetitors: c.separateCompetitors,
    unreviewedPolicy: c.unreviewedPolicy,
  };
}

export async function listCalls() {
  const calls = await Call.findAll({ include: [{ model: CallOffer, as: "offers" }], order: [["semesterStart", "DESC"]] });
  const proposals = await Proposal.count({ group: ["callId"] });
  const perCall = new Map(proposals.map((p) => [Number((p as unknown as { callId: number }).callId), Number(p.count)]));
  return calls.map((c) => ({
    ...plainCall(c),
    hoursOffered: (c.offers ?? []).reduce((sum, o) => sum + o.hoursOffered, 0),
    telescopes: new Set((c.offers ?? []).filter((o) => o.hoursOffered > 0).map((o) => o.telescopeId)).size,
    proposals: perCall.get(c.id) ?? 0,
  }));
}

export async function getCall({ callId }: { callId: number }) {
  const call = await Call.findByPk(callId, { include: [{ model: CallOffer, as: "offers" }] });
  if (!call) notFound("call");
  return { ...plainCall(call), offers: offerGrid(call.offers ?? []) };
}

function semesterTaken(code: string) {
  return new Refusal(`Semester ${code} already has a call; edit that one, or choose another semester.`, { field: "semesterCode" });
}

async function writeOffers(callId: number, offers: CallInput["offers"], transaction: Transaction) {
  const ids = [...new Set(offers.map((o) => o.telescopeId))];
  const known = await Telescope.count({ where: { id: ids }, transaction });
  if (known !== ids.length) throw new Refusal("One of the telescopes in the grid no longer exists; reload the page.", { field: "offers" });
  await CallOffer.destroy({ where: { callId }, transaction });
  // Cells of zero hours are not stored: a telescope with no hours is simply not part of the call.
  const rows = offers.filter((o) => o.hoursOffered > 0).map((o) => ({ ...o, callId }));
  if (rows.length) await CallOffer.bulkCreate(rows, { transaction });
}

function offersForAudit(offers: CallInput["offers"]) {
  const grid: Record<string, number> = {};
  for (const o of offers) if (o.hoursOffered > 0) grid[`${o.telescopeId}.${o.moonCategory}`] = o.hoursOffered;
  return grid;
}

export async function createCall({ actor, values }: { actor: Actor; values: CallInput }) {
  const { offers, ...fields } = values;
  try {
    return await sequelize.transaction(async (transaction) => {
      if (await Call.count({ where: { semesterCode: fields.semesterCode }, transaction })) throw semesterTaken(fields.semesterCode);
      const call = await Call.create(fields, { transaction });
      await writeOffers(call.id, offers, transaction);
      await audit(transaction, actor, "call.created", "call", call.id, {
        values: { ...fields, opensAt: fields.opensAt.toISOString(), deadlineAt: fields.deadlineAt.toISOString() },
        offers: offersForAudit(offers),
      });
      return call.id;
    });
  } catch (error) {
    if (error instanceof UniqueConstraintError) throw semesterTaken(fields.semesterCode);
    throw error;
  }
}

export async function updateCall({ actor, callId, values }: { actor: Actor; callId: number; values: CallInput }) {
  const { offers, ...fields } = values;
  try {
    return await sequelize.transaction(async (transaction) => {
      const call = await Call.findByPk(callId, {
        include: [{ model: CallOffer, as: "offers" }],
        transaction,
        lock: transaction.LOCK.UPDATE,
      });
      if (!call) notFound("call");
      if (fields.semesterCode !== call.semesterCode) {
        if (await Call.count({ where: { semesterCode: fields.semesterCode }, transaction })) throw semesterTaken(fields.semesterCode);
        const coded = await Proposal.count({ where: { callId, code: { [Op.ne]: null } }, transaction });
        if (coded) {
          throw new Refusal(`The semester code cannot change: ${coded} submitted proposal${coded === 1 ? " carries" : "s carry"} ${call.semesterCode} in ${coded === 1 ? "its" : "their"} code.`, { field: "semesterCode" });
        }
      }
      // distributed review: the teams name their reviewer before they submit, so the mode is fixed once one has
      if (fields.reviewMode && fields.reviewMode !== call.reviewMode) {
        const sent = await Proposal.count({ where: { callId, status: { [Op.ne]: "draft" } }, transaction });
        if (sent) throw new Refusal(`Who reviews cannot change: ${sent} proposal${sent === 1 ? " was" : "s were"} already submitted under the current rule.`, { field: "reviewMode" });
      }
      const before = offersForAudit(
        (call.offers ?? []).map((o) => ({ telescopeId: o.telescopeId, moonCategory: o.moonCategory, hoursOffered: o.hoursOffered })),
      );
      const after = offersForAudit(offers);
      const changed = changes(call.get({ plain: true }) as unknown as Record<string, unknown>, fields);
      const offersChanged = JSON.stringify(Object.entries(before).sort()) !== JSON.stringify(Object.entries(after).sort());
      if (!Object.keys(changed).length && !offersChanged) return { changed: false };
      await call.update(fields, { transaction });
      if (offersChanged) await writeOffers(callId, offers, transaction);
      await audit(transaction, actor, "call.updated", "call", callId, {
        changes: changed,
        ...(offersChanged ? { offers: [before, after] } : {}),
      });
      return { changed: true };
    });
  } catch (error) {
    if (error instanceof UniqueConstraintError) throw semesterTaken(fields.semesterCode);
    throw error;
  }
}

/** Calls whose deadline has not passed (open, or announced with a later opening), for everyone. */
export async function listPublicCalls({ now = new Date() }: { now?: Date } = {}) {
  const calls = await Call.findAll({
    where: currentCallsWhere(now),
    include: [{ model: CallOffer, as: "offers", include: [{ model: Telescope, as: "telescope" }] }],
    order: [["deadlineAt", "ASC"]],
  });
  return calls.map((c) => {
    const telescopes = new Map<number, { id: number; name: string; siteName: string; timeZone: string; apertureM: number; hours: Record<MoonCategory, number> }>();
    for (const o of c.offers ?? []) {
      const t = o.telescope!;
      if (!telescopes.has(t.id)) {
        telescopes.set(t.id, {
          id: t.id,
          name: t.name,
          siteName: t.siteName,
          timeZone: t.timeZone,
          apertureM: t.apertureM,
          hours: Object.fromEntries(moonCategories.map((m) => [m, 0])) as Record<MoonCategory, number>,
        });
      }
      telescopes.get(t.id)!.hours[o.moonCategory] += o.hoursOffered;
    }
    const list = [...telescopes.values()].sort((a, b) => b.apertureM - a.apertureM);
    return {
      ...plainCall(c),
      status: callPhase(c, now) as Exclude<CallPhase, "closed">,
      telescopes: list,
      timeZones: [...new Set(list.map((t) => t.timeZone))],
    };
  });
}
