// The chair's own conflicts of interest in a call: a chair is conflicted on a proposal when they
// are on its team (PI or Co-I, by account or by invited address) or declared a conflict on it as a
// reviewer. Every chair route reads them here: the board, the allocation, the exports, the review
// pages and their APIs withhold such a proposal's grades and reviewers from this chair and refuse
// this chair's changes to it; another chair (or a person the office gives the role) acts on it.
import { Op, type Transaction } from "sequelize";
import { Refusal } from "~/lib/forms";
import { Proposal, ProposalMember, ReviewAssignment, User } from "~/models/index.server";

export { CONFLICT_WITHHELD } from "./vocabulary";

export type ChairConflict = { proposalId: number; code: string | null; rule: "team" | "declared"; reason: string };
export type ChairConflicts = Map<number, ChairConflict>;

/** The proposals of `callId` this person is conflicted on (none for an unknown person). */
export async function chairConflicts({ callId, chair, transaction }: { callId: number; chair: { id: number }; transaction?: Transaction }): Promise<ChairConflicts> {
  const out: ChairConflicts = new Map();
  const user = await User.findByPk(chair.id, { attributes: ["id", "email"], transaction });
  if (!user) return out;
  const proposals = await Proposal.findAll({ where: { callId }, attributes: ["id", "code"], transaction });
  if (proposals.length === 0) return out;
  const ids = proposals.map((p) => p.id);
  const codeOf = new Map(proposals.map((p) => [p.id, p.code]));
  // addresses are stored normalised (app/lib/email.ts), so an invitation matches by equality
  const [members, declared] = await Promise.all([
    ProposalMember.findAll({ where: { proposalId: { [Op.in]: ids }, [Op.or]: [{ userId: user.id }, { email: user.email }] }, attributes: ["proposalId", "role"], transaction }),
    ReviewAssignment.findAll({ where: { callId, reviewerId: user.id, status: "conflict" }, attributes: ["proposalId", "conflictReason"], transaction }),
  ]);
  for (const m of members) {
    const id = m.proposalId as number;
    out.set(id, { proposalId: id, code: codeOf.get(id) ?? null, rule: "team", reason: `you are ${m.role === "pi" ? "its PI" : "a Co-I"}` });
  }
  for (const d of declared) {
    const id = d.proposalId as number;
    if (!out.has(id)) out.set(id, { proposalId: id, code: codeOf.get(id) ?? null, rule: "declared", reason: `you declared a conflict${d.conflictReason ? `: ${d.conflictReason}` : ""}` });
  }
  return out;
}

export const proposalName = (c: { proposalId: number; code: string | null }) => c.code ?? `proposal ${c.proposalId}`;

/** The 403 for a change this chair may not make; the message names the proposal and why. */
export function conflictRefusal(conflict: ChairConflict, what: string, field = "proposalId") {
  return new Refusal(`You have a conflict on ${proposalName(conflict)} (${conflict.reason}), so you cannot ${what}. Another chair, or someone the office gives the chair role, can.`, { status: 403, field });
}

/** Refuses when any of `proposalIds` is one this chair is conflicted on; `fieldOf(i)` names the field. */
export function refuseConflicted(conflicts: ChairConflicts, proposalIds: readonly number[], what: string, fieldOf: (i: number) => string = () => "proposalId") {
  for (const [i, id] of proposalIds.entries()) {
    const c = conflicts.get(id);
    if (c) throw conflictRefusal(c, what, fieldOf(i));
  }
}
