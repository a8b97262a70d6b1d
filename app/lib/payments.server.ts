import Stripe from "stripe";
import { UniqueConstraintError } from "sequelize";
import { PaymentEvent, sequelize } from "~/models/index.server";
import { env } from "./env.server";

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

export function verifyWebhook(payload: string, signature: string | null): Stripe.Event {
  if (!signature) throw new WebhookRejected("Missing Stripe-Signature header.");
  try {
    return stripe.webhooks.constructEvent(payload, signature, env.STRIPE_WEBHOOK_SECRET, 300);
  } catch (error) {
    throw new WebhookRejected(error instanceof Error ? error.message : "Signature check failed.");
  }
}

/** Records the event once; a repeated delivery of the same event id changes nothing. */
export async function recordPaymentEvent(event: Stripe.Event): Promise<{ duplicate: boolean }> {
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
