import { createServer, type IncomingHttpHeaders, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import Stripe from "stripe";
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { createPaymentFake, type PaymentFake } from "./server";
import { signatureHeader } from "./webhooks";

const SECRET_KEY = "sk_test_nightshare_fake_key_0001";
const WEBHOOK_SECRET = "whsec_nightshare_fake_signing_secret";

interface Delivery {
  headers: IncomingHttpHeaders;
  body: string;
}

/** A tiny stand-in for the app's webhook route: records what arrives, answers what it is told. */
async function startReceiver(answer: (n: number) => number = () => 200) {
  const deliveries: Delivery[] = [];
  const server: Server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => {
      deliveries.push({ headers: req.headers, body: Buffer.concat(chunks).toString("utf8") });
      res.statusCode = answer(deliveries.length);
      res.end();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}/api/v1/payments/webhook`,
    deliveries,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

async function waitFor<T>(probe: () => T | undefined | false, timeoutMs = 5000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = probe();
    if (value) return value;
    if (Date.now() > until) throw new Error("timed out waiting");
    await new Promise((r) => setTimeout(r, 20));
  }
}

/** Deliveries about one session, so a late one from another test cannot be mistaken for it. */
function deliveriesFor(deliveries: Delivery[], sessionId: string): Delivery[] {
  return deliveries.filter((d) => (JSON.parse(d.body) as { data: { object: { id: string } } }).data.object.id === sessionId);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function sdk(fake: PaymentFake, key = SECRET_KEY): Stripe {
  return new Stripe(key, { host: "127.0.0.1", port: fake.port, protocol: "http", maxNetworkRetries: 0 });
}

const chargeParams = (overrides: Partial<Stripe.Checkout.SessionCreateParams> = {}): Stripe.Checkout.SessionCreateParams => ({
  mode: "payment",
  line_items: [
    {
      price_data: { currency: "gbp", unit_amount: 1250, product_data: { name: "Observing charge 2027A-014, dark time" } },
      quantity: 2,
    },
  ],
  success_url: "http://127.0.0.1:3000/charges/paid?session={CHECKOUT_SESSION_ID}",
  cancel_url: "http://127.0.0.1:3000/charges/cancelled",
  client_reference_id: "charge-77",
  customer_email: "pi@kestrel-ridge.example",
  metadata: { proposal: "2027A-014", charge: "77" },
  ...overrides,
});

async function payOnPage(session: Stripe.Checkout.Session, card: string, extra: Record<string, string> = {}) {
  return fetch(session.url!, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ card_number: card, card_expiry: "12 / 39", card_cvc: "123", card_name: "A. Observer", ...extra }),
  });
}

async function fakeEvents(fake: PaymentFake) {
  const res = await fetch(`${fake.url}/_fake/events`, { headers: { authorization: `Bearer ${SECRET_KEY}` } });
  expect(res.status).toBe(200);
  return ((await res.json()) as { data: { id: string; type: string; delivered: boolean; attempts: unknown[]; event: { data: { object: { id: string } } } }[] }).data;
}

describe("payment fake", () => {
  let receiver: Awaited<ReturnType<typeof startReceiver>>;
  let fake: PaymentFake;
  let stripe: Stripe;

  beforeAll(async () => {
    receiver = await startReceiver();
    fake = await createPaymentFake({
      port: 0,
      secretKey: SECRET_KEY,
      webhookSecret: WEBHOOK_SECRET,
      webhookUrl: receiver.url,
      webhookRetryDelaysMs: [50, 50, 50, 50],
    });
    stripe = sdk(fake);
  });
  afterAll(async () => {
    await fake.close();
    await receiver.close();
  });
  afterEach(() => {
    receiver.deliveries.length = 0;
  });

  describe("API through the official SDK", () => {
    it("creates and retrieves a Checkout Session in Stripe's shape", async () => {
      const created = await stripe.checkout.sessions.create(chargeParams());
      expect(created.id).toMatch(/^cs_test_[A-Za-z0-9]+$/);
      expect(created).toMatchObject({
        object: "checkout.session",
        mode: "payment",
        status: "open",
        payment_status: "unpaid",
        amount_total: 2500,
        amount_subtotal: 2500,
        currency: "gbp",
        client_reference_id: "charge-77",
        customer_email: "pi@kestrel-ridge.example",
        metadata: { proposal: "2027A-014", charge: "77" },
        payment_intent: null,
        livemode: false,
      });
      expect(created.url).toBe(`${fake.url}/pay/${created.id}`);
      expect(created.expires_at - created.created).toBe(24 * 60 * 60);

      const fetched = await stripe.checkout.sessions.retrieve(created.id);
      expect(fetched).toEqual(created);

      const items = await stripe.checkout.sessions.listLineItems(created.id);
      expect(items.data).toHaveLength(1);
      expect(items.data[0]).toMatchObject({
        object: "item",
        description: "Observing charge 2027A-014, dark time",
        quantity: 2,
        amount_total: 2500,
        price: { unit_amount: 1250, currency: "gbp" },
      });
      const expanded = await stripe.checkout.sessions.retrieve(created.id, { expand: ["line_items"] });
      expect(expanded.line_items?.data[0].quantity).toBe(2);
    });

    it("refuses a wrong key with StripeAuthenticationError and a missing key with 401", async () => {
      const wrong = sdk(fake, "sk_test_not_the_right_key_at_all");
      await expect(wrong.checkout.sessions.create(chargeParams())).rejects.toBeInstanceOf(Stripe.errors.StripeAuthenticationError);

      const res = await fetch(`${fake.url}/v1/checkout/sessions/cs_test_x`);
      expect(res.status).toBe(401);
      const body = (await res.json()) as { error: { type: string; message: string } };
      expect(body.error.type).toBe("invalid_request_error");
      expect(body.error.message).toMatch(/did not provide an API key/);
    });

    it("answers a missing or bad parameter with StripeInvalidRequestError naming the param", async () => {
      const missing = await stripe.checkout.sessions
        .create({ ...chargeParams(), success_url: undefined })
        .catch((e: unknown) => e);
      expect(missing).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
      expect(missing).toMatchObject({ statusCode: 400, param: "success_url", code: "parameter_missing" });

      const badAmount = await stripe.checkout.sessions
        .create(chargeParams({ line_items: [{ price_data: { currency: "gbp", unit_amount: -5, product_data: { name: "x" } }, quantity: 1 }] }))
        .catch((e: unknown) => e);
      expect(badAmount).toMatchObject({ type: "StripeInvalidRequestError", param: "line_items[0][price_data][unit_amount]" });

      const unknown = await stripe.checkout.sessions
        .create({ ...chargeParams(), discounts: [{ coupon: "HALF" }] })
        .catch((e: unknown) => e);
      expect(unknown).toMatchObject({ type: "StripeInvalidRequestError", param: "discounts" });

      const noSuch = await stripe.checkout.sessions.retrieve("cs_test_doesnotexist").catch((e: unknown) => e);
      expect(noSuch).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
      expect(noSuch).toMatchObject({ statusCode: 404, code: "resource_missing" });
    });

    it("honours Idempotency-Key: same key gives the same session, other params are refused", async () => {
      const key = `charge-77-attempt-${Date.now()}`;
      const first = await stripe.checkout.sessions.create(chargeParams(), { idempotencyKey: key });
      const again = await stripe.checkout.sessions.create(chargeParams(), { idempotencyKey: key });
      expect(again.id).toBe(first.id);
      expect(again.lastResponse.headers["idempotent-replayed"]).toBe("true");

      const other = await stripe.checkout.sessions
        .create(chargeParams({ client_reference_id: "charge-78" }), { idempotencyKey: key })
        .catch((e: unknown) => e);
      expect(other).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);

      const fresh = await stripe.checkout.sessions.create(chargeParams());
      expect(fresh.id).not.toBe(first.id);
    });
  });

  describe("hosted page and webhooks", () => {
    it("shows the amount and the description, escaped", async () => {
      const session = await stripe.checkout.sessions.create(
        chargeParams({ line_items: [{ price_data: { currency: "gbp", unit_amount: 4000, product_data: { name: "Night <b>& day</b>" } }, quantity: 1 }] }),
      );
      const res = await fetch(session.url!);
      expect(res.status).toBe(200);
      const html = await res.text();
      expect(html).toContain("£40.00");
      expect(html).toContain("Night &#60;b&#62;&#38; day&#60;/b&#62;");
      expect(html).not.toContain("<b>&");
      expect(html).toContain('href="http://127.0.0.1:3000/charges/cancelled"');
      expect(html).toContain('name="card_number"');
    });

    it("pays with 4242…: session complete and paid, redirect to success_url, signed webhook verifies", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams());
      const res = await payOnPage(session, "4242 4242 4242 4242");
      expect(res.status).toBe(303);
      expect(res.headers.get("location")).toBe(`http://127.0.0.1:3000/charges/paid?session=${session.id}`);

      const paid = await stripe.checkout.sessions.retrieve(session.id);
      expect(paid).toMatchObject({ status: "complete", payment_status: "paid", url: null });
      expect(paid.payment_intent).toMatch(/^pi_/);

      const delivery = await waitFor(() => deliveriesFor(receiver.deliveries, session.id)[0]);
      const header = delivery.headers["stripe-signature"] as string;
      expect(header).toMatch(/^t=\d+,v1=[0-9a-f]{64}$/);
      const event = stripe.webhooks.constructEvent(delivery.body, header, WEBHOOK_SECRET, 300);
      expect(event.type).toBe("checkout.session.completed");
      expect(event.id).toMatch(/^evt_/);
      expect(event).toMatchObject({ object: "event", livemode: false, api_version: Stripe.API_VERSION });
      const object = event.data.object as Stripe.Checkout.Session;
      expect(object).toMatchObject({ id: session.id, payment_status: "paid", status: "complete", client_reference_id: "charge-77", metadata: { charge: "77" } });

      // Paying again is not possible: the page says it is done.
      const twice = await payOnPage(session, "4242424242424242");
      expect(twice.headers.get("x-payment-outcome")).toBe("session-complete");
      expect(await twice.text()).toContain("This payment has been made");
    });

    it("declines 4000 0000 0000 0002 on the page, sends nothing, and lets the payer retry", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams());
      const declined = await payOnPage(session, "4000 0000 0000 0002");
      expect(declined.status).toBe(200);
      expect(declined.headers.get("x-payment-outcome")).toBe("declined");
      const html = await declined.text();
      expect(html).toContain("Your card was declined.");
      expect(html).toContain('value="4000 0000 0000 0002"');
      expect(html).toContain(`action="/pay/${session.id}"`);

      const still = await stripe.checkout.sessions.retrieve(session.id);
      expect(still).toMatchObject({ status: "open", payment_status: "unpaid", payment_intent: null });
      expect((await fakeEvents(fake)).filter((e) => e.event.data.object.id === session.id)).toEqual([]);
      await sleep(150);
      expect(deliveriesFor(receiver.deliveries, session.id)).toHaveLength(0);

      const retry = await payOnPage(session, "4242424242424242");
      expect(retry.status).toBe(303);
      expect((await stripe.checkout.sessions.retrieve(session.id)).payment_status).toBe("paid");
    });

    it("rejects malformed card input with a message at the page", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams());
      const luhn = await payOnPage(session, "4242 4242 4242 4241");
      expect(luhn.headers.get("x-payment-outcome")).toBe("invalid");
      expect(await luhn.text()).toContain("Your card number is invalid.");
      const past = await payOnPage(session, "4242424242424242", { card_expiry: "01/20" });
      expect(await past.text()).toContain("expiration date is in the past");
      const cvc = await payOnPage(session, "4242424242424242", { card_cvc: "1" });
      expect(await cvc.text()).toContain("security code is incomplete");
      expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe("open");
    });

    it("asks for an e-mail address when the session has none, and reports it in customer_details", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams({ customer_email: undefined }));
      expect(await (await fetch(session.url!)).text()).toContain('name="email"');
      const without = await payOnPage(session, "4242424242424242");
      expect(without.headers.get("x-payment-outcome")).toBe("invalid");
      expect(await without.text()).toContain("email address is incomplete");
      const withEmail = await payOnPage(session, "4242424242424242", { email: "payer@kestrel-ridge.example" });
      expect(withEmail.status).toBe(303);
      const paid = await stripe.checkout.sessions.retrieve(session.id);
      expect(paid.customer_details).toMatchObject({ email: "payer@kestrel-ridge.example", name: "A. Observer" });
    });

    it("expires a session on its own once expires_at has passed", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams({ expires_at: Math.floor(Date.now() / 1000) + 31 * 60 }));
      vi.useFakeTimers({ toFake: ["Date"] });
      try {
        vi.setSystemTime(Date.now() + 32 * 60 * 1000);
        const later = await stripe.checkout.sessions.retrieve(session.id);
        expect(later).toMatchObject({ status: "expired", url: null });
      } finally {
        vi.useRealTimers();
      }
      const delivery = await waitFor(() => deliveriesFor(receiver.deliveries, session.id)[0]);
      expect(JSON.parse(delivery.body).type).toBe("checkout.session.expired");

      const tooSoon = await stripe.checkout.sessions
        .create(chargeParams({ expires_at: Math.floor(Date.now() / 1000) + 60 }))
        .catch((e: unknown) => e);
      expect(tooSoon).toMatchObject({ type: "StripeInvalidRequestError", param: "expires_at" });
    });

    it("signatures: a forged one, a wrong secret and a stale timestamp are refused by constructEvent", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams());
      await payOnPage(session, "4242424242424242");
      const delivery = await waitFor(() => deliveriesFor(receiver.deliveries, session.id)[0]);
      const header = delivery.headers["stripe-signature"] as string;
      const t = Number(/t=(\d+)/.exec(header)![1]);

      expect(() => stripe.webhooks.constructEvent(delivery.body, header, WEBHOOK_SECRET, 300)).not.toThrow();

      const tampered = delivery.body.replace('"paid"', '"unpaid"');
      expect(tampered).not.toBe(delivery.body);
      expect(() => stripe.webhooks.constructEvent(tampered, header, WEBHOOK_SECRET, 300)).toThrow(
        Stripe.errors.StripeSignatureVerificationError,
      );
      const forged = header.replace(/v1=[0-9a-f]+/, `v1=${"0".repeat(64)}`);
      expect(() => stripe.webhooks.constructEvent(delivery.body, forged, WEBHOOK_SECRET, 300)).toThrow(
        Stripe.errors.StripeSignatureVerificationError,
      );
      expect(() => stripe.webhooks.constructEvent(delivery.body, header, "whsec_someone_else", 300)).toThrow(
        Stripe.errors.StripeSignatureVerificationError,
      );

      // The same genuine header, checked 301 s after it was made: outside the 300 s tolerance.
      expect(() =>
        stripe.webhooks.constructEvent(delivery.body, header, WEBHOOK_SECRET, 300, undefined, (t + 301) * 1000),
      ).toThrow(/tolerance/);
      // And a header the fake's signer makes for an old timestamp is refused now.
      const old = signatureHeader(WEBHOOK_SECRET, delivery.body, Math.floor(Date.now() / 1000) - 600);
      expect(() => stripe.webhooks.constructEvent(delivery.body, old, WEBHOOK_SECRET, 300)).toThrow(/tolerance/);
    });

    it("resend delivers the same event (same id, same body) again, freshly signed", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams());
      await payOnPage(session, "4242424242424242");
      const first = await waitFor(() => deliveriesFor(receiver.deliveries, session.id)[0]);
      const event = stripe.webhooks.constructEvent(first.body, first.headers["stripe-signature"] as string, WEBHOOK_SECRET);

      const res = await fetch(`${fake.url}/_fake/events/${event.id}/resend`, {
        method: "POST",
        headers: { authorization: `Bearer ${SECRET_KEY}` },
      });
      expect(res.status).toBe(200);
      const second = await waitFor(() => deliveriesFor(receiver.deliveries, session.id)[1]);
      expect(second.body).toBe(first.body);
      const again = stripe.webhooks.constructEvent(second.body, second.headers["stripe-signature"] as string, WEBHOOK_SECRET);
      expect(again.id).toBe(event.id);

      const listed = (await fakeEvents(fake)).find((e) => e.id === event.id)!;
      expect(listed).toMatchObject({ type: "checkout.session.completed", delivered: true });
      expect(listed.attempts).toHaveLength(2);

      const missing = await fetch(`${fake.url}/_fake/events/evt_nope/resend`, {
        method: "POST",
        headers: { authorization: `Bearer ${SECRET_KEY}` },
      });
      expect(missing.status).toBe(404);
      const anonymous = await fetch(`${fake.url}/_fake/events`);
      expect(anonymous.status).toBe(401);
    });

    it("expire: status expired, checkout.session.expired sent, cannot expire or pay afterwards", async () => {
      const session = await stripe.checkout.sessions.create(chargeParams());
      const expired = await stripe.checkout.sessions.expire(session.id);
      expect(expired).toMatchObject({ id: session.id, status: "expired", payment_status: "unpaid", url: null });

      const delivery = await waitFor(() => deliveriesFor(receiver.deliveries, session.id)[0]);
      const event = stripe.webhooks.constructEvent(delivery.body, delivery.headers["stripe-signature"] as string, WEBHOOK_SECRET);
      expect(event.type).toBe("checkout.session.expired");
      expect((event.data.object as Stripe.Checkout.Session).id).toBe(session.id);

      await expect(stripe.checkout.sessions.expire(session.id)).rejects.toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
      const pay = await payOnPage(session, "4242424242424242");
      expect(pay.headers.get("x-payment-outcome")).toBe("session-expired");
      expect(await pay.text()).toContain("expired");
      expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe("expired");
    });
  });
});

describe("webhook retries", () => {
  it("retries with back-off until the app answers 2xx", async () => {
    const receiver = await startReceiver((n) => (n < 3 ? 500 : 200));
    const fake = await createPaymentFake({
      port: 0,
      secretKey: SECRET_KEY,
      webhookSecret: WEBHOOK_SECRET,
      webhookUrl: receiver.url,
      webhookRetryDelaysMs: [30, 60, 90, 120],
    });
    try {
      const stripe = sdk(fake);
      const session = await stripe.checkout.sessions.create(chargeParams());
      await payOnPage(session, "4242424242424242");
      await waitFor(() => receiver.deliveries.length >= 3);
      await sleep(300);
      expect(receiver.deliveries).toHaveLength(3);
      const ids = receiver.deliveries.map((d) => JSON.parse(d.body).id);
      expect(new Set(ids).size).toBe(1);
      const [record] = await fakeEvents(fake);
      expect(record.delivered).toBe(true);
      expect(record.attempts).toMatchObject([{ status: 500 }, { status: 500 }, { status: 200 }]);
    } finally {
      await fake.close();
      await receiver.close();
    }
  });

  it("gives up after five attempts when the app is down, and says so", async () => {
    const gone = await startReceiver();
    const deadUrl = gone.url;
    await gone.close();
    const fake = await createPaymentFake({
      port: 0,
      secretKey: SECRET_KEY,
      webhookSecret: WEBHOOK_SECRET,
      webhookUrl: deadUrl,
      webhookRetryDelaysMs: [20, 20, 20, 20],
    });
    try {
      const session = await sdk(fake).checkout.sessions.create(chargeParams());
      await payOnPage(session, "4242424242424242");
      // Five attempts 20 ms apart are long over after half a second; a sixth would be a bug.
      await sleep(500);
      const [event] = await fakeEvents(fake);
      expect(event.delivered).toBe(false);
      expect(event.attempts).toHaveLength(5);
      expect(event.attempts[0]).toMatchObject({ error: expect.stringMatching(/ECONNREFUSED|connect/) });
    } finally {
      await fake.close();
    }
  });
});

describe("start-up", () => {
  it("refuses to bind anything but loopback, and refuses a live key", async () => {
    await expect(createPaymentFake({ host: "0.0.0.0", port: 0, secretKey: SECRET_KEY, webhookSecret: WEBHOOK_SECRET })).rejects.toThrow(/loopback/);
    await expect(createPaymentFake({ port: 0, secretKey: "sk_live_123", webhookSecret: WEBHOOK_SECRET })).rejects.toThrow(/test secret key/);
    await expect(createPaymentFake({ port: 0, secretKey: SECRET_KEY, webhookSecret: "" })).rejects.toThrow(/signing secret/);
  });

  it("without a webhook URL records events but delivers none", async () => {
    const fake = await createPaymentFake({ port: 0, secretKey: SECRET_KEY, webhookSecret: WEBHOOK_SECRET });
    try {
      const session = await sdk(fake).checkout.sessions.create(chargeParams());
      await payOnPage(session, "4242424242424242");
      const [event] = await fakeEvents(fake);
      expect(event).toMatchObject({ type: "checkout.session.completed", delivered: false, attempts: [] });
    } finally {
      await fake.close();
    }
  });
});
