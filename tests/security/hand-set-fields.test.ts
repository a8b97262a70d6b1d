// Fill by rank keeping hand-set allocations (board_entries.allocatedByHand, allocatedByHandById,
// chairRankById): a client may not set those flags itself. On the board's and the allocation's
// JSON APIs a field the route does not take is a 400 naming it (never silently dropped), scalars
// given as arrays are 400s naming the field, a proposer or reviewer is refused, and nothing
// changes; on the pages' own forms an extra field sets nothing.
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, AuditEntry, BoardEntry, Proposal, ReviewAssignment } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let chair: Person, other: Person, reviewer: Person, pi: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let proposals: Proposal[];
let cell: { telescopeId: number; moonCategory: "dark" | "grey" | "bright" };
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Hand Set Chair" });
  other = await newUser({ roles: ["chair"], name: "Hand Set Other Chair" });
  reviewer = await newUser({ roles: ["reviewer"], name: "Hand Set Reviewer" });
  pi = await newUser({ name: "Hand Set PI" });
  call = await testCall();
  proposals = [];
  for (let i = 0; i < 2; i++) {
    const { proposal } = await readyProposal({ user: (i === 0 ? pi : await newUser({ name: `Hand Set PI ${i}` })).user, callId: call.id, title: `Hand set programme ${i}` });
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposals.push((await Proposal.findByPk(proposal.id))!);
    await ReviewAssignment.create({ callId: call.id, proposalId: proposal.id, reviewerId: reviewer.user.id, status: "submitted", overall: 8 - i, science: 8, feasibility: 8, legacy: 8, submittedAt: new Date() });
  }
  const t = (await computeFeasibilitySheet({ proposalId: proposals[0].id })).totals.find((x) => x.semesterCode === call.semesterCode && x.hours > 0)!;
  cell = { telescopeId: t.telescopeId, moonCategory: t.moonCategory };
});

const row = (p: Proposal, hours = 3) => ({ proposalId: p.id, ...cell, semesterCode: call.semesterCode, hours });

describe("the hand-set flags from a client", () => {
  it("a field the API does not take (the flags, their setters, anything else) is a 400 naming it, and nothing changes", async () => {
    const app = await request();
    const [p0, p1] = proposals;
    const audits = await AuditEntry.count();
    const attempts: [string, string, object, string][] = [
      ["POST", `/api/v1/calls/${call.id}/allocation/fill-by-rank`, { replaceHandSet: false, allocatedByHand: true }, "allocatedByHand"],
      ["POST", `/api/v1/calls/${call.id}/allocation/fill-by-rank`, { allocatedByHandById: other.user.id }, "allocatedByHandById"],
      ["PUT", `/api/v1/calls/${call.id}/allocation`, { rows: [row(p0)], tiers: [{ proposalId: p0.id, tier: "queue", allocatedByHand: false }] }, "tiers.0.allocatedByHand"],
      ["PUT", `/api/v1/calls/${call.id}/allocation`, { rows: [row(p0)], tiers: [{ proposalId: p0.id, tier: "queue", allocatedByHandById: other.user.id }] }, "tiers.0.allocatedByHandById"],
      ["PUT", `/api/v1/calls/${call.id}/allocation`, { rows: [{ ...row(p0), allocatedByHand: false }], tiers: [{ proposalId: p0.id, tier: "queue" }] }, "rows.0.allocatedByHand"],
      ["PUT", `/api/v1/calls/${call.id}/allocation`, { rows: [], tiers: [], chairRankById: { [p1.id]: other.user.id } }, "chairRankById"],
      ["POST", `/api/v1/calls/${call.id}/board/rank`, { proposalId: p1.id, chairRank: 1, reason: "forged setter", chairRankById: other.user.id }, "chairRankById"],
      ["POST", `/api/v1/calls/${call.id}/board/rank`, { proposalId: p1.id, chairRank: 1, reason: "forged flag", allocatedByHand: true }, "allocatedByHand"],
    ];
    for (const [method, url, body, path] of attempts) {
      const res = await (method === "PUT" ? app.put(url) : app.post(url)).set(json(chair.cookie)).send(body);
      const where = `${method} ${url} ${JSON.stringify(body)}`;
      expect(res.status, `${where}: ${res.text.slice(0, 300)}`).toBe(400);
      expect(res.body.issues.map((i: { path: string }) => i.path), where).toContain(path);
      expect(res.body.issues.find((i: { path: string }) => i.path === path).message, where).toContain(path.split(".").pop());
    }
    expect(await BoardEntry.count({ where: { callId: call.id } })).toBe(0);
    expect(await Allocation.count({ where: { callId: call.id } })).toBe(0);
    expect(await AuditEntry.count()).toBe(audits);
  });

  it("replaceHandSet as an array, a string or a number is a 400 naming it", async () => {
    const app = await request();
    for (const replaceHandSet of [[true], "true", 1, null, { on: true }]) {
      const res = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(json(chair.cookie)).send({ replaceHandSet });
      expect(res.status, JSON.stringify(replaceHandSet)).toBe(400);
      expect(res.body.issues[0].path).toBe("replaceHandSet");
    }
    expect(await Allocation.count({ where: { callId: call.id } })).toBe(0);
  });

  it("a proposer or a reviewer cannot fill, set hours or move (403), and nothing changes", async () => {
    const app = await request();
    for (const who of [pi, reviewer]) {
      const fill = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(json(who.cookie)).send({ replaceHandSet: true });
      expect(fill.status).toBe(403);
      const put = await app.put(`/api/v1/calls/${call.id}/allocation`).set(json(who.cookie)).send({ rows: [row(proposals[0])], tiers: [{ proposalId: proposals[0].id, tier: "assured" }] });
      expect(put.status).toBe(403);
      const page = await app.post(`/committee/${call.id}/board`).set("Cookie", who.cookie).type("form").send(form({ intent: "fill", replaceHandSet: "on" }));
      expect(page.status).toBe(403);
      const sheet = await app.post(`/committee/${call.id}/allocation`).set(json(who.cookie))
        .send({ intent: "save", rows: [{ proposalId: proposals[0].id, tier: "assured", waitlisted: false, cells: [{ ...cell, semesterCode: call.semesterCode, hours: 4 }] }] });
      expect(sheet.status).toBe(403);
    }
    expect(await Allocation.count({ where: { callId: call.id } })).toBe(0);
    expect(await BoardEntry.count({ where: { callId: call.id } })).toBe(0);
  });

  it("the allocation page's own action: an extra allocatedByHand or setter on a row sets neither (hours changed there are the acting chair's)", async () => {
    const app = await request();
    const res = await app.post(`/committee/${call.id}/allocation`).set(json(chair.cookie)).send({
      intent: "save",
      rows: [{ proposalId: proposals[0].id, tier: "assured", waitlisted: false, allocatedByHand: false, allocatedByHandById: other.user.id, cells: [{ ...cell, semesterCode: call.semesterCode, hours: 4 }] }],
    });
    expect(res.status, res.text.slice(0, 300)).toBe(200);
    const entry = (await BoardEntry.findOne({ where: { proposalId: proposals[0].id } }))!;
    expect([entry.allocatedByHand, entry.allocatedByHandById]).toEqual([true, chair.user.id]);
    // and a board form's extra fields set nothing either: the fill keeps that row as hand-set
    const fill = await app.post(`/committee/${call.id}/board`).set("Cookie", chair.cookie).type("form").send(form({ intent: "fill", allocatedByHand: "false", allocatedByHandById: String(other.user.id) }));
    expect(fill.status).toBe(200);
    expect(await Allocation.sum("hours", { where: { proposalId: proposals[0].id } })).toBe(4);
    const after = (await BoardEntry.findOne({ where: { proposalId: proposals[0].id } }))!;
    expect([after.allocatedByHand, after.allocatedByHandById]).toEqual([true, chair.user.id]);
  });
});
