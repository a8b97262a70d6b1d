// What the office's set-up modules share: the actor, the audit entry of a change, and the
// refusals for a missing row, a taken name and a row still in use.
import { Refusal } from "~/lib/forms";
import { UniqueConstraintError, type Transaction } from "sequelize";
import { Observation } from "~/models/index.server";
import { writeAudit } from "../audit.server";
import type { SessionUser } from "../auth/auth.server";

export type Actor = Pick<SessionUser, "id">;

/** Field → [before, after] for what an update changed (the audit entry's details). */
export function changes<T extends Record<string, unknown>>(before: T, after: Partial<T>) {
  const out: Record<string, [unknown, unknown]> = {};
  for (const [key, value] of Object.entries(after)) {
    const old = before[key];
    const same = old instanceof Date && value instanceof Date ? old.getTime() === value.getTime() : old === value;
    if (!same) out[key] = [old instanceof Date ? old.toISOString() : old, value instanceof Date ? value.toISOString() : value];
  }
  return out;
}

export async function audit(
  transaction: Transaction,
  actor: Actor,
  action: string,
  entityType: string,
  entityId: number,
  details: Record<string, unknown>,
) {
  await writeAudit({ actorId: actor.id, action, entityType, entityId, details }, transaction);
}

export function notFound(what: string): never {
  throw new Refusal(`That ${what} does not exist (it may have been deleted).`, { status: 404, field: "form" });
}

export async function uniqueName<T>(work: () => Promise<T>, field: string, message: string) {
  try {
    return await work();
  } catch (error) {
    if (error instanceof UniqueConstraintError) throw new Refusal(message, { field: field });
    throw error;
  }
}

export async function observationsUsing(where: { instrumentId?: number | number[]; filterId?: number }, transaction: Transaction) {
  return Observation.count({ where, transaction });
}

export function inUse(what: string, observations: number, extra = "") {
  return new Refusal(`${what} cannot be deleted: ${observations} observation${observations === 1 ? "" : "s"} in proposals use${observations === 1 ? "s" : ""} it${extra}. Change those observations first, or keep it.`);
}
