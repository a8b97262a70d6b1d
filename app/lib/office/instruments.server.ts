// The office's instruments (each on one telescope). Every change and its audit entry are one
// transaction; refusals are Refusal with the field the message belongs to.
import { Refusal } from "~/lib/forms";
import { ForeignKeyConstraintError, Op } from "sequelize";
import type { InstrumentInput } from "~/lib/schemas/office";
import { Filter, Instrument, Observation, sequelize, Telescope } from "~/models/index.server";
import { plainFilter } from "./filters.server";
import { audit, changes, inUse, notFound, observationsUsing, type Actor } from "./shared.server";

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
