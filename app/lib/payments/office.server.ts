// The office's view of every charge (admin): the list, a waiver with its reason (audited, in one
// transaction), and the CSV export (`csvText`; text cells made safe for spreadsheets).
import { writeAudit } from "~/lib/audit.server";
import { csvText } from "~/lib/csv.server";
import { Refusal } from "~/lib/forms";
import { type Actor } from "~/lib/proposals/proposals.server";
import { stripe } from "~/lib/payments/payments.server";
import { Call, Charge, Proposal, ProposalMember, sequelize, User } from "~/models/index.server";
import { chargeView, type ChargeView } from "./charges.server";
import { chargeKindLabels, chargeStateLabels, decimalAmount } from "./money";

export type OfficeChargeView = ChargeView & {
  code: string | null;
  title: string;
  callSemester: string;
  piName: string | null;
  piEmail: string | null;
  piInstitution: string | null;
  waivedBy: string | null;
  createdAt: string;
};

export async function allCharges(): Promise<OfficeChargeView[]> {
  const rows = await Charge.findAll({
    include: [
      { model: Proposal, as: "proposal", attributes: ["id", "code", "title"], include: [{ model: ProposalMember, as: "members", where: { role: "pi" }, required: false, include: [{ model: User, as: "user", attributes: ["id", "name", "email", "institution"] }] }] },
      { model: Call, as: "call", attributes: ["id", "semesterCode"] },
      { model: User, as: "waivedBy", attributes: ["id", "name", "email"] },
    ],
    order: [["createdAt", "DESC"], ["id", "DESC"]],
  });
  return rows.map((c) => {
    const pi = c.proposal?.members?.[0];
    return {
      ...chargeView(c),
      code: c.proposal?.code ?? null,
      title: c.proposal?.title ?? "",
      callSemester: c.call?.semesterCode ?? c.semesterCode,
      piName: pi?.user?.name ?? null,
      piEmail: pi?.user?.email ?? pi?.email ?? null,
      piInstitution: pi?.user?.institution ?? null,
      waivedBy: c.waivedBy ? (c.waivedBy.name ?? c.waivedBy.email) : null,
      createdAt: c.createdAt.toISOString(),
    };
  });
}

/** Waives a raised or awaiting charge with the office's reason; its open payment page is closed. */
export async function waiveCharge({ actor, chargeId, reason }: { actor: Actor; chargeId: number; reason: string }): Promise<ChargeView> {
  const { charge, openSession } = await sequelize.transaction(async (transaction) => {
    const charge = await Charge.findByPk(chargeId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!charge) throw new Refusal("There is no such charge.", { status: 404, field: "chargeId" });
    if (charge.state === "paid") throw new Refusal("This charge is paid; a paid charge is refunded, not waived.", { status: 409, field: "chargeId" });
    if (charge.state === "waived") throw new Refusal("This charge is already waived.", { status: 409, field: "chargeId" });
    const openSession = charge.state === "awaiting_payment" ? charge.checkoutSessionId : null;
    const from = charge.state;
    await charge.update({ state: "waived", waivedAt: new Date(), waivedById: actor.id, waiveReason: reason }, { transaction });
    await writeAudit({ actorId: actor.id, action: "charge.waived", entityType: "charge", entityId: charge.id, proposalId: charge.proposalId as number, details: { reason, from, amountCents: charge.amountCents, currency: charge.currency } }, transaction);
    return { charge, openSession };
  });
  if (openSession) {
    // best effort: a payment after the waiver is still recorded (and audited) by the webhook
    await stripe.checkout.sessions.expire(openSession).catch((error: unknown) => console.warn(`could not expire checkout session ${openSession} of a waived charge`, error instanceof Error ? error.message : error));
  }
  return chargeView(charge);
}

const CSV_HEADER = ["charge", "proposal", "title", "call", "kind", "semester", "hours", "pages", "rate", "amount", "currency", "state", "PI", "PI e-mail", "PI institution", "raised at", "paid at", "waived at", "waived by", "waiver reason"];

export async function chargesCsv(): Promise<{ filename: string; csv: string }> {
  const rows = (await allCharges()).map((c) => [
    c.id,
    c.code ?? "",
    c.title,
    c.callSemester,
    chargeKindLabels[c.kind],
    c.semesterCode,
    c.hours ?? "",
    c.pages ?? "",
    decimalAmount(c.rateCents, c.currency),
    decimalAmount(c.amountCents, c.currency),
    c.currency.toUpperCase(),
    chargeStateLabels[c.state],
    c.piName ?? "",
    c.piEmail ?? "",
    c.piInstitution ?? "",
    c.createdAt,
    c.paidAt ?? "",
    c.waivedAt ?? "",
    c.waivedBy ?? "",
    c.waiveReason ?? "",
  ]);
  return { filename: `charges-${new Date().toISOString().slice(0, 10)}.csv`, csv: csvText([CSV_HEADER, ...rows]) };
}
