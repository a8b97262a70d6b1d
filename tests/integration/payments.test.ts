import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stripe } from "~/lib/payments/payments.server";
import { PaymentEvent } from "~/models/index.server";
import { listen, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { testEnv } from "../helpers/env";

const secret = process.env.STRIPE_WEBHOOK_SECRET!;

function checkoutSession(reference: string) {
  return stripe.checkout.sessions.create({
    mode: "payment",
    client_reference_id: reference,
    customer_email: "pi@kestrel-ridge.example",
    success_url: `${testEnv.appUrl}/paid?session={CHECKOUT_SESSION_ID}`,
    cancel_url: `${testEnv.appUrl}/not-paid`,
    line_items: [{ quantity: 3, price_data: { currency: "eur", unit_amount: 95_000, product_data: { name: "Access fee, 3 h" } } }],
    metadata: { reference },
  });
}

function signedEvent(id: string, timestamp?: number) {
  const payload = JSON.stringify({
    id,
    object: "event",
    type: "checkout.session.completed",
    created: Math.floor(Date.now() / 1000),
    livemode: false,
    data: { object: { id: `cs_test_${id}`, object: "checkout.session", payment_status: "paid" } },
  });
  const header = stripe.webhooks.generateTestHeaderString({ payload, secret, timestamp });
  return { payload, header };
}

async function postWebhook(payload: string, header: string) {
  return (await request())
    .post("/api/v1/payments/webhook")
    .set("Content-Type", "application/json")
    .set("Stripe-Signature", header)
    .send(payload);
}

describe("payments through the official SDK and the local fake", () => {
  let server: Awaited<ReturnType<typeof listen>>;
  beforeAll(async () => {
    await ensureDatabase();
    server = await listen();
  });
  afterAll(async () => server.close());

  it("creates and retrieves a checkout session (SDK round trip)", async () => {
    const session = await checkoutSession("round-trip");
    expect(session.id).toMatch(/^cs_test_/);
    expect(session.amount_total).toBe(285_000);
    expect(session.url).toContain(session.id);
    const again = await stripe.checkout.sessions.retrieve(session.id);
    expect(again.client_reference_id).toBe("round-trip");
    expect(again.payment_status).toBe("unpaid");
  });

  it("records a signed event once, however often it is delivered", async () => {
    const id = `evt_test_${Date.now()}`;
    const { payload, header } = signedEvent(id);
    const first = await postWebhook(payload, header);
    expect(first.status).toBe(200);
    expect(first.body).toEqual({ received: true, duplicate: false });
    const second = await postWebhook(payload, header);
    expect(second.status).toBe(200);
    expect(second.body.duplicate).toBe(true);
    expect(await PaymentEvent.count({ where: { eventId: id } })).toBe(1);
  });

  it("refuses a forged signature", async () => {
    const { payload } = signedEvent(`evt_forged_${Date.now()}`);
    const forged = stripe.webhooks.generateTestHeaderString({ payload, secret: "whsec_somebody_else" });
    const res = await postWebhook(payload, forged);
    expect(res.status).toBe(400);
    expect(res.body.issues[0].path).toBe("stripe-signature");
    const tampered = signedEvent(`evt_tampered_${Date.now()}`);
    expect((await postWebhook(tampered.payload.replace("paid", "PAID"), tampered.header)).status).toBe(400);
  });

  it("refuses a stale signature (older than five minutes)", async () => {
    const { payload, header } = signedEvent(`evt_stale_${Date.now()}`, Math.floor(Date.now() / 1000) - 600);
    const res = await postWebhook(payload, header);
    expect(res.status).toBe(400);
    expect(res.body.issues[0].message).toMatch(/tolerance/i);
  });

  it("refuses a webhook without a signature", async () => {
    const res = await (await request()).post("/api/v1/payments/webhook").set("Content-Type", "application/json").send("{}");
    expect(res.status).toBe(400);
  });

  it("records the fake's own webhook after a test-card payment on the hosted page", async () => {
    const session = await checkoutSession("hosted-page");
    const pay = await fetch(session.url!, {
      method: "POST",
      redirect: "manual",
      headers: { "Content-Type": "application/x-www-form-urlencoded" },
      body: new URLSearchParams({ card_number: "4242 4242 4242 4242", card_expiry: "12 / 34", card_cvc: "123" }),
    });
    expect(pay.status).toBe(303);
    expect(pay.headers.get("location")).toContain(`session=${session.id}`);
    const until = Date.now() + 15_000;
    let event: PaymentEvent | null = null;
    while (!event && Date.now() < until) {
      event = await PaymentEvent.findOne({ where: { objectId: session.id, type: "checkout.session.completed" } });
      if (!event) await new Promise((r) => setTimeout(r, 200));
    }
    expect(event).not.toBeNull();
    expect((await stripe.checkout.sessions.retrieve(session.id)).payment_status).toBe("paid");
  });

  it("reports all three services healthy", async () => {
    const res = await (await request()).get("/healthz");
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: "ok", database: "ok", mail: { transport: "ok" }, payments: "ok" });
  });
});
