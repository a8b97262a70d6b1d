// The office's expected clear fraction per telescope and month: the weather the RA-pressure
// chart and the semester check use. A month without a value is reported as not set.
import { Refusal } from "~/lib/forms";
import type { ClearFractionsInput } from "~/lib/schemas/office";
import { sequelize, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { writeAudit } from "~/lib/audit.server";

export type MonthClearFraction = { month: number; clearFraction: number | null };

export async function clearFractionsOf({ telescopeId }: { telescopeId: number }): Promise<MonthClearFraction[]> {
  const rows = await TelescopeClearFraction.findAll({ where: { telescopeId } });
  const byMonth = new Map(rows.map((r) => [r.month, r.clearFraction]));
  return Array.from({ length: 12 }, (_, i) => ({ month: i + 1, clearFraction: byMonth.get(i + 1) ?? null }));
}

/** Replaces the twelve months at once (percent in, fraction stored), audited with what changed. */
export async function saveClearFractions({ actor, telescopeId, values }: { actor: { id: number }; telescopeId: number; values: ClearFractionsInput }) {
  return sequelize.transaction(async (transaction) => {
    const telescope = await Telescope.findByPk(telescopeId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!telescope) throw new Refusal("That telescope does not exist (it may have been deleted).", { status: 404, field: "form" });
    const before = new Map((await TelescopeClearFraction.findAll({ where: { telescopeId }, transaction })).map((r) => [r.month, r.clearFraction]));
    const changes: Record<number, { from: number | null; to: number | null }> = {};
    for (let month = 1; month <= 12; month++) {
      const percent = values[`m${month}`];
      const to = percent === null || percent === undefined ? null : Math.round(percent * 10) / 1000;
      const from = before.get(month) ?? null;
      if (from === to) continue;
      changes[month] = { from, to };
      if (to === null) await TelescopeClearFraction.destroy({ where: { telescopeId, month }, transaction });
      else if (from === null) await TelescopeClearFraction.create({ telescopeId, month, clearFraction: to }, { transaction });
      else await TelescopeClearFraction.update({ clearFraction: to }, { where: { telescopeId, month }, transaction });
    }
    if (Object.keys(changes).length) {
      await writeAudit({ actorId: actor.id, action: "telescope.clear_fractions_saved", entityType: "telescope", entityId: telescopeId, details: { changes } }, transaction);
    }
    return { changed: Object.keys(changes).length > 0 };
  });
}
