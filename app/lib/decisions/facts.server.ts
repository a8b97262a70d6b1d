// What a decision letter shows, read from the locked allocation, the board and the submitted
// reviews: hours per telescope, moon category and semester, the tier, the charge, and the
// comments to the PI (anonymised; never a comment to the committee, a name or an institution).
import { Refusal } from "~/lib/forms";
import { Op, type Transaction } from "sequelize";
import { callNotFound } from "~/lib/review/chair.server";
import { Allocation, BoardEntry, Call, CallAllocation, DecisionTemplate, Proposal, ProposalMember, ReviewAssignment, Telescope, User } from "~/models/index.server";
import type { Charge } from "~/models/Charge";
import { anonymisedComments } from "./anonymise";
import { DEFAULT_TEMPLATES } from "./template";
import { decisionOutcomes, type DecisionOutcome, type LetterFacts } from "./vocabulary";

export const notLockedRefusal = () =>
  new Refusal("Decisions are sent from a locked allocation only: the chair locks it on the ranking board first.", { status: 409, field: "allocation" });

/** The call, if its allocation is locked; 404 without the call, 409 while it is not locked. */
export async function lockedCall({ callId, transaction }: { callId: number; transaction?: Transaction }) {
  const call = await Call.findByPk(callId, { transaction });
  if (!call) callNotFound();
  const allocation = await CallAllocation.findOne({ where: { callId }, transaction });
  return { call, lockedAt: allocation?.lockedAt ?? null };
}

export async function requireLocked({ callId, transaction }: { callId: number; transaction?: Transaction }) {
  const found = await lockedCall({ callId, transaction });
  if (!found.lockedAt) throw notLockedRefusal();
  return { call: found.call, lockedAt: found.lockedAt };
}

/** The proposals of a call that have an outcome (set by the lock), in code order. */
export async function decidedProposals({ callId, transaction }: { callId: number; transaction?: Transaction }) {
  return Proposal.findAll({ where: { callId, status: { [Op.in]: [...decisionOutcomes] } }, order: [["serial", "ASC"], ["id", "ASC"]], transaction });
}

export async function templatesFor({ transaction }: { transaction?: Transaction } = {}) {
  const rows = await DecisionTemplate.findAll({ transaction });
  const out = {} as Record<DecisionOutcome, { subject: string; body: string; custom: boolean }>;
  for (const o of decisionOutcomes) {
    const row = rows.find((r) => r.outcome === o);
    out[o] = row ? { subject: row.subject, body: row.body, custom: true } : { ...DEFAULT_TEMPLATES[o], custom: false };
  }
  return out;
}

/** The facts of many proposals of one call, read in a few queries. */
export async function lettersFacts({ call, proposals, charges = new Map(), now = new Date(), transaction }: { call: Call; proposals: Proposal[]; charges?: Map<number, Charge | null>; now?: Date; transaction?: Transaction }): Promise<Map<number, LetterFacts>> {
  const ids = proposals.map((p) => p.id);
  const none = [0];
  const [allocations, entries, reviews, pis, telescopes] = await Promise.all([
    Allocation.findAll({ where: { callId: call.id, proposalId: { [Op.in]: ids.length ? ids : none } }, order: [["semesterCode", "ASC"], ["telescopeId", "ASC"], ["moonCategory", "ASC"]], transaction }),
    BoardEntry.findAll({ where: { proposalId: { [Op.in]: ids.length ? ids : none } }, transaction }),
    // only what a letter may show: the id (for the order) and the comment to the PI
    ReviewAssignment.findAll({ attributes: ["id", "proposalId", "commentToPi"], where: { proposalId: { [Op.in]: ids.length ? ids : none }, status: "submitted" }, transaction }),
    ProposalMember.findAll({ where: { proposalId: { [Op.in]: ids.length ? ids : none }, role: "pi" }, include: [{ model: User, as: "user", attributes: ["name", "email"] }], transaction }),
    Telescope.findAll({ attributes: ["id", "name"], transaction }),
  ]);
  const telescopeName = new Map(telescopes.map((t) => [t.id, t.name]));
  const out = new Map<number, LetterFacts>();
  for (const p of proposals) {
    const outcome = p.status as DecisionOutcome;
    const pi = pis.find((m) => m.proposalId === p.id);
    const charge = charges.get(p.id) ?? null;
    out.set(p.id, {
      proposalId: p.id,
      code: p.code ?? `proposal ${p.id}`,
      title: p.title,
      semesterCode: call.semesterCode,
      callTitle: call.title,
      piName: pi?.user?.name ?? pi?.user?.email ?? pi?.email ?? "PI",
      outcome,
      hours:
        outcome === "accepted"
          ? allocations.filter((a) => a.proposalId === p.id).map((a) => ({ telescope: telescopeName.get(a.telescopeId as number) ?? `telescope ${a.telescopeId}`, moonCategory: a.moonCategory, semesterCode: a.semesterCode, hours: a.hours }))
          : [],
      tier: outcome === "accepted" ? (entries.find((e) => e.proposalId === p.id)?.tier ?? null) : null,
      charge: charge ? { id: charge.id, amountCents: charge.amountCents, currency: charge.currency, hours: charge.hours, rateCents: charge.rateCents } : null,
      comments: anonymisedComments(p.id, reviews.filter((r) => r.proposalId === p.id)),
      date: now.toISOString().slice(0, 10),
    });
  }
  return out;
}
