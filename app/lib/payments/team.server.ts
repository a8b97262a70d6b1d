// What a proposal's team sees of its charges, and the PI's declaration of the data-release
// paper's pages (the page charge). Scoped by the caller: someone off the team gets a 404.
import { writeAudit } from "~/lib/audit.server";
import { Refusal } from "~/lib/forms";
import { getProposalForUser, type Actor } from "~/lib/proposals/proposals.server";
import { Charge, sequelize } from "~/models/index.server";
import { chargeView, pageChargeCents, semesterEnded, type ChargeView } from "./charges.server";

export type TeamChargeView = ChargeView & {
  /** a payment page was opened and is still usable */
  checkoutOpen: boolean;
  /** a payment page was opened and expired (or was left) without payment */
  checkoutLapsed: boolean;
  checkoutExpiresAt: string | null;
  receiptUrl: string | null;
};

export function teamChargeView(c: Charge, now = new Date()): TeamChargeView {
  const open = c.state === "awaiting_payment" && !!c.checkoutExpiresAt && c.checkoutExpiresAt > now;
  return {
    ...chargeView(c),
    checkoutOpen: open,
    checkoutLapsed: (c.state === "raised" || c.state === "awaiting_payment") && !!c.checkoutSessionId && !open,
    checkoutExpiresAt: c.checkoutExpiresAt?.toISOString() ?? null,
    receiptUrl: c.state === "paid" ? `/proposals/${c.proposalId}/charges/${c.id}/receipt.pdf` : null,
  };
}

export type PageChargeOffer =
  | { open: true; ratePerPageCents: number; currency: string }
  | { open: false; reason: string; declaredPages: number | null };

/** Whether the PI may declare the paper's pages now, and why not. */
function pageChargeOffer(access: Awaited<ReturnType<typeof getProposalForUser>>, existing: Charge | undefined, now = new Date()): PageChargeOffer {
  const { proposal, call } = access;
  if (existing) return { open: false, reason: `The data-release paper's ${existing.pages} pages are declared; its page charge is listed above.`, declaredPages: existing.pages };
  if (proposal.status !== "accepted") return { open: false, reason: "Only an accepted programme declares a data-release paper (and owes a page charge).", declaredPages: null };
  if (!semesterEnded(call, now)) return { open: false, reason: `The pages of the data-release paper are declared after the semester, which ends on ${call.semesterEnd}; a page charge is raised then.`, declaredPages: null };
  if (call.pageChargeCents <= 0) return { open: false, reason: "This call has no page charge.", declaredPages: null };
  return { open: true, ratePerPageCents: call.pageChargeCents, currency: call.currency };
}

/** The charges of a proposal for anyone on its team (404 otherwise). */
export async function chargesForTeam({ user, proposalId, now = new Date() }: { user: Actor; proposalId: number; now?: Date }) {
  const access = await getProposalForUser({ proposalId, user });
  const rows = await Charge.findAll({ where: { proposalId }, order: [["createdAt", "ASC"], ["id", "ASC"]] });
  return {
    isPi: access.isPi,
    charges: rows.map((c) => teamChargeView(c, now)),
    pageCharge: pageChargeOffer(access, rows.find((c) => c.kind === "page_charge"), now),
  };
}

/**
 * The PI declares the pages of the programme's data-release paper: a page charge of pages × the
 * call's rate is raised, once per proposal, for an accepted programme after its semester.
 */
export async function declarePages({ user, proposalId, pages, now = new Date() }: { user: Actor; proposalId: number; pages: number; now?: Date }): Promise<ChargeView> {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    if (!access.isPi) throw new Refusal("Only the PI declares the paper's pages.", { status: 403, field: "pages" });
    const existing = await Charge.findOne({ where: { proposalId, kind: "page_charge" }, transaction });
    const offer = pageChargeOffer(access, existing ?? undefined, now);
    if (!offer.open) throw new Refusal(offer.reason, { status: 409, field: "pages" });
    if (!Number.isInteger(pages) || pages < 1) throw new Refusal("Give the number of pages as a whole number from 1.", { field: "pages" });
    const amountCents = pageChargeCents(pages, offer.ratePerPageCents);
    const charge = await Charge.create(
      { proposalId, callId: access.call.id, kind: "page_charge", semesterCode: access.call.semesterCode, hours: null, pages, rateCents: offer.ratePerPageCents, amountCents, currency: offer.currency },
      { transaction },
    );
    await writeAudit({ actorId: user.id, action: "charge.page_charge_raised", entityType: "charge", entityId: charge.id, proposalId, details: { pages, rateCents: offer.ratePerPageCents, amountCents, currency: offer.currency } }, transaction);
    return chargeView(charge);
  });
}

/** What the Charges tab says after the payment page sent the PI back (`?checkout=return|left`). */
export type CheckoutReturn =
  | { kind: "paid"; chargeId: number }
  | { kind: "waiting"; chargeId: number }
  | { kind: "lapsed"; chargeId: number }
  | { kind: "left"; chargeId: number | null }
  | { kind: "unknown" };
