import { data } from "react-router";
import { applyPaymentEvent } from "~/lib/payments/checkout.server";
import { recordPaymentEvent, verifyWebhook, WebhookMalformed, WebhookRejected } from "~/lib/payments/payments.server";
import type { Route } from "./+types/api.v1.payments.webhook";

// Signed by the payment service, not by a user session: the signature is the guard.
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return data({ error: "Use POST." }, { status: 405 });
  // The payment service always sends JSON; anything else is refused before the body is read.
  if (!/^application\/json\s*(;|$)/i.test(request.headers.get("Content-Type") ?? "")) {
    return data({ error: "The webhook takes application/json.", issues: [{ path: "content-type", message: "must be application/json" }] }, { status: 400 });
  }
  const payload = await request.text();
  try {
    const event = verifyWebhook(payload, request.headers.get("stripe-signature"));
    const { duplicate } = await recordPaymentEvent(event, applyPaymentEvent);
    return data({ received: true, duplicate });
  } catch (error) {
    if (error instanceof WebhookRejected) {
      return data({ error: "Webhook signature rejected.", issues: [{ path: "stripe-signature", message: error.message }] }, { status: 400 });
    }
    if (error instanceof WebhookMalformed) return data({ error: "The event is malformed.", issues: error.issues }, { status: 400 });
    // e.g. the database is down: the sender retries on a 5xx, and gets JSON, never an HTML page
    console.error("payment webhook failure", error);
    return data({ error: "The event could not be recorded now; send it again later.", issues: [] }, { status: 503, headers: { "Retry-After": "30" } });
  }
}

export function loader() {
  return data({ error: "Use POST." }, { status: 405 });
}
