// The office's filters (each on one instrument, one per band). Every change and its audit entry
// are one transaction; refusals are Refusal with the field the message belongs to.
import { Refusal } from "~/lib/forms";
import { ForeignKeyConstraintError, type Transaction } from "sequelize";
import type { FilterInput } from "~/lib/schemas/office";
import { Filter, Instrument, sequelize } from "~/models/index.server";
import { audit, changes, inUse, notFound, observationsUsing, uniqueName, type Actor } from "./shared.server";

export function plainFilter(f: Filter) {
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
