// Targets of a proposal: add, edit, delete, and CSV import with a per-row report.
import { Refusal } from "~/lib/forms";
import { Op, type Transaction } from "sequelize";
import { angularSeparationDeg } from "~/lib/astro/coordinates";
import { writeAudit } from "~/lib/audit.server";
import type { TargetInput } from "~/lib/schemas/proposals";
import { DUPLICATE_RADIUS_ARCSEC, type CsvReport, type CsvRowResult } from "~/lib/proposals/target-csv";
import { parseTargetCsv } from "~/lib/proposals/target-csv.server";
import { Observation, sequelize, Target } from "~/models/index.server";
import { sheetTarget } from "~/models/Target";
import type { SheetTarget } from "./feasibility";
import { assertEditable, getProposalForUser, type Actor } from "./proposals.server";

export const MAX_TARGETS = 1_000;

/** A target as the sheet reads it, with its notes and how many observations use it. */
export type TargetRow = SheetTarget & { notes: string | null; observations: number };

export async function listTargets({ user, proposalId }: { user: Actor; proposalId: number }): Promise<TargetRow[]> {
  await getProposalForUser({ proposalId, user });
  return targetRows(proposalId);
}

export async function targetRows(proposalId: number, transaction?: Transaction): Promise<TargetRow[]> {
  const [targets, observations] = await Promise.all([
    Target.findAll({ where: { proposalId }, order: [["id", "ASC"]], transaction }),
    Observation.findAll({ where: { proposalId }, attributes: ["targetId"], transaction }),
  ]);
  return targetRowsOf(targets, observations);
}

/** The rows from targets (in id order) and the proposal's observations, read by the caller. */
export function targetRowsOf(targets: Target[], observations: { targetId: number }[]): TargetRow[] {
  const count = new Map<number, number>();
  for (const o of observations) count.set(o.targetId, (count.get(o.targetId) ?? 0) + 1);
  return targets.map((t) => ({
    ...sheetTarget(t),
    notes: t.notes,
    observations: count.get(t.id) ?? 0,
  }));
}

function columns(input: TargetInput) {
  return {
    name: input.name,
    raDeg: input.raDeg,
    decDeg: input.decDeg,
    pmRaMasPerYr: input.pmra,
    pmDecMasPerYr: input.pmdec,
    magnitudes: input.magnitudes as Record<string, number>,
    notes: input.notes,
  };
}

async function assertNoDuplicate(proposalId: number, input: TargetInput, transaction: Transaction, exceptId?: number) {
  const others = await Target.findAll({ where: { proposalId, ...(exceptId ? { id: { [Op.ne]: exceptId } } : {}) }, transaction });
  const sameName = others.find((t) => t.name.trim().toLowerCase() === input.name.toLowerCase());
  if (sameName) throw new Refusal(`"${sameName.name}" is already a target of this proposal.`, { status: 400, field: "name" });
  const near = others.find((t) => angularSeparationDeg(t.raDeg, t.decDeg, input.raDeg, input.decDeg) * 3600 < DUPLICATE_RADIUS_ARCSEC);
  if (near) throw new Refusal(`This position is within ${DUPLICATE_RADIUS_ARCSEC}″ of "${near.name}", already a target.`, { status: 400, field: "ra" });
  if (!exceptId && others.length >= MAX_TARGETS) throw new Refusal(`A proposal has at most ${MAX_TARGETS} targets.`, { status: 400, field: "name" });
}

export async function createTarget({ user, proposalId, input }: { user: Actor; proposalId: number; input: TargetInput }) {
  return sequelize.transaction(async (transaction) => {
    assertEditable(await getProposalForUser({ proposalId, user, transaction, lock: true }));
    await assertNoDuplicate(proposalId, input, transaction);
    const target = await Target.create({ proposalId, ...columns(input) }, { transaction });
    await writeAudit({ actorId: user.id, action: "target.added", entityType: "target", entityId: target.id, proposalId, details: { name: target.name } }, transaction);
    return target;
  });
}

export async function updateTarget({ user, proposalId, targetId, input }: { user: Actor; proposalId: number; targetId: number; input: TargetInput }) {
  return sequelize.transaction(async (transaction) => {
    assertEditable(await getProposalForUser({ proposalId, user, transaction, lock: true }));
    const target = await Target.findOne({ where: { id: targetId, proposalId }, transaction });
    if (!target) throw new Refusal("That target is not part of this proposal (any more).", { status: 400, field: "form" });
    await assertNoDuplicate(proposalId, input, transaction, targetId);
    const before = { name: target.name, raDeg: target.raDeg, decDeg: target.decDeg };
    await target.update(columns(input), { transaction });
    await writeAudit({ actorId: user.id, action: "target.updated", entityType: "target", entityId: targetId, proposalId, details: { before, name: input.name } }, transaction);
    return target;
  });
}

export async function deleteTarget({ user, proposalId, targetId }: { user: Actor; proposalId: number; targetId: number }) {
  return sequelize.transaction(async (transaction) => {
    assertEditable(await getProposalForUser({ proposalId, user, transaction, lock: true }));
    const target = await Target.findOne({ where: { id: targetId, proposalId }, transaction });
    if (!target) throw new Refusal("That target is not part of this proposal (any more).", { status: 400, field: "form" });
    const observations = await Observation.count({ where: { targetId }, transaction });
    await target.destroy({ transaction });
    await writeAudit({ actorId: user.id, action: "target.deleted", entityType: "target", entityId: targetId, proposalId, details: { name: target.name, observations } }, transaction);
    return { name: target.name, observations };
  });
}

export type ImportResult = { report: CsvReport; saved: number };

/** Accepted rows are saved (in one transaction); refused rows come back with their reasons. */
export async function importTargetsCsv({ user, proposalId, csv }: { user: Actor; proposalId: number; csv: string }): Promise<ImportResult> {
  return sequelize.transaction(async (transaction) => {
    assertEditable(await getProposalForUser({ proposalId, user, transaction, lock: true }));
    const existing = await Target.findAll({ where: { proposalId }, attributes: ["name", "raDeg", "decDeg"], transaction });
    const report = parseTargetCsv(csv, existing.map((t) => ({ name: t.name, raDeg: t.raDeg, decDeg: t.decDeg })));
    const accepted = report.rows.filter((r): r is Extract<CsvRowResult, { ok: true }> => r.ok);
    if (existing.length + accepted.length > MAX_TARGETS) {
      return { report: { ...report, rows: [], error: `This import would bring the proposal to ${existing.length + accepted.length} targets; the limit is ${MAX_TARGETS}.` }, saved: 0 };
    }
    if (accepted.length) {
      await Target.bulkCreate(accepted.map((r) => ({ proposalId, ...columns(r.target) })), { transaction });
      await writeAudit(
        {
          actorId: user.id,
          action: "targets.imported",
          entityType: "proposal",
          entityId: proposalId,
          proposalId,
          details: { accepted: accepted.length, refused: report.rows.length - accepted.length, names: accepted.slice(0, 50).map((r) => r.target.name) },
        },
        transaction,
      );
    }
    return { report, saved: accepted.length };
  });
}
