import type { Transaction } from "sequelize";
import { AuditEntry } from "~/models/index.server";

export async function writeAudit(
  entry: {
    actorId: number | null;
    action: string;
    entityType: string;
    entityId?: number | null;
    proposalId?: number | null;
    details?: Record<string, unknown> | null;
  },
  transaction?: Transaction,
) {
  await AuditEntry.create(
    {
      actorId: entry.actorId,
      action: entry.action,
      entityType: entry.entityType,
      entityId: entry.entityId ?? null,
      proposalId: entry.proposalId ?? null,
      details: entry.details ?? null,
    },
    { transaction },
  );
}
