// Raising charges (SPEC §1). The access fee is raised on acceptance, when the decision is sent (the
// decisions module calls `raiseAccessFee` inside its per-proposal transaction, so the letter and
// the charge are one change): the call's fee per hour × the hours allocated in the call's
// semester, for a programme whose PI's institution is not a consortium member. Later semesters of
// a multi-semester programme are charged by those semesters' own calls. A page charge is raised
// when the PI declares the pages of the data-release paper: pages × the call's page rate.
// Raising twice changes nothing (one charge of a kind per proposal and semester).
import type { Transaction } from "sequelize";
import { Allocation, Call, Charge, Proposal, ProposalMember, User } from "~/models/index.server";
import type { ChargeState } from "~/models/Charge";

/** The access fee in minor units: hours × rate, rounded to the nearest minor unit (common practice). */
export function accessFeeCents(hours: number, ratePerHourCents: number): number {
  return Math.round(hours * ratePerHourCents);
}

export type ChargeView = {
  id: number;
  proposalId: number;
  kind: Charge["kind"];
  semesterCode: string;
  hours: number | null;
  pages: number | null;
  rateCents: number;
  amountCents: number;
  currency: string;
  state: ChargeState;
  paidAt: string | null;
  waivedAt: string | null;
  waiveReason: string | null;
};

export function chargeView(c: Charge): ChargeView {
  return {
    id: c.id,
    proposalId: c.proposalId as number,
    kind: c.kind,
    semesterCode: c.semesterCode,
    hours: c.hours,
    pages: c.pages,
    rateCents: c.rateCents,
    amountCents: c.amountCents,
    currency: c.currency,
    state: c.state,
    paidAt: c.paidAt ? c.paidAt.toISOString() : null,
    waivedAt: c.waivedAt ? c.waivedAt.toISOString() : null,
    waiveReason: c.waiveReason,
  };
}

/**
 * The access fee of an accepted proposal, raised once: null when nothing is owed (a member
 * institution, no fee set, or no hours in the call's semester). Call inside the transaction that
 * records the decision.
 */
export async function raiseAccessFee({ proposalId, transaction }: { proposalId: number; transaction: Transaction }): Promise<Charge | null> {
  const proposal = await Proposal.findByPk(proposalId, { transaction });
  if (!proposal || proposal.status !== "accepted") return null;
  const [call, pi, allocations] = await Promise.all([
    Call.findByPk(proposal.callId as number, { transaction }),
    // the team's PI now (a hand-over moves the role), else the one who created the proposal
    ProposalMember.findOne({ where: { proposalId, role: "pi" }, transaction }).then((m) => User.findByPk((m?.userId ?? proposal.createdById) as number, { transaction })),
    Allocation.findAll({ where: { proposalId }, transaction }),
  ]);
  if (!call || !pi || pi.isMemberInstitution) return null;
  const hours = allocations.filter((a) => a.semesterCode === call.semesterCode).reduce((s, a) => s + a.hours, 0);
  const amountCents = accessFeeCents(hours, call.accessFeePerHourCents);
  if (hours <= 0 || amountCents <= 0) return null;
  const [charge] = await Charge.findOrCreate({
    where: { proposalId, kind: "access_fee", semesterCode: call.semesterCode },
    defaults: { proposalId, callId: call.id, kind: "access_fee", semesterCode: call.semesterCode, hours, pages: null, rateCents: call.accessFeePerHourCents, amountCents, currency: call.currency },
    transaction,
  });
  return charge;
}

/** A proposal's charges, oldest first. */
export async function chargesOf({ proposalId }: { proposalId: number }): Promise<ChargeView[]> {
  return (await Charge.findAll({ where: { proposalId }, order: [["createdAt", "ASC"], ["id", "ASC"]] })).map(chargeView);
}

/** The page charge in minor units: pages × the call's rate per page. */
export function pageChargeCents(pages: number, ratePerPageCents: number): number {
  return pages * ratePerPageCents;
}

/** The day after which a call's semester has ended (its end date is the last day of it, UTC). */
export function semesterEnded(call: Pick<Call, "semesterEnd">, now = new Date()): boolean {
  return now.toISOString().slice(0, 10) > call.semesterEnd;
}
