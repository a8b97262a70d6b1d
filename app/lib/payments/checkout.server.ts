// Paying a charge: a Checkout Session of the payment service (the official SDK; locally the fake),
// its hosted page, and back. The charge becomes paid only from the signed webhook
// (`checkout.session.completed`), applied in the transaction that records the event, so a
// repeated, late or early delivery changes it once. Amounts always come from the charge row.
import Stripe from "stripe";
import type { Transaction } from "sequelize";
import { writeAudit } from "~/lib/audit.server";
import { env } from "~/lib/env.server";
import { Refusal } from "~/lib/forms";
import { enqueueMail } from "~/lib/mail/queue.server";
import { getProposalForUser, type Actor } from "~/lib/proposals/proposals.server";
import { stripe } from "~/lib/payments/payments.server";
import { Call, Charge, Proposal, sequelize } from "~/models/index.server";
import { chargeKindLabels, formatMoney } from "./money";
import { chargeReceiptMail, type ChargeReceiptPayload, receiptPayloadOf } from "./receipt.server";

/** How long a payment page stays usable (the service allows 30 min to 24 h). */
export const CHECKOUT_LIFETIME_SECONDS = 60 * 60;

/** The payment service could not be reached or refused us: nothing was changed. */
export class PaymentServiceUnavailable extends Refusal {
  constructor() {
    super("The payment service cannot be reached just now. Nothing was charged and the charge is unchanged; try again in a few minutes.", { status: 503, field: "chargeId" });
  }
}

function chargeTitle(charge: Charge, code: string | null) {
  const what = charge.kind === "access_fee" ? `${chargeKindLabels.access_fee}, ${charge.hours} h in ${charge.semesterCode}` : `${chargeKindLabels.page_charge}, ${charge.pages} pages`;
  return `Nightshare ${code ?? `proposal ${charge.proposalId}`}: ${what}`;
}

function isServiceDown(error: unknown) {
  return error instanceof Stripe.errors.StripeConnectionError || error instanceof Stripe.errors.StripeAPIError || error instanceof Stripe.errors.StripeAuthenticationError || error instanceof Stripe.errors.StripeRateLimitError || (error instanceof Stripe.errors.StripeError && (error.statusCode ?? 0) >= 500);
}

/**
 * A payment page for the PI's charge: the open one if there is one, else a new Checkout Session.
 * Returns its URL. The charge row is locked while the session is made, so two clicks make one.
 */
export async function startCheckout({ user, chargeId, client = stripe, now = () => new Date() }: { user: Actor; chargeId: number; client?: Stripe; now?: () => Date }): Promise<{ url: string; chargeId: number; reused: boolean }> {
  const access = await chargeOfPi({ user, chargeId });
  try {
    return await sequelize.transaction(async (transaction) => {
      const charge = (await Charge.findByPk(chargeId, { transaction, lock: transaction.LOCK.UPDATE }))!;
      if (charge.state === "paid") throw new Refusal("This charge is already paid.", { status: 409, field: "chargeId" });
      if (charge.state === "waived") throw new Refusal("The observatory waived this charge; there is nothing to pay.", { status: 409, field: "chargeId" });
      const at = now();
      if (charge.state === "awaiting_payment" && charge.checkoutSessionId && charge.checkoutExpiresAt && charge.checkoutExpiresAt.getTime() > at.getTime() + 5 * 60_000) {
        const existing = await client.checkout.sessions.retrieve(charge.checkoutSessionId).catch((error: unknown) => {
          if (error instanceof Stripe.errors.StripeInvalidRequestError && error.statusCode === 404) return null; // the fake restarted
          throw error;
        });
        if (existing?.status === "complete") throw new Refusal("This charge's payment went through; its confirmation is on its way. Reload the page in a moment.", { status: 409, field: "chargeId" });
        if (existing?.status === "open" && existing.url && existing.amount_total === charge.amountCents) return { url: existing.url, chargeId, reused: true };
      }
      const pi = access.membership;
      const expiresAt = Math.floor(at.getTime() / 1000) + CHECKOUT_LIFETIME_SECONDS;
      const back = new URL(`/proposals/${charge.proposalId}/charges`, env.APP_URL);
      const session = await client.checkout.sessions.create(
        {
          mode: "payment",
          client_reference_id: `charge-${charge.id}`,
          customer_email: pi.email,
          success_url: `${back}?checkout=return&session={CHECKOUT_SESSION_ID}`,
          cancel_url: `${back}?checkout=left&charge=${charge.id}`,
          expires_at: expiresAt,
          line_items: [{ quantity: 1, price_data: { currency: charge.currency.toLowerCase(), unit_amount: charge.amountCents, product_data: { name: chargeTitle(charge, access.proposal.code) } } }],
          metadata: { chargeId: String(charge.id), proposalId: String(charge.proposalId) },
        },
        // a retry of this very request (the SDK's own retries) makes no second session
        { idempotencyKey: `nightshare-charge-${charge.id}-${at.getTime()}` },
      );
      if (!session.url) throw new Error("The payment service returned a session without a URL.");
      await charge.update({ state: "awaiting_payment", checkoutSessionId: session.id, checkoutExpiresAt: new Date(session.expires_at * 1000) }, { transaction });
      await writeAudit({ actorId: user.id, action: "charge.checkout_started", entityType: "charge", entityId: charge.id, proposalId: charge.proposalId as number, details: { checkoutSessionId: session.id, amountCents: charge.amountCents, currency: charge.currency } }, transaction);
      return { url: session.url, chargeId, reused: false };
    });
  } catch (error) {
    if (isServiceDown(error)) {
      console.error("payment service unavailable while starting a checkout:", error instanceof Error ? error.message : error);
      throw new PaymentServiceUnavailable();
    }
    throw error;
  }
}

/** The proposal of a charge the user may pay: 404 off the team (as if it did not exist), 403 for a Co-I. */
export async function chargeOfPi({ user, chargeId }: { user: Actor; chargeId: number }) {
  const probe = await Charge.findByPk(chargeId, { attributes: ["id", "proposalId"] });
  if (!probe) throw notFoundCharge();
  const access = await getProposalForUser({ proposalId: probe.proposalId as number, user }).catch(() => {
    throw notFoundCharge();
  });
  if (!access.isPi) throw new Refusal("Only the PI pays the programme's charges.", { status: 403, field: "chargeId" });
  return access;
}

function notFoundCharge() {
  return new Refusal("There is no such charge, or it is not one of your proposals'.", { status: 404, field: "chargeId" });
}

type SessionObject = { id?: string; metadata?: Record<string, string> | null; amount_total?: number | null; currency?: string | null; payment_status?: string; status?: string };

/**
 * Applies a newly recorded event to its charge (inside the transaction that records it, so a
 * second delivery of the same event never gets here). Events of no charge of ours change nothing.
 */
export async function applyPaymentEvent(event: Stripe.Event, transaction: Transaction): Promise<void> {
  if (event.type !== "checkout.session.completed" && event.type !== "checkout.session.expired") return;
  const session = event.data.object as SessionObject;
  const chargeId = Number(session.metadata?.chargeId);
  if (!session.id || !Number.isSafeInteger(chargeId) || chargeId <= 0) return;
  const charge = await Charge.findByPk(chargeId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!charge) return;
  const proposalId = charge.proposalId as number;
  const audit = (action: string, details: Record<string, unknown>) =>
    writeAudit({ actorId: null, action, entityType: "charge", entityId: charge.id, proposalId, details: { eventId: event.id, checkoutSessionId: session.id, ...details } }, transaction);

  if (event.type === "checkout.session.expired") {
    // only the session the charge waits on; an older one's expiry is no news
    if (charge.state === "awaiting_payment" && charge.checkoutSessionId === session.id) {
      await charge.update({ state: "raised" }, { transaction });
      await audit("charge.checkout_expired", {});
    }
    return;
  }

  if (session.payment_status !== "paid") return;
  const sameAmount = session.amount_total === charge.amountCents && (session.currency ?? "").toLowerCase() === charge.currency.toLowerCase();
  if (!sameAmount) {
    await audit("charge.payment_mismatch", { paidCents: session.amount_total, paidCurrency: session.currency, amountCents: charge.amountCents, currency: charge.currency });
    return;
  }
  if (charge.state === "paid" || charge.state === "waived") {
    // paid twice (two sessions) or after a waiver: the office refunds; the record says so
    await audit("charge.paid_again", { state: charge.state, firstEventId: charge.paymentEventId });
    return;
  }
  const paidAt = new Date(event.created * 1000);
  await charge.update({ state: "paid", paidAt, paymentEventId: event.id, checkoutSessionId: session.id }, { transaction });
  await audit("charge.paid", { amountCents: charge.amountCents, currency: charge.currency });
  const proposal = await Proposal.findByPk(proposalId, { transaction, include: [{ model: Call, as: "call" }] });
  const payload: ChargeReceiptPayload = await receiptPayloadOf({ charge, proposal: proposal!, transaction });
  const mail = chargeReceiptMail(payload, false);
  await enqueueMail({ to: payload.piEmail, subject: mail.subject, text: mail.text, html: mail.html, kind: "charge-receipt", payload: payload as unknown as Record<string, unknown> }, transaction);
}

