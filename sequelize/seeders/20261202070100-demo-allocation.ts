// Demo allocation inputs: the office's expected clear nights per month at Kestrel Ridge (INVENTED
// numbers for an invented site: wetter in the northern winter, best in early summer), and the
// running semester's call locked with its accepted programmes' hours, so that their later
// semesters show on the call in review as hours already committed.
// Idempotent: months already set and a call already locked are left alone.
import { Op, type Sequelize } from "sequelize";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, BoardEntry, Call, CallAllocation, Proposal, Telescope, TelescopeClearFraction, User } from "~/models/index.server";
import { demoCallPlan } from "./20261201000100-demo-observatory";

/** Invented: the fraction of nights expected clear, January … December. */
export const DEMO_CLEAR_FRACTIONS = [0.52, 0.55, 0.6, 0.66, 0.74, 0.82, 0.85, 0.84, 0.78, 0.68, 0.58, 0.5];

export async function up({ context: sequelize }: { context: Sequelize }) {
  for (const telescope of await Telescope.findAll()) {
    for (const [i, clearFraction] of DEMO_CLEAR_FRACTIONS.entries()) {
      await TelescopeClearFraction.findOrCreate({ where: { telescopeId: telescope.id, month: i + 1 }, defaults: { telescopeId: telescope.id, month: i + 1, clearFraction } });
    }
  }

  const plan = demoCallPlan(new Date());
  const running = await Call.findOne({ where: { semesterCode: plan.running.semesterCode } });
  const chair = await User.findOne({ where: { email: "chair@kestrel-ridge.example" } });
  if (!running || !chair || (await CallAllocation.findOne({ where: { callId: running.id } }))) return;
  const accepted = await Proposal.findAll({ where: { callId: running.id, status: { [Op.in]: ["accepted", "waitlisted"] } }, order: [["serial", "ASC"]] });
  // the sheets are computed before the transaction (they read through the pool of connections)
  const rows: { proposalId: number; telescopeId: number; moonCategory: "dark" | "grey" | "bright"; semesterCode: string; hours: number }[] = [];
  for (const p of accepted) {
    if (p.status !== "accepted") continue;
    const sheet = await computeFeasibilitySheet({ proposalId: p.id });
    for (const t of sheet.totals) if (t.hours > 0) rows.push({ proposalId: p.id, telescopeId: t.telescopeId, moonCategory: t.moonCategory, semesterCode: t.semesterCode, hours: Math.round(t.hours * 10) / 10 });
  }
  await sequelize.transaction(async (transaction) => {
    await CallAllocation.create({ callId: running.id, lockedAt: new Date(`${running.semesterStart}T00:00:00Z`), lockedById: chair.id }, { transaction });
    for (const p of accepted) {
      await BoardEntry.create({ callId: running.id, proposalId: p.id, chairRank: null, chairRankReason: null, tier: p.status === "accepted" ? "assured" : null, waitlisted: p.status === "waitlisted" }, { transaction });
    }
    if (rows.length) await Allocation.bulkCreate(rows.map((r) => ({ ...r, callId: running.id })), { transaction });
  });
}

export async function down() {}
