// The semester check through HTTP on the test MariaDB: a job runs in its worker thread to done,
// the result's shape, the same seed the same answer, a changed allocation makes the last run
// stale, and the refusals (400 naming the field, 403, 404). The hand-reasoned values: at a clear
// fraction of 1 every small assured programme whose target is up in the semester completes; at a
// clear fraction of 0 nothing runs at all.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Proposal, ReviewAssignment, SemesterCheck, TelescopeClearFraction } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let chair: Person, reviewer: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let proposals: Proposal[];
let telescopeId: number;
const savedFractions: { telescopeId: number; month: number; clearFraction: number }[] = [];

const asJson = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

async function setClearFraction(value: number) {
  await TelescopeClearFraction.destroy({ where: {} });
  const rows = [];
  for (const t of [telescopeId]) for (let month = 1; month <= 12; month++) rows.push({ telescopeId: t, month, clearFraction: value });
  await TelescopeClearFraction.bulkCreate(rows);
}

async function runCheck(body: object) {
  const app = await request();
  const started = await app.post(`/api/v1/calls/${call.id}/semester-check`).set(asJson(chair.cookie)).send(body);
  expect(started.status, JSON.stringify(started.body)).toBe(202);
  expect(typeof started.body.id).toBe("number");
  const seen: string[] = [];
  for (let i = 0; i < 240; i++) {
    const res = await app.get(`/api/v1/semester-checks/${started.body.id}`).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    seen.push(res.body.status);
    if (res.body.status === "done" || res.body.status === "failed") return { id: started.body.id as number, body: res.body, seen };
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error("the check did not finish within 60 s");
}

beforeAll(async () => {
  await ensureDatabase();
  for (const f of await TelescopeClearFraction.findAll()) savedFractions.push({ telescopeId: f.telescopeId as number, month: f.month, clearFraction: f.clearFraction });
  chair = await newUser({ roles: ["chair"], name: "Check Chair" });
  reviewer = await newUser({ roles: ["reviewer"], name: "Check Reviewer" });
  const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Check Reviewer ${i}` })));
  call = await testCall();
  proposals = [];
  for (let i = 0; i < 3; i++) {
    const pi = await newUser({ name: `Check PI ${i}` });
    const { proposal, option } = await readyProposal({ user: pi.user, callId: call.id, title: `Semester check programme ${i}` });
    telescopeId = option.telescopeId;
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposals.push((await Proposal.findByPk(proposal.id))!);
  }
  for (const [r, reviewerRow] of reviewers.entries()) {
    for (const [c, p] of proposals.entries()) {
      const overall = [8, 6, 4][c] + r * 0.5;
      await ReviewAssignment.create({ callId: call.id, proposalId: p.id, reviewerId: reviewerRow.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
    }
  }
  const fill = await (await request()).post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(asJson(chair.cookie)).send("{}");
  expect(fill.status).toBe(200);
});

afterAll(async () => {
  await TelescopeClearFraction.destroy({ where: {} });
  if (savedFractions.length) await TelescopeClearFraction.bulkCreate(savedFractions);
});

describe("POST /api/v1/calls/:callId/semester-check and GET /api/v1/semester-checks/:id", () => {
  it("runs to done in its worker: at a clear fraction of 1 every assured programme completes", { timeout: 90_000 }, async () => {
    await setClearFraction(1);
    const { body, seen } = await runCheck({ realisations: 40, seed: 5 });
    expect(body.status, body.error).toBe("done");
    expect(seen.at(-1)).toBe("done");
    expect(body).toMatchObject({ callId: call.id, progress: 1, seed: 5, realisations: 40, stale: false, error: null });
    const result = body.result;
    expect(result.realisations).toBe(40);
    expect(result.semesterCode).toBe(call.semesterCode);
    expect(result.programmes.map((p: { proposalId: number }) => p.proposalId)).toEqual(proposals.map((p) => p.id));
    for (const p of result.programmes) {
      expect(p.tier).toBe("assured");
      expect(p.plannedVisits).toBe(1);
      expect(p.completionProbability).toBe(1);
      expect(p.expectedExecutedFraction).toBe(1);
      expect(p.flag).toBeNull();
      expect(p.expectedExecutedHours).toBeCloseTo(p.plannedHours, 9);
    }
    const used = result.telescopes.find((t: { telescopeId: number }) => t.telescopeId === telescopeId);
    expect(used.nights).toBe(181); // 2027-02-01 … 2027-07-31
    expect(used.expectedClearDarkHours).toBeCloseTo(used.darkHours, 6);
    expect(used.expectedUsedHours).toBeCloseTo(result.programmes.reduce((s: number, p: { plannedHours: number }) => s + p.plannedHours, 0), 3);
    // the other telescopes of the call have no clear fractions in this test: said in the notes
    const others = result.telescopes.filter((t: { telescopeId: number }) => t.telescopeId !== telescopeId);
    for (const t of others) expect(result.notes.join(" ")).toContain(`${t.name}: no clear fraction is set for February`);
  });

  it("at a clear fraction of 0 nothing is executed and the assured programmes are flagged", { timeout: 90_000 }, async () => {
    await setClearFraction(0);
    const { body } = await runCheck({ realisations: 10, seed: 1 });
    expect(body.status).toBe("done");
    for (const p of body.result.programmes) {
      expect(p.completionProbability).toBe(0);
      expect(p.expectedExecutedHours).toBe(0);
      expect(p.flag).toBe("assured-below-goal");
    }
  });

  it("gives the same answer for the same seed and defaults to 200 realisations, seed 1", { timeout: 120_000 }, async () => {
    await setClearFraction(0.5);
    const a = await runCheck({ realisations: 60, seed: 77 });
    const b = await runCheck({ seed: 77, realisations: 60 });
    expect(b.body.result).toEqual(a.body.result);
    const d = await runCheck({});
    expect(d.body).toMatchObject({ realisations: 200, seed: 1 });
    const row = await SemesterCheck.findByPk(d.id);
    expect(row?.requestedById).toBe(chair.user.id);
    expect(row?.inputHash).toMatch(/^[0-9a-f]{64}$/);
    expect(row?.inputHash).toBe((await SemesterCheck.findByPk(a.id))?.inputHash);
  });

  it("is stale once an allocation changes, and again fresh after a new run", { timeout: 120_000 }, async () => {
    const app = await request();
    const before = await runCheck({ realisations: 20, seed: 3 });
    expect(before.body.stale).toBe(false);
    const put = await app.put(`/api/v1/calls/${call.id}/allocation`).set(asJson(chair.cookie)).send({
      rows: [{ proposalId: proposals[0].id, telescopeId, moonCategory: "dark", semesterCode: call.semesterCode, hours: 7.5 }],
    });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    const old = await app.get(`/api/v1/semester-checks/${before.id}`).set("Cookie", chair.cookie);
    expect(old.body.stale).toBe(true);
    const after = await runCheck({ realisations: 20, seed: 3 });
    expect(after.body.stale).toBe(false);
    const first = after.body.result.programmes.find((p: { proposalId: number }) => p.proposalId === proposals[0].id);
    expect(first.allocatedHours).toBe(7.5);
    // a clear-fraction change makes it stale too
    await TelescopeClearFraction.update({ clearFraction: 0.8 }, { where: { telescopeId, month: 3 } });
    expect((await app.get(`/api/v1/semester-checks/${after.id}`).set("Cookie", chair.cookie)).body.stale).toBe(true);
  });

  it("answers bad input with 400 naming the field, others with 403, unknown ids with 404", async () => {
    const app = await request();
    const post = (body: unknown, cookie = chair.cookie, id: string | number = call.id) => app.post(`/api/v1/calls/${id}/semester-check`).set(asJson(cookie)).send(JSON.stringify(body));
    for (const [body, field] of [
      [{ realisations: 0 }, "realisations"],
      [{ realisations: 1001 }, "realisations"],
      [{ realisations: 2.5 }, "realisations"],
      [{ realisations: "200" }, "realisations"],
      [{ seed: -1 }, "seed"],
      [{ seed: 4_294_967_296 }, "seed"],
      [{ seed: null }, "seed"],
      [{ intent: "x" }, "intent"],
    ] as const) {
      const res = await post(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(JSON.stringify(res.body.issues), JSON.stringify(body)).toContain(field);
    }
    const notJson = await app.post(`/api/v1/calls/${call.id}/semester-check`).set(asJson(chair.cookie)).send("{realisations");
    expect(notJson.status).toBe(400);
    const badCall = await post({}, chair.cookie, "abc");
    expect(badCall.status).toBe(400);
    expect(JSON.stringify(badCall.body)).toContain("callId");
    expect((await post({}, chair.cookie, 99_999_999)).status).toBe(404);
    expect((await post({}, reviewer.cookie)).status).toBe(403);
    const unknown = await app.get(`/api/v1/semester-checks/99999999`).set("Cookie", chair.cookie);
    expect(unknown.status).toBe(404);
    expect(unknown.body.error).toMatch(/No such semester check/);
    const badId = await app.get(`/api/v1/semester-checks/1e3`).set("Cookie", chair.cookie);
    expect(badId.status).toBe(400);
    expect(JSON.stringify(badId.body)).toContain('"id"');
    const someId = (await SemesterCheck.findOne({ where: { callId: call.id } }))!.id;
    expect((await app.get(`/api/v1/semester-checks/${someId}`).set("Cookie", reviewer.cookie)).status).toBe(403);
  });
});
