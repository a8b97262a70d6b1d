// The observatory office's set-up: telescopes, their instruments and filters, and calls.
// Every change and its audit entry are one transaction; refusals are Refusal with the field
// the message belongs to, never a database error surfacing as a 500.
import { Refusal } from "~/lib/forms";
import { ForeignKeyConstraintError, Op, UniqueConstraintError, type Transaction } from "sequelize";
import { callPhase, type CallPhase } from "~/lib/call-phase";
import { currentCallsWhere } from "~/lib/call-phase.server";
import { moonCategories, type MoonCategory } from "~/lib/domain";
import type { CallInput, FilterInput, InstrumentInput, TelescopeInput } from "~/lib/schemas/office";
import { Call, CallOffer, Filter, Instrument, Observation, Proposal, sequelize, Telescope } from "~/models/index.server";
import { writeAudit } from "../audit.server";
import type { SessionUser } from "../auth/auth.server";

type Actor = Pick<SessionUser, "id">;

/** Field → [before, after] for what an update changed (the audit entry's details). */
function changes<T extends Record<string, unknown>>(before: T, after: Partial<T>) {
  const out: Record<string, [unknown, unknown]> = {};
  for (const [key, value] of Object.entries(after)) {
    const old = before[key];
    const same = old instanceof Date && value instanceof Date ? old.getTime() === value.getTime() : old === value;
    if (!same) out[key] = [old instanceof Date ? old.toISOString() : old, value instanceof Date ? value.toISOString() : value];
  }
  return out;
}

async function audit(
  transaction: Transaction,
  actor: Actor,
  action: string,
  entityType: string,
  entityId: number,
  details: Record<string, unknown>,
) {
  await writeAudit({ actorId: actor.id, action, entityType, entityId, details }, transaction);
}

function notFound(what: string): never {
  throw new Refusal(`That ${what} does not exist (it may have been deleted).`, { status: 404, field: "form" });
}

// ---------------------------------------------------------------- telescopes

export async function listTelescopes() {
  const telescopes = await Telescope.findAll({
    include: [{ model: Instrument, as: "instruments", attributes: ["id", "name"] }],
    order: [["name", "ASC"]],
  });
  return telescopes.map((t) => ({
    ...plainTelescope(t),
    instruments: (t.instruments ?? []).map((i) => ({ id: i.id, name: i.name })),
  }));
}

function plainTelescope(t: Telescope) {
  return {
    id: t.id,
    name: t.name,
    siteName: t.siteName,
    latitudeDeg: t.latitudeDeg,
    longitudeDeg: t.longitudeDeg,
    elevationM: t.elevationM,
    timeZone: t.timeZone,
    apertureM: t.apertureM,
    centralObstruction: t.centralObstruction,
    updatedAt: t.updatedAt.toISOString(),
  };
}

/** An instrument as plain JSON-able data (for loaders and the feasibility computation). */
export function plainInstrument(i: Instrument) {
  return {
    id: i.id,
    telescopeId: i.telescopeId,
    name: i.name,
    pixelScaleArcsec: i.pixelScaleArcsec,
    readNoiseE: i.readNoiseE,
    darkEPerPixelPerS: i.darkEPerPixelPerS,
    gainEPerAdu: i.gainEPerAdu,
    fullWellE: i.fullWellE,
    readoutSeconds: i.readoutSeconds,
    acquisitionSeconds: i.acquisitionSeconds,
    astrometricFloorMas: i.astrometricFloorMas,
    throughput: i.throughput,
  };
}

function plainFilter(f: Filter) {
  return {
    id: f.id,
    band: f.band,
    zeroPointPhotons: f.zeroPointPhotons,
    extinctionMagPerAirmass: f.extinctionMagPerAirmass,
    skyDarkMag: f.skyDarkMag,
    skyGreyMag: f.skyGreyMag,
    skyBrightMag: f.skyBrightMag,
  };
}

export async function getTelescope({ telescopeId }: { telescopeId: number }) {
  const telescope = await Telescope.findByPk(telescopeId, {
    include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters", attributes: ["id", "band"] }] }],
    order: [[{ model: Instrument, as: "instruments" }, "name", "ASC"]],
  });
  if (!telescope) notFound("telescope");
  return {
    ...plainTelescope(telescope),
    instruments: (telescope.instruments ?? []).map((i) => ({
      ...plainInstrument(i),
      bands: (i.filters ?? []).map((f) => f.band).sort(),
    })),
  };
}

async function uniqueName<T>(work: () => Promise<T>, field: string, message: string) {
  try {
    return await work();
  } catch (error) {
    if (error instanceof UniqueConstraintError) throw new Refusal(message, { field: field });
    throw error;
  }
}

export async function createTelescope({ actor, values }: { actor: Actor; values: TelescopeInput }) {
  return uniqueName(
    () =>
      sequelize.transaction(async (transaction) => {
        const telescope = await Telescope.create(values, { transaction });
        await audit(transaction, actor, "telescope.created", "telescope", telescope.id, { values });
        return telescope.id;
      }),
    "name",
    `A telescope called “${values.name}” already exists.`,
  );
}

export async function updateTelescope({ actor, telescopeId, values }: { actor: Actor; telescopeId: number; values: TelescopeInput }) {
  return uniqueName(
    () =>
      sequelize.transaction(async (transaction) => {
        const telescope = await Telescope.findByPk(telescopeId, { transaction, lock: transaction.LOCK.UPDATE });
        if (!telescope) notFound("telescope");
        const changed = changes(telescope.get({ plain: true }), values);
        if (!Object.keys(changed).length) return { changed: false };
        await telescope.update(values, { transaction });
        await audit(transaction, actor, "telescope.updated", "telescope", telescope.id, { changes: changed });
        return { changed: true };
      }),
    "name",
    `A telescope called “${values.name}” already exists.`,
  );
}

async function observationsUsing(where: { instrumentId?: number | number[]; filterId?: number }, transaction: Transaction) {
  return Observation.count({ where, transaction });
}

function inUse(what: string, observations: number, extra = "") {
  return new Refusal(`${what} cannot be deleted: ${observations} observation${observations === 1 ? "" : "s"} in proposals use${observations === 1 ? "s" : ""} it${extra}. Change those observations first, or keep it.`);
}

export async function deleteTelescope({ actor, telescopeId }: { actor: Actor; telescopeId: number }) {
  try {
    return await sequelize.transaction(async (transaction) => {
      const telescope = await Telescope.findByPk(telescopeId, { transaction, lock: transaction.LOCK.UPDATE });
      if (!telescope) notFound("telescope");
      const offers = await CallOffer.findAll({
        where: { telescopeId },
        include: [{ model: Call, as: "call", attributes: ["semesterCode"] }],
        transaction,
      });
      if (offers.length) {
        const codes = [...new Set(offers.map((o) => (o as CallOffer & { call?: Call }).call?.semesterCode))].join(", ");
        throw new Refusal(`${telescope.name} cannot be deleted: the call${codes.includes(",") ? "s" : ""} ${codes} offer${codes.includes(",") ? "" : "s"} hours on it. Remove those offers first.`);
      }
      const instrumentIds = (await Instrument.findAll({ where: { telescopeId }, attributes: ["id"], transaction })).map((i) => i.id);
      const used = instrumentIds.length ? await observationsUsing({ instrumentId: instrumentIds }, transaction) : 0;
      if (used) throw inUse(telescope.name, used, " (through its instruments)");
      await telescope.destroy({ transaction });
      await audit(transaction, actor, "telescope.deleted", "telescope", telescopeId, { name: telescope.name });
      return { name: telescope.name };
    });
  } catch (error) {
    if (error instanceof ForeignKeyConstraintError) throw new Refusal("That telescope is still in use and cannot be deleted.");
    throw error;
  }
}

/** The zone the office works in: the one most of the telescopes keep (UTC when none is set up). */
export async function observatoryTimeZone() {
  const rows = await Telescope.findAll({ attributes: ["timeZone"] });
  const counts = new Map<string, number>();
  for (const r of rows) counts.set(r.timeZone, (counts.get(r.timeZone) ?? 0) + 1);
  return [...counts.entries()].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))[0]?.[0] ?? "UTC";
}

// ---------------------------------------------------------------- instruments

export async function getInstrument({ instrumentId }: { instrumentId: number }) {
  const instrument = await Instrument.findByPk(instrumentId, {
    include: [
      { model: Filter, as: "filters" },
      { model: Telescope, as: "telescope", attributes: ["id", "name", "apertureM"] },
    ],
    order: [[{ model: Filter, as: "filters" }, "id", "ASC"]],
  });
  if (!instrument) notFound("instrument");
  const used = await Observation.count({ where: { instrumentId } });
  return {
    ...plainInstrument(instrument),
    telescope: { id: instrument.telescope!.id, name: instrument.telescope!.name },
    observations: used,
    filters: (instrument.filters ?? []).map(plainFilter),
  };
}

export async function createInstrument({ actor, telescopeId, values }: { actor: Actor; telescopeId: number; values: InstrumentInput }) {
  return sequelize.transaction(async (transaction) => {
    const telescope = await Telescope.findByPk(telescopeId, { transaction });
    if (!telescope) notFound("telescope");
    const clash = await Instrument.count({ where: { telescopeId, name: values.name }, transaction });
    if (clash) throw new Refusal(`${telescope.name} already has an instrument called “${values.name}”.`, { field: "name" });
    const instrument = await Instrument.create({ ...values, telescopeId }, { transaction });
    await audit(transaction, actor, "instrument.created", "instrument", instrument.id, { telescopeId, values });
    return instrument.id;
  });
}

export async function updateInstrument({ actor, instrumentId, values }: { actor: Actor; instrumentId: number; values: InstrumentInput }) {
  return sequelize.transaction(async (transaction) => {
    const instrument = await Instrument.findByPk(instrumentId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!instrument) notFound("instrument");
    const clash = await Instrument.count({
      where: { telescopeId: instrument.telescopeId, name: values.name, id: { [Op.ne]: instrumentId } },
      transaction,
    });
    if (clash) throw new Refusal(`This telescope already has an instrument called “${values.name}”.`, { field: "name" });
    const changed = changes(instrument.get({ plain: true }), values);
    if (!Object.keys(changed).length) return { changed: false };
    await instrument.update(values, { transaction });
    await audit(transaction, actor, "instrument.updated", "instrument", instrumentId, { changes: changed });
    return { changed: true };
  });
}

export async function deleteInstrument({ actor, instrumentId }: { actor: Actor; instrumentId: number }) {
  try {
    return await sequelize.transaction(async (transaction) => {
      const instrument = await Instrument.findByPk(instrumentId, { transaction, lock: transaction.LOCK.UPDATE });
      if (!instrument) notFound("instrument");
      const used = await observationsUsing({ instrumentId }, transaction);
      if (used) throw inUse(instrument.name, used);
      await instrument.destroy({ transaction });
      await audit(transaction, actor, "instrument.deleted", "instrument", instrumentId, {
        name: instrument.name,
        telescopeId: instrument.telescopeId,
      });
      return { telescopeId: instrument.telescopeId, name: instrument.name };
    });
  } catch (error) {
    if (error instanceof ForeignKeyConstraintError) throw new Refusal("That instrument is still in use and cannot be deleted.");
    throw error;
  }
}

// ---------------------------------------------------------------- filters

function bandTaken(band: string) {
  return new Refusal(`This instrument already has a ${band} filter.`, { field: "band" });
}

export async function createFilter({ actor, instrumentId, values }: { actor: Actor; instrumentId: number; values: FilterInput }) {
  return uniqueName(
    () =>
      sequelize.transaction(async (transaction) => {
        const instrument = await Instrument.findByPk(instrumentId, { transaction });
        if (!instrument) notFound("instrument");
        const filter = await Filter.create({ ...values, instrumentId }, { transaction });
        await audit(transaction, actor, "filter.created", "filter", filter.id, { instrumentId, values });
        return filter.id;
      }),
    "band",
    bandTaken(values.band).message,
  );
}

async function filterOf(instrumentId: number, filterId: number, transaction: Transaction) {
  const filter = await Filter.findOne({ where: { id: filterId, instrumentId }, transaction, lock: transaction.LOCK.UPDATE });
  if (!filter) notFound("filter");
  return filter;
}

export async function updateFilter({
  actor,
  instrumentId,
  filterId,
  values,
}: {
  actor: Actor;
  instrumentId: number;
  filterId: number;
  values: FilterInput;
}) {
  return uniqueName(
    () =>
      sequelize.transaction(async (transaction) => {
        const filter = await filterOf(instrumentId, filterId, transaction);
        const changed = changes(filter.get({ plain: true }), values);
        if (!Object.keys(changed).length) return { changed: false };
        await filter.update(values, { transaction });
        await audit(transaction, actor, "filter.updated", "filter", filterId, { instrumentId, changes: changed });
        return { changed: true };
      }),
    "band",
    bandTaken(values.band).message,
  );
}

export async function deleteFilter({ actor, instrumentId, filterId }: { actor: Actor; instrumentId: number; filterId: number }) {
  try {
    return await sequelize.transaction(async (transaction) => {
      const filter = await filterOf(instrumentId, filterId, transaction);
      const used = await observationsUsing({ filterId }, transaction);
      if (used) throw inUse(`The ${filter.band} filter`, used);
      await filter.destroy({ transaction });
      await audit(transaction, actor, "filter.deleted", "filter", filterId, { instrumentId, band: filter.band });
      return { band: filter.band };
    });
  } catch (error) {
    if (error instanceof ForeignKeyConstraintError) throw new Refusal("That filter is still in use and cannot be deleted.");
    throw error;
  }
}

// ---------------------------------------------------------------- calls

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
