// Submission through HTTP: the checklist, refusals (incomplete, Co-I, deadline), codes per call
// under concurrency, receipts with the PDF, read-only after submission, withdraw and reopen.
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, Call, OutgoingMail, Proposal, ProposalMember, Target, User, sequelize } from "~/models/index.server";
import { createProposal } from "~/lib/proposals/proposals.server";
import { submitProposal } from "~/lib/proposals/submit.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { waitForMail } from "../helpers/maildev";
import { testEnv } from "../helpers/env";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

/** 014/27A for serial 14 of 2027A: the serial first, then the short semester (written out here, not by the code under test). */
const code = (semesterCode: string, serial: number) => `${String(serial).padStart(3, "0")}/${semesterCode.slice(2)}`;

type Person = Awaited<ReturnType<typeof newUser>>;
let pi: Person;

async function post(path: string, cookie: string, values: Record<string, string | number>) {
  return (await request()).post(path).set("Cookie", cookie).type("form").send(form(values));
}

async function withCoI(proposalId: number) {
  const email = `coi-${Date.now()}-${Math.random().toString(36).slice(2, 7)}@test.example`;
  const res = await post(`/proposals/${proposalId}/team`, pi.cookie, { intent: "invite", email });
  expect(res.status).toBe(200);
  await User.create({ email, name: "Submitting Co-I", institution: "Test Institute", lastSignInAt: null });
  const cookie = await sessionCookieFor(email);
  expect((await (await request()).get(`/proposals/${proposalId}`).set("Cookie", cookie)).status).toBe(200);
  return { email, cookie };
}

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Submitting PI" });
});

describe("the checklist", () => {
  it("shows what is missing on an empty draft and refuses to submit it, saying why", async () => {
    const call = await testCall();
    const p = await createProposal({ user: pi.user, callId: call.id, title: "Empty draft for the checklist", abstract: "" });
    const page = await (await request()).get(`/proposals/${p.id}`).set("Cookie", pi.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("Missing: an abstract, a science category.");
    expect(page.text).toContain("No target yet.");
    expect(page.text).toContain("No science case uploaded yet.");
    const res = await post(`/proposals/${p.id}/submit`, pi.cookie, { intent: "submit" });
    expect(res.status).toBe(409);
    expect(res.text).toContain("Not submitted:");
    expect(res.text).toContain("at least one target");
    expect((await Proposal.findByPk(p.id))!).toMatchObject({ status: "draft", code: null });
  });

  it("lists a target without observation by name", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id });
    await Target.create({ proposalId: proposal.id, name: "Forgotten Field", raDeg: 200, decDeg: 20, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 15, band: "V", notes: null });
    const page = await (await request()).get(`/proposals/${proposal.id}`).set("Cookie", pi.cookie);
    expect(page.text).toContain("No observation yet for Forgotten Field.");
    expect((await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "submit" })).status).toBe(409);
  });
});

describe("submission", () => {
  let call: Call;
  let proposalId: number;
  let coi: { email: string; cookie: string };
  beforeAll(async () => {
    call = await testCall();
    proposalId = (await readyProposal({ user: pi.user, callId: call.id, title: "Ready programme for submission" })).proposal.id;
    coi = await withCoI(proposalId);
  });

  it("a Co-I cannot submit", async () => {
    const res = await post(`/proposals/${proposalId}/submit`, coi.cookie, { intent: "submit" });
    expect(res.status).toBe(403);
    expect((await Proposal.findByPk(proposalId))!.status).toBe("draft");
  });

  it("the PI submits: code 001/<short semester>, state, time, audit, and a receipt with the PDF to PI and Co-I", async () => {
    const page = await (await request()).get(`/proposals/${proposalId}`).set("Cookie", pi.cookie);
    expect(page.text).toContain("Ready to send");
    expect(page.text).not.toContain("still missing before it can be sent");
    const res = await post(`/proposals/${proposalId}/submit`, pi.cookie, { intent: "submit" });
    expect(res.status).toBe(200);
    const p = (await Proposal.findByPk(proposalId))!;
    expect(p.code).toBe(code(call.semesterCode, 1));
    expect(p.serial).toBe(1);
    expect(p.status).toBe("submitted");
    expect(p.submittedAt).toBeInstanceOf(Date);
    expect(res.text).toContain(`Submitted as ${code(call.semesterCode, 1)}`);
    expect(await AuditEntry.findOne({ where: { proposalId, action: "proposal.submitted" } })).toMatchObject({ details: { code: p.code, keptCode: false } });
    for (const to of [pi.email, coi.email]) {
      // Exactly one receipt row each, queued by the submission; the worker builds the PDF when it sends.
      const rows = await OutgoingMail.findAll({ where: { toAddress: to, subject: `Nightshare receipt: ${p.code} submitted` } });
      expect(rows).toHaveLength(1);
      expect(rows[0]).toMatchObject({ kind: "proposal-receipt", payload: { proposalId, code: p.code }, attachments: null });
    }
    const caught = await waitForMail(coi.email, new RegExp(`receipt: ${p.code!.replace("/", "\\/")}`));
    expect(caught.text).toContain("The attached PDF is the proposal");
    expect(caught.attachments).toHaveLength(1);
    expect(caught.attachments?.[0]).toMatchObject({ contentType: "application/pdf" });
    expect((caught.attachments![0] as unknown as { filename: string }).filename).toBe(`${p.code!.replace("/", "-")}.pdf`); // maildev's field name
    const att = caught.attachments![0];
    const file = await fetch(`${testEnv.maildevUrl}/api/email/${caught.id}/attachment/${encodeURIComponent(att.generatedFileName ?? att.fileName)}`);
    expect(file.status).toBe(200);
    const bytes = Buffer.from(await file.arrayBuffer());
    expect(bytes.subarray(0, 5).toString()).toBe("%PDF-");
    expect(bytes.byteLength).toBeGreaterThan(1000);
  });

  it("after submission the proposal is read-only, and says so", async () => {
    const page = await (await request()).get(`/proposals/${proposalId}`).set("Cookie", coi.cookie);
    expect(page.text).toContain("and therefore read-only");
    const res = await post(`/proposals/${proposalId}/targets`, coi.cookie, { intent: "create", name: "Late addition", ra: "10", dec: "10" });
    expect(res.status).toBe(409);
    expect(res.text).toContain("so it is read-only");
    expect(await Target.count({ where: { proposalId, name: "Late addition" } })).toBe(0);
    const version = (await Proposal.findByPk(proposalId))!.version;
    const overview = await (await request()).post(`/proposals/${proposalId}?index`).set("Cookie", pi.cookie).type("form").send(form({ intent: "save", version, title: "Changed after submission", abstract: "", scienceCategory: "" }));
    expect(overview.status).toBe(409);
    expect((await Proposal.findByPk(proposalId))!.title).toBe("Ready programme for submission");
    expect((await post(`/proposals/${proposalId}/submit`, pi.cookie, { intent: "submit" })).status).toBe(409);
  });

  it("the PDF can be downloaded by the team at any time, not by others", async () => {
    const res = await (await request()).get(`/proposals/${proposalId}/pdf`).set("Cookie", pi.cookie).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on("data", (c: Buffer) => chunks.push(c));
      r.on("end", () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    expect(res.headers["content-disposition"]).toContain(`${code(call.semesterCode, 1).replace("/", "-")}.pdf`);
    expect((res.body as Buffer).subarray(0, 5).toString()).toBe("%PDF-");
    const stranger = await newUser();
    expect((await (await request()).get(`/proposals/${proposalId}/pdf`).set("Cookie", stranger.cookie)).status).toBe(404);
  });

  it("a Co-I cannot withdraw; the PI withdraws, reopens as a draft, resubmits and keeps the code", async () => {
    expect((await post(`/proposals/${proposalId}/submit`, coi.cookie, { intent: "withdraw" })).status).toBe(403);
    const withdraw = await post(`/proposals/${proposalId}/submit`, pi.cookie, { intent: "withdraw" });
    expect(withdraw.status).toBe(200);
    expect((await Proposal.findByPk(proposalId))!.status).toBe("withdrawn");
    expect((await post(`/proposals/${proposalId}/submit`, pi.cookie, { intent: "withdraw" })).status).toBe(409);
    expect((await post(`/proposals/${proposalId}/submit`, coi.cookie, { intent: "reopen" })).status).toBe(403);
    const reopen = await post(`/proposals/${proposalId}/submit`, pi.cookie, { intent: "reopen" });
    expect(reopen.status).toBe(200);
    expect((await Proposal.findByPk(proposalId))!).toMatchObject({ status: "draft", code: code(call.semesterCode, 1) });
    // a second proposal of the same call takes the next serial meanwhile
    const other = (await readyProposal({ user: pi.user, callId: call.id, title: "Second programme of the call" })).proposal.id;
    expect((await post(`/proposals/${other}/submit`, pi.cookie, { intent: "submit" })).status).toBe(200);
    expect((await Proposal.findByPk(other))!.code).toBe(code(call.semesterCode, 2));
    const again = await post(`/proposals/${proposalId}/submit`, pi.cookie, { intent: "submit" });
    expect(again.status).toBe(200);
    expect((await Proposal.findByPk(proposalId))!).toMatchObject({ status: "submitted", code: code(call.semesterCode, 1), serial: 1 });
    expect(await AuditEntry.findOne({ where: { proposalId, action: "proposal.submitted" }, order: [["id", "DESC"]] })).toMatchObject({ details: { keptCode: true } });
    const history = await (await request()).get(`/proposals/${proposalId}/change-log`).set("Cookie", coi.cookie);
    expect(history.text).toContain(`Withdrew the proposal; the team was told by e-mail (${pi.email}, ${coi.email})`);
    expect(history.text).toContain("Reopened the proposal as a draft.");
    expect(history.text).toContain("(it kept its code)");
  });
});

describe("two submissions racing for a code", () => {
  it("two proposals of the same call submitted at once get distinct, consecutive codes", async () => {
    const call = await testCall();
    const a = (await readyProposal({ user: pi.user, callId: call.id, title: "Racing programme A" })).proposal.id;
    const b = (await readyProposal({ user: pi.user, callId: call.id, title: "Racing programme B" })).proposal.id;
    const results = await Promise.all([post(`/proposals/${a}/submit`, pi.cookie, { intent: "submit" }), post(`/proposals/${b}/submit`, pi.cookie, { intent: "submit" })]);
    expect(results.map((r) => r.status)).toEqual([200, 200]);
    const codes = (await Proposal.findAll({ where: { id: [a, b] } })).map((p) => p.code).sort();
    expect(codes).toEqual([code(call.semesterCode, 1), code(call.semesterCode, 2)]);
  });
});

describe("the deadline", () => {
  it("after the deadline: no submission, no withdrawal, no reopening, each saying why", async () => {
    const call = await testCall();
    const draft = (await readyProposal({ user: pi.user, callId: call.id, title: "Draft caught by the deadline" })).proposal.id;
    const submitted = (await readyProposal({ user: pi.user, callId: call.id, title: "Submitted before the deadline" })).proposal.id;
    const withdrawn = (await readyProposal({ user: pi.user, callId: call.id, title: "Withdrawn before the deadline" })).proposal.id;
    expect((await post(`/proposals/${submitted}/submit`, pi.cookie, { intent: "submit" })).status).toBe(200);
    expect((await post(`/proposals/${withdrawn}/submit`, pi.cookie, { intent: "withdraw" })).status).toBe(200);
    await call.update({ deadlineAt: new Date(Date.now() - 60_000) });

    const page = await (await request()).get(`/proposals/${draft}`).set("Cookie", pi.cookie);
    expect(page.text).toContain("The deadline passed on");
    const s = await post(`/proposals/${draft}/submit`, pi.cookie, { intent: "submit" });
    expect(s.status).toBe(409);
    expect(s.text).toContain("before the deadline");
    expect((await Proposal.findByPk(draft))!).toMatchObject({ status: "draft", code: null });
    const w = await post(`/proposals/${submitted}/submit`, pi.cookie, { intent: "withdraw" });
    expect(w.status).toBe(409);
    expect(w.text).toContain(`The deadline of call ${call.semesterCode} has passed`);
    expect((await Proposal.findByPk(submitted))!.status).toBe("submitted");
    const r = await post(`/proposals/${withdrawn}/submit`, pi.cookie, { intent: "reopen" });
    expect(r.status).toBe(409);
    expect(r.text).toContain("cannot be reopened");
    expect((await Proposal.findByPk(withdrawn))!.status).toBe("withdrawn");
    expect(await ProposalMember.count({ where: { proposalId: draft } })).toBe(1);
  });
});

describe("the receipt and the submission share one transaction", () => {
  const receiptRows = async (proposalId: number) =>
    (await OutgoingMail.findAll({ where: { kind: "proposal-receipt" } })).filter((m) => (m.payload as { proposalId?: number } | null)?.proposalId === proposalId);

  it("a failure after the receipt is queued leaves neither the submission nor the receipt", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id });
    // The database refuses the audit entry written after the receipt rows, inside the same transaction.
    await sequelize.query("DROP TRIGGER IF EXISTS test_fail_receipt_audit");
    await sequelize.query(
      `CREATE TRIGGER test_fail_receipt_audit BEFORE INSERT ON audit_log FOR EACH ROW
       BEGIN IF NEW.action = 'proposal.receipt_queued' AND NEW.proposalId = ${proposal.id} THEN SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'injected failure after the receipt'; END IF; END`,
    );
    try {
      await expect(submitProposal({ user: pi.user, proposalId: proposal.id })).rejects.toThrow(/injected failure/);
    } finally {
      await sequelize.query("DROP TRIGGER IF EXISTS test_fail_receipt_audit");
    }
    expect((await Proposal.findByPk(proposal.id))!).toMatchObject({ status: "draft", code: null, submittedAt: null });
    expect(await receiptRows(proposal.id)).toHaveLength(0);
    expect(await AuditEntry.count({ where: { proposalId: proposal.id, action: "proposal.submitted" } })).toBe(0);

    // Without the failure, the same submission commits with exactly one receipt row for the PI.
    const done = await submitProposal({ user: pi.user, proposalId: proposal.id });
    const rows = await receiptRows(proposal.id);
    expect(rows.map((r) => r.toAddress)).toEqual([pi.email]);
    expect(rows[0].subject).toBe(`Nightshare receipt: ${done.code} submitted`);
    expect((await Proposal.findByPk(proposal.id))!).toMatchObject({ status: "submitted", code: done.code });
  });
});
