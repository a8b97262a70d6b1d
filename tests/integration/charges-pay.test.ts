// Charges end to end on MariaDB, the built app and the payment fake: the page charge (members and
// non-members), checkout through the SDK, "paid" only from the signed webhook (forged, replayed,
// duplicate, early, late, wrong-amount and expired cases), the receipt, waivers (audited), the CSV
// and who may see or pay what. Amounts are worked by hand beside each check.
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import Stripe from "stripe";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startCheckout } from "~/lib/payments/checkout.server";
import { stripe } from "~/lib/payments/payments.server";
import { AuditEntry, Call, Charge, OutgoingMail, PaymentEvent, Proposal, ProposalMember, User } from "~/models/index.server";
import { form, listen, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { testEnv } from "../helpers/env";
import { newUser } from "../helpers/session";
import { testCall } from "./proposals-fixtures";

const secret = process.env.STRIPE_WEBHOOK_SECRET!;
type Person = Awaited<ReturnType<typeof newUser>>;

let server: Awaited<ReturnType<typeof listen>>;
let call: Call;
let admin: Person;

beforeAll(async () => {
  await ensureDatabase();
  server = await listen();
  call = await testCall();
  // the semester ended yesterday; 80.00 EUR per page, 150.00 EUR per hour
  const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
  await call.update({ semesterStart: "2026-02-01", semesterEnd: yesterday, pageChargeCents: 8_000, accessFeePerHourCents: 15_000, currency: "eur" });
  admin = await newUser({ roles: ["admin"], name: "Office Person" });
});
afterAll(async () => server?.close());

// serials from 901 up within this file's call: codes stay unique (also for the migrations test's down)
let nextSerial = 900;

async function programme({ member = false, status = "accepted" as Proposal["status"], title = "Charged programme" } = {}) {
  const pi = await newUser({ name: member ? "Member PI" : "Visiting PI" });
  await User.update({ isMemberInstitution: member, institution: member ? "Consortium Institute" : "Far Valley Institute" }, { where: { id: pi.user.id } });
  const proposal = await Proposal.create({ callId: call.id, title, abstract: "Invented.", scienceCategory: null, semestersRequested: [], createdById: pi.user.id, status, ...(() => {
    const serial = ++nextSerial;
    return { serial, code: `${serial}/${call.semesterCode.slice(-3)}` };
  })() });
  await ProposalMember.create({ proposalId: proposal.id, userId: pi.user.id, email: pi.email, role: "pi", acceptedAt: new Date() });
  const coi = await newUser({ name: "Co-investigator" });
  await ProposalMember.create({ proposalId: proposal.id, userId: coi.user.id, email: coi.email, role: "coi", acceptedAt: new Date() });
  return { pi, coi, proposalId: proposal.id };
}

/** An access fee as the decisions step raises it (the amount written here by hand: 3 h × 150.00 = 450.00 EUR). */
async function accessFee(proposalId: number) {
  return Charge.create({ proposalId, callId: call.id, kind: "access_fee", semesterCode: call.semesterCode, hours: 3, pages: null, rateCents: 15_000, amountCents: 45_000, currency: "eur" });
}

const agent = async () => request();
const postForm = async (url: string, cookie: string, values: Record<string, string | number>) => (await agent()).post(url).set("Cookie", cookie).type("form").send(form(values)).redirects(0);
const checkout = async (chargeId: number, cookie: string, body = "") => (await agent()).post(`/api/v1/charges/${chargeId}/checkout`).set("Cookie", cookie).set("Content-Type", "application/json").send(body);

async function payOnHostedPage(url: string, card = "4242 4242 4242 4242") {
  return fetch(url, { method: "POST", redirect: "manual", headers: { "Content-Type": "application/x-www-form-urlencoded" }, body: new URLSearchParams({ card_number: card, card_expiry: "12 / 34", card_cvc: "123", card_name: "Visiting PI" }) });
}

async function until<T>(what: () => Promise<T | null | undefined | false>, ms = 15_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await what();
    if (v) return v;
    if (Date.now() > end) throw new Error("timed out waiting");
    await new Promise((r) => setTimeout(r, 150));
  }
}

function signed(event: Record<string, unknown>, key = secret) {
  const payload = JSON.stringify(event);
  return { payload, header: stripe.webhooks.generateTestHeaderString({ payload, secret: key }) };
}

function completedEvent(id: string, session: { id: string; chargeId: number; amount: number; currency?: string }) {
  return {
    id,
    object: "event",
    type: "checkout.session.completed",
    created: Math.floor(Date.now() / 1000),
    livemode: false,
    data: { object: { id: session.id, object: "checkout.session", payment_status: "paid", status: "complete", amount_total: session.amount, currency: session.currency ?? "eur", metadata: { chargeId: String(session.chargeId) } } },
  };
}

async function deliver({ payload, header }: { payload: string; header: string }) {
  return (await agent()).post("/api/v1/payments/webhook").set("Content-Type", "application/json").set("Stripe-Signature", header).send(payload);
}

describe("the page charge", () => {
  it("is pages × the call's rate, for a member's and a non-member's accepted programme, once", async () => {
    for (const member of [true, false]) {
      const { pi, proposalId } = await programme({ member });
      const res = await postForm(`/proposals/${proposalId}/charges`, pi.cookie, { intent: "declare-pages", pages: 12 });
      expect(res.status).toBe(200);
      const charge = await Charge.findOne({ where: { proposalId, kind: "page_charge" } });
      // 12 pages × 80.00 EUR = 960.00 EUR
      expect(charge?.amountCents).toBe(96_000);
      expect(charge?.pages).toBe(12);
      expect(charge?.state).toBe("raised");
      const again = await postForm(`/proposals/${proposalId}/charges`, pi.cookie, { intent: "declare-pages", pages: 3 });
      expect(again.status).toBe(409);
      expect(await Charge.count({ where: { proposalId, kind: "page_charge" } })).toBe(1);
      expect(await AuditEntry.count({ where: { action: "charge.page_charge_raised", entityId: charge!.id } })).toBe(1);
    }
  });

  it("is refused before the semester ends, for a programme not accepted, for a Co-I, and names the field", async () => {
    const waitlisted = await programme({ status: "waitlisted" });
    const r1 = await postForm(`/proposals/${waitlisted.proposalId}/charges`, waitlisted.pi.cookie, { intent: "declare-pages", pages: 5 });
    expect(r1.status).toBe(409);
    expect(r1.text).toContain("Only an accepted programme");
    const accepted = await programme();
    const coi = await postForm(`/proposals/${accepted.proposalId}/charges`, accepted.coi.cookie, { intent: "declare-pages", pages: 5 });
    expect(coi.status).toBe(403);
    for (const pages of ["0", "2.5", "abc", "-3", "100000"]) {
      const bad = await postForm(`/proposals/${accepted.proposalId}/charges`, accepted.pi.cookie, { intent: "declare-pages", pages });
      expect(bad.status, pages).toBe(400);
      expect(bad.text, pages).toContain("pages");
    }
    const running = await testCall();
    await running.update({ pageChargeCents: 8_000 });
    await Proposal.update({ callId: running.id }, { where: { id: accepted.proposalId } });
    const early = await postForm(`/proposals/${accepted.proposalId}/charges`, accepted.pi.cookie, { intent: "declare-pages", pages: 5 });
    expect(early.status).toBe(409);
    expect(early.text).toContain("after the semester");
    expect(await Charge.count({ where: { proposalId: [waitlisted.proposalId, accepted.proposalId] } })).toBe(0);
  });
});

describe("seeing and paying charges", () => {
  it("shows the charges to the team and to nobody else", async () => {
    const { pi, coi, proposalId } = await programme();
    const fee = await accessFee(proposalId);
    for (const who of [pi, coi]) {
      const res = await (await agent()).get(`/api/v1/proposals/${proposalId}/charges`).set("Cookie", who.cookie);
      expect(res.status).toBe(200);
      expect(res.body.charges.map((c: { id: number; amountCents: number }) => [c.id, c.amountCents])).toEqual([[fee.id, 45_000]]);
    }
    const other = await programme();
    const res = await (await agent()).get(`/api/v1/proposals/${proposalId}/charges`).set("Cookie", other.pi.cookie);
    expect(res.status).toBe(404);
    expect((await (await agent()).get(`/proposals/${proposalId}/charges`).set("Cookie", other.pi.cookie)).status).toBe(404);
    // the workspace shows the Charges tab for an accepted programme (a draft has none: workspace-flow.test.ts)
    const summary = await (await agent()).get(`/proposals/${proposalId}`).set("Cookie", coi.cookie);
    expect(summary.text).toContain(`href="/proposals/${proposalId}/charges"`);
    const bad = await (await agent()).get(`/api/v1/proposals/1e3/charges`).set("Cookie", pi.cookie);
    expect(bad.status).toBe(400);
    expect(bad.body.issues[0].path).toBe("proposalId");
  });

  it("lets only the PI open a payment page; another PI cannot; the amount comes from the server", async () => {
    const { pi, coi, proposalId } = await programme();
    const fee = await accessFee(proposalId);
    const stranger = await programme();
    expect((await checkout(fee.id, stranger.pi.cookie)).status).toBe(404);
    expect((await checkout(fee.id, coi.cookie)).status).toBe(403);
    const withAmount = await checkout(fee.id, pi.cookie, JSON.stringify({ amount: 1, amountCents: 1 }));
    expect(withAmount.status).toBe(400);
    expect(withAmount.body.issues.map((i: { path: string }) => i.path)).toEqual(["amount", "amountCents"]);
    expect((await checkout(fee.id, pi.cookie, "[1]")).body.issues[0].path).toBe("(body)");
    for (const id of ["0", "NaN", "1.5", "-1", "abc", "1e3", "9".repeat(40)]) {
      const bad = await (await agent()).post(`/api/v1/charges/${id}/checkout`).set("Cookie", pi.cookie).set("Content-Type", "application/json").send("");
      expect(bad.status, id).toBe(400);
      expect(bad.body.issues[0].path, id).toBe("chargeId");
    }
    expect((await Charge.findByPk(fee.id))?.state).toBe("raised");

    const first = await checkout(fee.id, pi.cookie);
    expect(first.status).toBe(200);
    const sessionId = /\/pay\/(cs_test_\w+)/.exec(first.body.url)?.[1];
    const session = await stripe.checkout.sessions.retrieve(sessionId!);
    expect(session.amount_total).toBe(45_000);
    expect(session.currency).toBe("eur");
    expect(session.metadata?.chargeId).toBe(String(fee.id));
    // a second press goes to the same page
    const second = await checkout(fee.id, pi.cookie);
    expect(second.body.url).toBe(first.body.url);
    expect(second.body.reused).toBe(true);
    const row = await Charge.findByPk(fee.id);
    expect(row?.state).toBe("awaiting_payment");
    expect(row?.checkoutSessionId).toBe(sessionId);
    // the workspace's Pay button: a redirect to the payment page
    const page = await postForm(`/proposals/${proposalId}/charges`, pi.cookie, { intent: "pay", chargeId: fee.id, amount: 1 });
    expect(page.status).toBe(302);
    expect(page.headers.location).toBe(first.body.url);
  });

  it("marks the charge paid from the fake's signed webhook after a test-card payment, mails a receipt, and records a replay once", async () => {
    const { pi, proposalId } = await programme({ title: "Parallaxes of the Sablewood field" });
    const fee = await accessFee(proposalId);
    const { url } = (await checkout(fee.id, pi.cookie)).body as { url: string };
    const sessionId = /\/pay\/(cs_test_\w+)/.exec(url)![1];
    // back before paying (or before the webhook): the return page waits and says so
    const early = await (await agent()).get(`/proposals/${proposalId}/charges?checkout=return&session=${sessionId}`).set("Cookie", pi.cookie);
    expect(early.text.replaceAll("<!-- -->", "")).toContain("Waiting for the payment service to confirm the payment of EUR 450.00");
    const declined = await payOnHostedPage(url, "4000 0000 0000 0002");
    expect(declined.headers.get("x-payment-outcome")).toBe("declined");
    expect((await Charge.findByPk(fee.id))?.state).toBe("awaiting_payment");

    const pay = await payOnHostedPage(url);
    expect(pay.status).toBe(303);
    expect(pay.headers.get("location")).toBe(`${testEnv.appUrl}/proposals/${proposalId}/charges?checkout=return&session=${sessionId}`);
    const paid = await until(async () => {
      const c = await Charge.findByPk(fee.id);
      return c?.state === "paid" ? c : null;
    });
    expect(paid.paymentEventId).toMatch(/^evt_/);
    const mails = await OutgoingMail.findAll({ where: { kind: "charge-receipt", toAddress: pi.email } });
    expect(mails).toHaveLength(1);
    expect(mails[0].subject).toContain("EUR 450.00");

    // the return page knows
    const back = await (await agent()).get(`/proposals/${proposalId}/charges?checkout=return&session=${sessionId}`).set("Cookie", pi.cookie);
    expect(back.status).toBe(200);
    expect(back.text.replaceAll("<!-- -->", "")).toContain("EUR 450.00 was received");

    // the fake delivers the same event again: still one event, one receipt, the first payment time
    const resend = await fetch(`${testEnv.paymentsUrl}/_fake/events/${paid.paymentEventId}/resend`, { method: "POST", headers: { Authorization: `Bearer ${process.env.STRIPE_SECRET_KEY}` } });
    expect(resend.status).toBe(200);
    await until(async () => {
      const r = (await (await fetch(`${testEnv.paymentsUrl}/_fake/events/${paid.paymentEventId}`, { headers: { Authorization: `Bearer ${process.env.STRIPE_SECRET_KEY}` } })).json()) as { attempts: { status?: number }[] };
      return r.attempts.filter((a) => a.status === 200).length >= 2;
    });
    expect(await PaymentEvent.count({ where: { eventId: paid.paymentEventId! } })).toBe(1);
    expect(await OutgoingMail.count({ where: { kind: "charge-receipt", toAddress: pi.email } })).toBe(1);
    expect((await Charge.findByPk(fee.id))?.paidAt?.getTime()).toBe(paid.paidAt?.getTime());
    expect((await checkout(fee.id, pi.cookie)).status).toBe(409);

    // the receipt PDF: the team downloads it; its text names the amount, the proposal and the rate
    const pdf = await (await agent()).get(`/proposals/${proposalId}/charges/${fee.id}/receipt.pdf`).set("Cookie", pi.cookie).buffer(true).parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => done(null, Buffer.concat(chunks)));
    });
    expect(pdf.status).toBe(200);
    expect(pdf.headers["content-type"]).toBe("application/pdf");
    const file = path.join(mkdtempSync(path.join(tmpdir(), "ns-receipt-")), `receipt-${fee.id}.pdf`);
    writeFileSync(file, pdf.body as Buffer);
    const text = spawnSync("pdftotext", [file, "-"], { encoding: "utf8" }).stdout;
    expect(text).toContain("EUR 450.00");
    expect(text).toContain("EUR 150.00");
    expect(text).toContain("Parallaxes of the Sablewood field");
    expect(text).toContain(`R${String(fee.id).padStart(6, "0")}/${call.semesterCode.slice(-3)}`);
    const stranger = await programme();
    expect((await (await agent()).get(`/proposals/${proposalId}/charges/${fee.id}/receipt.pdf`).set("Cookie", stranger.pi.cookie)).status).toBe(404);
  });

  it("refuses a forged webhook and changes nothing", async () => {
    const { proposalId } = await programme();
    const fee = await accessFee(proposalId);
    const event = completedEvent(`evt_forged_${fee.id}`, { id: `cs_test_forged_${fee.id}`, chargeId: fee.id, amount: 45_000 });
    const res = await deliver(signed(event, "whsec_somebody_else"));
    expect(res.status).toBe(400);
    const tampered = signed(event);
    expect((await deliver({ payload: tampered.payload.replace("45000", "1"), header: tampered.header })).status).toBe(400);
    expect((await Charge.findByPk(fee.id))?.state).toBe("raised");
    expect(await PaymentEvent.count({ where: { eventId: event.id } })).toBe(0);
  });

  it("applies a duplicate delivery once, an early one (before any session was stored) and a late one (after expiry)", async () => {
    const { pi, proposalId } = await programme();
    const early = await accessFee(proposalId);
    const event = signed(completedEvent(`evt_early_${early.id}`, { id: `cs_test_early_${early.id}`, chargeId: early.id, amount: 45_000 }));
    expect((await deliver(event)).body).toEqual({ received: true, duplicate: false });
    expect((await deliver(event)).body).toEqual({ received: true, duplicate: true });
    const row = await Charge.findByPk(early.id);
    expect(row?.state).toBe("paid");
    expect(row?.checkoutSessionId).toBe(`cs_test_early_${early.id}`);
    expect(await AuditEntry.count({ where: { action: "charge.paid", entityId: early.id } })).toBe(1);
    expect(await OutgoingMail.count({ where: { kind: "charge-receipt", toAddress: pi.email } })).toBe(1);
    // the browser comes back after the webhook: the page already knows
    const back = await (await agent()).get(`/proposals/${proposalId}/charges?checkout=return&session=cs_test_early_${early.id}`).set("Cookie", pi.cookie);
    expect(back.text).toContain("was received");

    // a page that expired, then (late) its payment's confirmation: the payment stands
    const other = await programme();
    const late = await accessFee(other.proposalId);
    const { url } = (await checkout(late.id, other.pi.cookie)).body as { url: string };
    const sessionId = /\/pay\/(cs_test_\w+)/.exec(url)![1];
    await stripe.checkout.sessions.expire(sessionId);
    await until(async () => (await Charge.findByPk(late.id))?.state === "raised");
    expect(await AuditEntry.count({ where: { action: "charge.checkout_expired", entityId: late.id } })).toBe(1);
    const lapsed = await (await agent()).get(`/proposals/${other.proposalId}/charges?checkout=return&session=${sessionId}`).set("Cookie", other.pi.cookie);
    expect(lapsed.text).toContain("expired before a payment was made");
    expect(lapsed.text).toContain("unpaid");
    await deliver(signed(completedEvent(`evt_late_${late.id}`, { id: sessionId, chargeId: late.id, amount: 45_000 })));
    expect((await Charge.findByPk(late.id))?.state).toBe("paid");
  });

  it("never marks a charge paid for another amount or currency than the charge's", async () => {
    const { proposalId } = await programme();
    const fee = await accessFee(proposalId);
    await deliver(signed(completedEvent(`evt_short_${fee.id}`, { id: `cs_test_short_${fee.id}`, chargeId: fee.id, amount: 100 })));
    await deliver(signed(completedEvent(`evt_usd_${fee.id}`, { id: `cs_test_usd_${fee.id}`, chargeId: fee.id, amount: 45_000, currency: "usd" })));
    expect((await Charge.findByPk(fee.id))?.state).toBe("raised");
    expect(await AuditEntry.count({ where: { action: "charge.payment_mismatch", entityId: fee.id } })).toBe(2);
  });

  it("says so when the PI leaves the payment page", async () => {
    const { pi, proposalId } = await programme();
    const fee = await accessFee(proposalId);
    const res = await (await agent()).get(`/proposals/${proposalId}/charges?checkout=left&charge=${fee.id}`).set("Cookie", pi.cookie);
    expect(res.text).toContain("You left the payment page without paying");
    expect((await Charge.findByPk(fee.id))?.state).toBe("raised");
  });

  it("opens a new payment page when the payment service no longer knows the stored one (a restarted fake)", async () => {
    const { pi, coi, proposalId } = await programme();
    const fee = await accessFee(proposalId);
    await fee.update({ state: "awaiting_payment", checkoutSessionId: `cs_test_forgotten_${fee.id}`, checkoutExpiresAt: new Date(Date.now() + 3_600_000) });
    const res = await checkout(fee.id, pi.cookie);
    expect(res.status).toBe(200);
    expect(res.body.reused).toBe(false);
    const row = await Charge.findByPk(fee.id);
    expect(row?.checkoutSessionId).not.toBe(`cs_test_forgotten_${fee.id}`);
    expect(res.body.url).toContain(row!.checkoutSessionId!);
    // the Co-I reads the same charge without a Pay button
    const page = await (await agent()).get(`/proposals/${proposalId}/charges`).set("Cookie", coi.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("The PI pays.");
    expect(page.text).not.toContain('name="intent" value="pay"');
  });

  it("gives a clear message and changes nothing when the payment service is down", async () => {
    const { pi, proposalId } = await programme();
    const fee = await accessFee(proposalId);
    // port 9 (discard) on loopback: nothing listens there in the test machine
    const down = new Stripe(process.env.STRIPE_SECRET_KEY!, { host: "127.0.0.1", port: 9, protocol: "http", maxNetworkRetries: 0, timeout: 2_000 });
    const refused = await startCheckout({ user: pi.user, chargeId: fee.id, client: down }).then(
      () => null,
      (e: unknown) => e as { status: number; message: string; field: string },
    );
    expect(refused?.status).toBe(503);
    expect(refused?.field).toBe("chargeId");
    expect(refused?.message).toMatch(/cannot be reached.*Nothing was charged/);
    const row = await Charge.findByPk(fee.id);
    expect(row?.state).toBe("raised");
    expect(row?.checkoutSessionId).toBeNull();
    expect(await AuditEntry.count({ where: { action: "charge.checkout_started", entityId: fee.id } })).toBe(0);
  });
});

describe("the office", () => {
  it("waives a charge with a reason, audited; refuses without one, for a paid charge and for others than admins", async () => {
    const { pi, proposalId } = await programme();
    const fee = await accessFee(proposalId);
    const noReason = await postForm("/admin/charges", admin.cookie, { intent: "waive", chargeId: fee.id, reason: " " });
    expect(noReason.status).toBe(400);
    expect(noReason.text).toContain("reason");
    expect((await postForm("/admin/charges", pi.cookie, { intent: "waive", chargeId: fee.id, reason: "Because" })).status).toBe(403);
    expect((await postForm("/admin/charges", admin.cookie, { intent: "waive", chargeId: "12abc", reason: "Because" })).status).toBe(400);
    const ok = await postForm("/admin/charges", admin.cookie, { intent: "waive", chargeId: fee.id, reason: "Instrument downtime cost the programme half its nights" });
    expect(ok.status).toBe(200);
    const row = await Charge.findByPk(fee.id);
    expect(row?.state).toBe("waived");
    expect(row?.waivedById).toBe(admin.user.id);
    const audit = await AuditEntry.findOne({ where: { action: "charge.waived", entityId: fee.id } });
    expect(audit?.actorId).toBe(admin.user.id);
    expect(audit?.details).toMatchObject({ reason: "Instrument downtime cost the programme half its nights", from: "raised" });
    expect((await checkout(fee.id, pi.cookie)).status).toBe(409);
    expect((await (await agent()).get(`/proposals/${proposalId}/charges/${fee.id}/receipt.pdf`).set("Cookie", pi.cookie)).status).toBe(404);

    // waiving a charge with an open payment page closes that page; its expiry leaves the waiver standing
    const open = await programme();
    const waiting = await accessFee(open.proposalId);
    const { url } = (await checkout(waiting.id, open.pi.cookie)).body as { url: string };
    const sessionId = /\/pay\/(cs_test_\w+)/.exec(url)![1];
    expect((await postForm("/admin/charges", admin.cookie, { intent: "waive", chargeId: waiting.id, reason: "Granted as director's discretionary time" })).status).toBe(200);
    expect((await stripe.checkout.sessions.retrieve(sessionId)).status).toBe("expired");
    await until(async () => (await PaymentEvent.findOne({ where: { objectId: sessionId, type: "checkout.session.expired" } })) !== null);
    expect((await Charge.findByPk(waiting.id))?.state).toBe("waived");
    expect((await AuditEntry.findOne({ where: { action: "charge.waived", entityId: waiting.id } }))?.details).toMatchObject({ from: "awaiting_payment" });

    const paidOne = await accessFee((await programme()).proposalId);
    await paidOne.update({ state: "paid", paidAt: new Date() });
    expect((await postForm("/admin/charges", admin.cookie, { intent: "waive", chargeId: paidOne.id, reason: "Too late" })).status).toBe(409);
  });

  it("lists every charge for admins only and exports them as CSV with spreadsheet formulas neutralised", async () => {
    const { proposalId } = await programme({ title: "=1+2 cluster field" });
    const fee = await accessFee(proposalId);
    const list = await (await agent()).get("/api/v1/admin/charges").set("Cookie", admin.cookie);
    expect(list.status).toBe(200);
    expect(list.body.charges.find((c: { id: number }) => c.id === fee.id)).toMatchObject({ state: "raised", amountCents: 45_000, title: "=1+2 cluster field", piInstitution: "Far Valley Institute" });
    const { pi } = await programme();
    expect((await (await agent()).get("/api/v1/admin/charges").set("Cookie", pi.cookie)).status).toBe(403);
    const csv = await (await agent()).get("/admin/charges.csv").set("Cookie", admin.cookie);
    expect(csv.status).toBe(200);
    const line = csv.text.split("\n").find((l) => l.startsWith(`${fee.id},`));
    // charge, proposal, title, call, kind, semester, hours, pages, rate, amount, currency, state
    expect(line?.split(",").slice(2, 12)).toEqual(["'=1+2 cluster field", call.semesterCode, "access fee", call.semesterCode, "3", "", "150.00", "450.00", "EUR", "raised"]);
  });
});
