import Stripe from "stripe";
import { UniqueConstraintError, type Transaction } from "sequelize";
import { z } from "zod";
import { PaymentEvent, sequelize } from "~/models/index.server";
import { env } from "../env.server";

// The official SDK; host, port and protocol come from the environment, so the local fake and the
// real service differ only in configuration.
export const stripe = new Stripe(env.STRIPE_SECRET_KEY, {
  ...(env.STRIPE_API_HOST ? { host: env.STRIPE_API_HOST } : {}),
  ...(env.STRIPE_API_PORT ? { port: env.STRIPE_API_PORT } : {}),
  protocol: env.STRIPE_API_PROTOCOL,
  maxNetworkRetries: 2,
  timeout: 10_000,
});

export class WebhookRejected extends Error {}

/** A signed body that is not an event we can record (400, with the field that is wrong). */
export class WebhookMalformed extends Error {
  constructor(readonly issues: { path: string; message: string }[]) {
    super(issues.map((i) => `${i.path}: ${i.message}`).join("; "));
  }
}

/** How far a signature's timestamp may be from our clock, in either direction. */
export const WEBHOOK_TOLERANCE_SECONDS = 300;

// What recordPaymentEvent needs of an event; the column sizes are those of payment_events.
const eventShape = z.object({
  id: z.string().regex(/^evt_[A-Za-z0-9_]{1,96}$/, "an event id is evt_ followed by letters, digits or _ (at most 100 characters)"),
  object: z.literal("event", "must be \"event\""),
  type: z.string().regex(/^[a-z_]+(\.[a-z_]+)+$/, "an event type is dotted lower-case words, like checkout.session.completed").max(100),
  created: z.number().int().positive().max(1e11, "must be a Unix time in seconds"),
  livemode: z.boolean().optional(),
  data: z.object({ object: z.object({ id: z.string().max(100).optional() }).loose() }).loose(),
}).loose();

export function verifyWebhook(payload: string, signature: string | null, nowSeconds = Math.floor(Date.now() / 1000)): Stripe.Event {
  if (!signature) throw new WebhookRejected("Missing Stripe-Signature header.");
  // The SDK only refuses timestamps too far in the past; a future one is refused here too.
  const stamp = /(?:^|,)\s*t=(\d{1,12})(?:,|$)/.exec(signature);
  if (stamp && Math.abs(nowSeconds - Number(stamp[1])) > WEBHOOK_TOLERANCE_SECONDS) {
    throw new WebhookRejected(`Timestamp outside the tolerance zone (more than ${WEBHOOK_TOLERANCE_SECONDS} s from our clock).`);
  }
  let event: Stripe.Event;
  try {
    // Signature first (over the raw bytes), only then the body is read as JSON.
    const check = stripe.webhooks.signature;
    if (!check) throw new Error("The payment SDK has no signature check.");
    check.verifyHeader(payload, signature, env.STRIPE_WEBHOOK_SECRET, WEBHOOK_TOLERANCE_SECONDS);
  } catch (error) {
    throw new WebhookRejected(error instanceof Error ? error.message : "Signature check failed.");
  }
  try {
    event = JSON.parse(payload) as Stripe.Event;
  } catch {
    throw new WebhookMalformed([{ path: "(body)", message: "the body is not valid JSON" }]);
  }
  const shape = eventShape.safeParse(event);
  if (!shape.success) {
    throw new WebhookMalformed(shape.error.issues.map((i) => ({ path: i.path.join(".") || "(body)", message: i.message })));
  }
  return event;
}

/**
 * Records the event once; a repeated delivery of the same event id changes nothing. `apply` runs in
 * the same transaction, only for a new event, so the event and its effect commit together.
 */
export async function recordPaymentEvent(event: Stripe.Event, apply?: (event: Stripe.Event, transaction: Transaction) => Promise<void>): Promise<{ duplicate: boolean }> {
  try {
    await sequelize.transaction(async (transaction) => {
      const object = event.data.object as { id?: string };
      await PaymentEvent.create(
        {
          eventId: event.id,
          type: event.type,
          objectId: object.id ?? null,
          payload: event as unknown as Record<string, unknown>,
          receivedAt: new Date(),
        },
        { transaction },
      );
      await apply?.(event, transaction);
    });
    return { duplicate: false };
  } catch (error) {
    if (error instanceof UniqueConstraintError) return { duplicate: true };
    throw error;
  }
}

export async function paymentServiceHealth(): Promise<"ok" | string> {
  try {
    await stripe.checkout.sessions.retrieve("cs_health_probe", undefined, { maxNetworkRetries: 0 });
    return "ok";
  } catch (error) {
    // A 404 for the probe id means the service answered and accepted our key.
    if (error instanceof Stripe.errors.StripeInvalidRequestError && error.statusCode === 404) return "ok";
    return error instanceof Error ? error.message : String(error);
  }
}
