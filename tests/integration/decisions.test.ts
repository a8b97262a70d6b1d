// Decisions through HTTP on the test MariaDB, with the app's own mail worker sending to the run's
// maildev: only from a locked allocation; letters carry each comment to the PI and nothing of the
// committee's; the e-mail, its PDF (pdftotext) and the PI's pages checked; send-all idempotent.
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, Charge, DecisionBatch, DecisionLetter, OutgoingMail, Proposal } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { testEnv } from "../helpers/env";
import { waitForMail } from "../helpers/maildev";
import { newUser } from "../helpers/session";
import { decidedCall, pdfText, REVIEWERS } from "./decisions-fixtures";

let f: Awaited<ReturnType<typeof decidedCall>>;
let unlocked: Awaited<ReturnType<typeof decidedCall>>;
const origin = () => new URL(testEnv.appUrl).origin;
const host = () => new URL(testEnv.appUrl).host;

const forbidden = () => [
  ...REVIEWERS.flatMap((r) => [r.name, r.institution]),
  ...f.proposals.flatMap((p) => p.committee),
  "Committee only",
  "Draft comment",
  "Draft Reviewer",
];

async function postPage(url: string, cookie: string, values: Record<string, string | number>) {
  return (await request()).post(url).set("Cookie", cookie).set("Origin", origin()).set("Host", host()).type("form").send(form(values)).redirects(0);
}

async function binary(url: string, cookie: string) {
  return (await request()).get(url).set("Cookie", cookie).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on("data", (c: Buffer) => chunks.push(c));
    r.on("end", () => cb(null, Buffer.concat(chunks)));
  });
}

async function untilDrained(batchId: number, cookie: string) {
  for (let i = 0; i < 120; i++) {
    const res = await (await request()).get(`/api/v1/decision-batches/${batchId}`).set("Cookie", cookie);
    if (res.body.done) return res.body;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`batch ${batchId} did not drain`);
}

beforeAll(async () => {
  await ensureDatabase();
  f = await decidedCall();
  unlocked = await decidedCall({ lock: false });
});

describe("decisions only from a locked allocation", () => {
  it("answers 409 for a call whose allocation is not locked, and queues nothing", async () => {
    const list = await (await request()).get(`/api/v1/calls/${unlocked.call.id}/decisions`).set("Cookie", unlocked.admin.cookie);
    expect(list.status).toBe(409);
    expect(list.body.issues[0].path).toBe("allocation");
    const before = await OutgoingMail.count();
    const send = await (await request()).post(`/api/v1/calls/${unlocked.call.id}/decisions/send`).set("Cookie", unlocked.admin.cookie).set("Content-Type", "application/json").send("{}");
    expect(send.status).toBe(409);
    expect(await OutgoingMail.count()).toBe(before);
    expect(await DecisionLetter.count({ where: { callId: unlocked.call.id } })).toBe(0);
    const page = await (await request()).get(`/admin/calls/${unlocked.call.id}/decisions`).set("Cookie", unlocked.admin.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("is not locked");
    const pageSend = await postPage(`/admin/calls/${unlocked.call.id}/decisions`, unlocked.admin.cookie, { intent: "send-all" });
    expect(pageSend.status).toBe(409);
  });

  it("refuses bad input with 400 naming the field, never a 500", async () => {
    const agent = await request();
    expect((await agent.get("/api/v1/calls/abc/decisions").set("Cookie", f.admin.cookie)).status).toBe(400);
    const extra = await (await request()).post(`/api/v1/calls/${f.call.id}/decisions/send`).set("Cookie", f.admin.cookie).set("Content-Type", "application/json").send(JSON.stringify({ all: true }));
    expect(extra.status).toBe(400);
    expect((await (await request()).get("/api/v1/decision-batches/-1").set("Cookie", f.admin.cookie)).body.issues[0].path).toBe("id");
    expect((await postPage(`/admin/calls/${f.call.id}/decisions`, f.admin.cookie, { intent: "explode" })).status).toBe(400);
    const badId = await postPage(`/admin/calls/${f.call.id}/decisions`, f.admin.cookie, { intent: "resend", proposalId: "1e3", reason: "test" });
    expect(badId.status).toBe(400);
    expect(badId.text).toContain("proposal must be a positive whole number");
    expect((await (await request()).get(`/api/v1/calls/${f.call.id}/decisions`).set("Cookie", f.chair.cookie)).status).toBe(403);
  });

  it("refuses a template with an unknown placeholder, naming it, and keeps what was typed", async () => {
    const res = await postPage(`/admin/calls/${f.call.id}/decisions`, f.admin.cookie, { intent: "save-template", outcome: "accepted", subject: "Decision on [[code]]", body: "Dear [[pi_name]], your reviewer was [[reviewer_name]]." });
    expect(res.status).toBe(400);
    expect(res.text).toContain("Unknown placeholder [[reviewer_name]]");
    expect(res.text).toContain("your reviewer was [[reviewer_name]]");
  });
});

describe("sending a call's decisions", () => {
  let batchId: number;

  it("lists each outcome with hours, tier and the anonymised comments, nothing of the committee's", async () => {
    const res = await (await request()).get(`/api/v1/calls/${f.call.id}/decisions`).set("Cookie", f.admin.cookie);
    expect(res.status).toBe(200);
    const [a, w, d] = f.proposals.map((p) => res.body.decisions.find((x: { proposalId: number }) => x.proposalId === p.proposal.id));
    expect(a).toMatchObject({ outcome: "accepted", tier: "queue", hours: [{ telescope: f.telescope.name, moonCategory: "dark", semesterCode: f.call.semesterCode, hours: 10.5 }], sent: null });
    expect(w).toMatchObject({ outcome: "waitlisted", hours: [], tier: null });
    expect(d).toMatchObject({ outcome: "declined", hours: [] });
    expect(a.comments.map((c: { label: string }) => c.label)).toEqual(["Reviewer 1", "Reviewer 2", "Reviewer 3"]);
    expect(a.comments.map((c: { text: string }) => c.text).sort()).toEqual([...f.proposals[0].comments].sort());
    const json = JSON.stringify(res.body);
    for (const word of forbidden()) expect(json).not.toContain(word);
  });

  it("queues every letter once, to PI and Co-Is, with the access fee raised in the same change", async () => {
    const res = await (await request()).post(`/api/v1/calls/${f.call.id}/decisions/send`).set("Cookie", f.admin.cookie).set("Content-Type", "application/json").send("{}");
    expect(res.status).toBe(202);
    expect(res.body).toMatchObject({ letters: 3, mails: 4 }); // accepted: PI + Co-I; waitlisted, declined: the PI
    batchId = res.body.batch.id;
    const charge = await Charge.findOne({ where: { proposalId: f.proposals[0].proposal.id } });
    expect(charge).toMatchObject({ kind: "access_fee", amountCents: 131_250, currency: "EUR", hours: 10.5 });
    for (const p of f.proposals) {
      expect((await Proposal.findByPk(p.proposal.id))!.decisionSentAt).toBeInstanceOf(Date);
      expect(await AuditEntry.count({ where: { proposalId: p.proposal.id, action: "decision.sent" } })).toBe(1);
    }
    expect((await DecisionLetter.findOne({ where: { proposalId: f.proposals[0].proposal.id } }))!.chargeId).toBe(charge!.id);
    // once letters are out, the chair cannot unlock the allocation under them
    const unlock = await (await request()).post(`/api/v1/calls/${f.call.id}/allocation/unlock`).set("Cookie", f.chair.cookie).set("Content-Type", "application/json").send(JSON.stringify({ reason: "Second thoughts" }));
    expect(unlock.status).toBe(409);
    expect(unlock.body.error).toContain("The decisions have been sent (3 letters)");
    const progress = await untilDrained(batchId, f.admin.cookie);
    expect(progress).toMatchObject({ total: 4, sent: 4, failed: 0, retrying: 0, queued: 0, done: true, percent: 100 });
  });

  it("a second send-all queues nothing; a single letter is re-sent on purpose and audited", async () => {
    const mails = await OutgoingMail.count();
    const again = await (await request()).post(`/api/v1/calls/${f.call.id}/decisions/send`).set("Cookie", f.admin.cookie).set("Content-Type", "application/json").send("{}");
    expect(again.status).toBe(200);
    expect(again.body.letters).toBe(0);
    expect(again.body.batch.id).toBe(batchId);
    expect(await OutgoingMail.count()).toBe(mails);
    expect(await DecisionBatch.count({ where: { callId: f.call.id } })).toBe(1);
    expect(await Charge.count({ where: { proposalId: f.proposals[0].proposal.id } })).toBe(1);

    const noReason = await postPage(`/admin/calls/${f.call.id}/decisions`, f.admin.cookie, { intent: "resend", proposalId: f.proposals[1].proposal.id, reason: "" });
    expect(noReason.status).toBe(400);
    const resent = await postPage(`/admin/calls/${f.call.id}/decisions`, f.admin.cookie, { intent: "resend", proposalId: f.proposals[1].proposal.id, reason: "The PI asked for it again" });
    expect(resent.status).toBe(200);
    expect(await OutgoingMail.count()).toBe(mails + 1);
    expect(await AuditEntry.findOne({ where: { proposalId: f.proposals[1].proposal.id, action: "decision.resent" } })).toMatchObject({ details: { reason: "The PI asked for it again", recipients: 1 } });
  });

  it("the e-mail and its PDF carry each comment to the PI, the hours, tier and fee, and no name, institution or committee comment", async () => {
    const p = f.proposals[0];
    for (const to of [p.pi.email, f.coi.email]) {
      const mail = await waitForMail(to, /^Decision on 001\//);
      for (const c of p.comments) expect(mail.text).toContain(c);
      expect(mail.text).toContain("EUR 1,312.50");
      expect(mail.text).toContain(`${f.telescope.name}, dark time, semester ${f.call.semesterCode}: 10.5 h`);
      expect(mail.text).toContain("in the queue tier");
      for (const word of forbidden()) expect(mail.text + (mail.html ?? "")).not.toContain(word);
      expect(mail.attachments).toHaveLength(1);
      const att = mail.attachments![0];
      expect(att.contentType).toBe("application/pdf");
      const file = await fetch(`${testEnv.maildevUrl}/api/email/${mail.id}/attachment/${encodeURIComponent(att.generatedFileName ?? att.fileName)}`);
      const text = (await pdfText(new Uint8Array(await file.arrayBuffer()))).replace(/\s+/g, " ");
      expect(text).toContain("Kestrel Ridge Observatory");
      expect(text).toContain("Accepted");
      expect(text).toContain("EUR 1,312.50");
      for (const c of p.comments) expect(text).toContain(c);
      for (const word of forbidden()) expect(text).not.toContain(word);
    }
    const declined = await waitForMail(f.proposals[2].pi.email, /^Decision on 003\//);
    for (const c of f.proposals[2].comments) expect(declined.text).toContain(c);
    expect(declined.text).toContain("was not allocated time");
  });

  it("the PI and Co-Is read the decision and download the letter; nobody else can", async () => {
    const p = f.proposals[0];
    for (const cookie of [p.pi.cookie, f.coi.cookie]) {
      const page = await (await request()).get(`/proposals/${p.proposal.id}/decision`).set("Cookie", cookie);
      expect(page.status).toBe(200);
      expect(page.text).toContain("Accepted");
      expect(page.text).toContain("10.5");
      for (const c of p.comments) expect(page.text).toContain(c);
      for (const word of forbidden()) expect(page.text).not.toContain(word);
      const pdf = await binary(`/proposals/${p.proposal.id}/decision-letter.pdf`, cookie);
      expect(pdf.status).toBe(200);
      expect(pdf.headers["content-disposition"]).toContain(`decision-001-${f.call.semesterCode.slice(2)}.pdf`);
      const text = (await pdfText(pdf.body as Buffer)).replace(/\s+/g, " ");
      for (const c of p.comments) expect(text).toContain(c);
      for (const word of forbidden()) expect(text).not.toContain(word);
    }
    const stranger = await newUser();
    expect((await (await request()).get(`/proposals/${p.proposal.id}/decision`).set("Cookie", stranger.cookie)).status).toBe(404);
    expect((await (await request()).get(`/proposals/${p.proposal.id}/decision-letter.pdf`).set("Cookie", stranger.cookie)).status).toBe(404);
    const reviewerPage = await (await request()).get(`/proposals/${p.proposal.id}/decision`).set("Cookie", f.reviewers[0].cookie);
    expect(reviewerPage.status).toBe(404);
  });
});
