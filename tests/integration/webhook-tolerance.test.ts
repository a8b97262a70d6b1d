// Issue 7, items 9 and 13: the webhook's timestamp tolerance holds in both directions, and a
// correctly signed but malformed body is a 400 JSON answer, never a 500.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stripe } from "~/lib/payments/payments.server";
import { PaymentEvent } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";

const secret = process.env.STRIPE_WEBHOOK_SECRET!;

function eventPayload(id: string) {
  return JSON.stringify({
    id,
    object: "event",
    type: "checkout.session.completed",
    created: Math.floor(Date.now() / 1000),
    data: { object: { id: `cs_test_${id}`, object: "checkout.session" } },
  });
}

async function post(payload: string, timestamp?: number) {
  const header = stripe.webhooks.generateTestHeaderString({ payload, secret, timestamp });
  return (await request()).post("/api/v1/payments/webhook").set("Content-Type", "application/json").set("Stripe-Signature", header).send(payload);
}

describe("payment webhook tolerance and body checks", () => {
  beforeAll(async () => {
    await ensureDatabase();
  });
  afterAll(async () => {
    await PaymentEvent.destroy({ where: { eventId: ["evt_tol_now", "evt_tol_future", "evt_tol_past", "evt_tol_near_future"] } });
  });

  it("refuses a timestamp 10 minutes in the future and records nothing", async () => {
    const res = await post(eventPayload("evt_tol_future"), Math.floor(Date.now() / 1000) + 600);
    expect(res.status).toBe(400);
    expect(res.body.issues[0].path).toBe("stripe-signature");
    expect(res.body.issues[0].message).toMatch(/tolerance/i);
    expect(await PaymentEvent.count({ where: { eventId: "evt_tol_future" } })).toBe(0);
  });

  it("refuses a timestamp 10 minutes in the past", async () => {
    const res = await post(eventPayload("evt_tol_past"), Math.floor(Date.now() / 1000) - 600);
    expect(res.status).toBe(400);
    expect(await PaymentEvent.count({ where: { eventId: "evt_tol_past" } })).toBe(0);
  });

  it("accepts a timestamp a minute ahead (clock skew within the tolerance) and one of now", async () => {
    const ahead = await post(eventPayload("evt_tol_near_future"), Math.floor(Date.now() / 1000) + 60);
    expect(ahead.status).toBe(200);
    const now = await post(eventPayload("evt_tol_now"));
    expect(now.status).toBe(200);
    expect(now.body).toEqual({ received: true, duplicate: false });
  });

  it.each([
    ["not JSON", "{ this is not json", "(body)"],
    ["JSON without an event id", JSON.stringify({ type: "checkout.session.completed", data: { object: {} } }), "id"],
    ["an event without data", JSON.stringify({ id: "evt_tol_nodata", type: "x" }), "data"],
    ["an id longer than the column", JSON.stringify({ id: "e".repeat(101), type: "x", data: { object: {} } }), "id"],
    ["a JSON array", "[1,2,3]", "(body)"],
  ])("a correctly signed body that is %s is a 400 JSON answer", async (_what, payload, path) => {
    const res = await post(payload);
    expect(res.status).toBe(400);
    expect(res.headers["content-type"]).toMatch(/application\/json/);
    expect(res.body.issues.map((i: { path: string }) => i.path)).toContain(path);
  });
});
