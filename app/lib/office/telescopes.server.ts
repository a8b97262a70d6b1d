// The office's telescopes. Every change and its audit entry are one transaction; refusals are
// Refusal with the field the message belongs to, never a database error surfacing as a 500.
import { Refusal } from "~/lib/forms";
import { ForeignKeyConstraintError } from "sequelize";
import type { TelescopeInput } from "~/lib/schemas/office";
import { Call, CallOffer, Filter, Instrument, sequelize, Telescope } from "~/models/index.server";
import { plainInstrument } from "./instruments.server";
import { audit, changes, inUse, notFound, observationsUsing, uniqueName, type Actor } from "./shared.server";

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

/** The telescopes as sites and optics, for the public sky tools. */
export async function telescopeSites() {
  return (await Telescope.findAll({ order: [["name", "ASC"]] })).map(plainTelescope);
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
