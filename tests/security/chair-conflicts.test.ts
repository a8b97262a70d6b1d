// A conflicted chair trying the direct calls (issue: the chair's own conflicts of interest): with
// their own cookie, every change to a proposal they are on the team of, or declared a conflict on,
// is a 403 JSON body naming the field and the proposal, never a 5xx, and nothing changes; every
// read (the APIs, the pages' data requests, the export) leaves out its grades, comments and
// reviewers. A chair invited to the team by address only, not yet signed up under it, counts too.
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, AuditEntry, BoardEntry, ProposalMember, ReviewAssignment } from "~/models/index.server";
import { decodeData, form, request, textBody } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { committeeNote, conflictedCall } from "../integration/chair-conflicts-fixtures";

type Fixture = Awaited<ReturnType<typeof conflictedCall>>;
let f: Fixture;
let invited: Awaited<ReturnType<typeof newUser>>;
let cell: { telescopeId: number; moonCategory: "dark" | "grey" | "bright" };
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });
const hiddenNotes = () => [0, 1, 2].flatMap((r) => [1, 2, 3].map((c) => committeeNote(c, r)));

beforeAll(async () => {
  await ensureDatabase();
  f = await conflictedCall("COI Attack");
  // invited by address after their session began: the invitation is not claimed (no user id on it)
  invited = await newUser({ roles: ["chair"], name: "COI Attack Invited Chair" });
  await ProposalMember.create({ proposalId: f.proposals[0].id, userId: null, email: invited.email, role: "coi", acceptedAt: null });
  const t = (await computeFeasibilitySheet({ proposalId: f.proposals[1].id })).totals.find((x) => x.semesterCode === f.call.semesterCode && x.hours > 0)!;
  cell = { telescopeId: t.telescopeId, moonCategory: t.moonCategory };
});

describe("a conflicted chair's direct changes", () => {
  it("are 403 with a JSON body naming the field and the proposal, and change nothing", async () => {
    const app = await request();
    const audits = await AuditEntry.count();
    const p = f.proposals;
    const row = (i: number, hours = 5) => ({ proposalId: p[i].id, ...cell, semesterCode: f.call.semesterCode, hours });
    const attempts: [string, string, unknown, string, number][] = [
      ["POST", `/api/v1/calls/${f.call.id}/board/rank`, { proposalId: p[1].id, chairRank: 1, reason: "team first" }, "proposalId", 1],
      ["POST", `/api/v1/calls/${f.call.id}/board/rank`, { proposalId: p[2].id, chairRank: null, reason: "back to computed" }, "proposalId", 2],
      ["PUT", `/api/v1/calls/${f.call.id}/allocation`, { rows: [row(3)], tiers: [{ proposalId: p[3].id, tier: "assured" }] }, "rows.0.proposalId", 3],
      ["PUT", `/api/v1/calls/${f.call.id}/allocation`, { rows: [], tiers: [{ proposalId: p[1].id, tier: "queue" }] }, "tiers.0.proposalId", 1],
      ["PUT", `/api/v1/calls/${f.call.id}/allocation`, { rows: [], tiers: [{ proposalId: p[2].id, tier: null, waitlisted: true }] }, "tiers.0.proposalId", 2],
      ["PUT", `/api/v1/calls/${f.call.id}/review/assignments`, { assignments: [{ proposalId: p[3].id, reviewerId: f.reviewers[0].user.id }] }, "assignments.0", 3],
    ];
    for (const [method, url, body, path, i] of attempts) {
      const res = await (method === "PUT" ? app.put(url) : app.post(url)).set(json(f.chair.cookie)).send(body as object);
      expect(res.status, `${method} ${url} ${JSON.stringify(body)}`).toBe(403);
      expect(res.body.issues[0].path).toBe(path);
      expect(res.body.error).toContain(`conflict on ${p[i].code}`);
    }
    // invited by address only: still on the team
    const byAddress = await app.post(`/api/v1/calls/${f.call.id}/board/rank`).set(json(invited.cookie)).send({ proposalId: p[0].id, chairRank: 1, reason: "invited" });
    expect(byAddress.status).toBe(403);
    expect(byAddress.body.error).toContain(`conflict on ${p[0].code}`);
    expect(await BoardEntry.count({ where: { callId: f.call.id } })).toBe(0);
    expect(await Allocation.count({ where: { callId: f.call.id } })).toBe(0);
    expect(await AuditEntry.count()).toBe(audits);
  });

  it("through the pages' own actions: a forged sheet, a move, a reassignment and a reopening are 403", async () => {
    const app = await request();
    const p = f.proposals;
    const sheet = await app.post(`/committee/${f.call.id}/allocation`).set(json(f.chair.cookie))
      .send({ intent: "save", rows: [{ proposalId: p[2].id, tier: "assured", waitlisted: false, cells: [{ ...cell, semesterCode: f.call.semesterCode, hours: 40 }] }] });
    expect(sheet.status).toBe(403);
    expect(sheet.text).toContain(`You have a conflict on ${p[2].code}`);
    const move = await app.post(`/committee/${f.call.id}/board`).set("Cookie", f.chair.cookie).type("form").send(form({ intent: "move", proposalId: p[3].id, chairRank: 1, reason: "mine" }));
    expect(move.status).toBe(403);
    const assignment = (await ReviewAssignment.findOne({ where: { proposalId: p[1].id, reviewerId: f.reviewers[0].user.id } }))!;
    const reassign = await app.post(`/committee/${f.call.id}`).set("Cookie", f.chair.cookie).type("form").send(form({ intent: "reassign", assignmentId: assignment.id, reviewerId: f.reviewers[1].user.id }));
    expect(reassign.status).toBe(403);
    const reopen = await app.post(`/committee/${f.call.id}`).set("Cookie", f.chair.cookie).type("form").send(form({ intent: "reopen", assignmentId: assignment.id }));
    expect(reopen.status).toBe(403);
    expect((await ReviewAssignment.findByPk(assignment.id))!.status).toBe("submitted");
    expect(await Allocation.count({ where: { callId: f.call.id } })).toBe(0);
  });
});

describe("a conflicted chair's writes in odd shapes", () => {
  it("an array, a repeated key or field, a mix with a proposal they may change: refused, nothing changes", async () => {
    const app = await request();
    const p = f.proposals;
    const rank = `/api/v1/calls/${f.call.id}/board/rank`;
    const asArray = await app.post(rank).set(json(f.chair.cookie)).send({ proposalId: [p[1].id], chairRank: 1, reason: "an array" });
    expect(asArray.status).toBe(400);
    expect(asArray.body.issues[0].path).toBe("proposalId");
    // JSON's last key wins: the conflicted one
    const repeated = await app.post(rank).set(json(f.chair.cookie)).send(`{"proposalId":${p[0].id},"chairRank":1,"reason":"repeated","proposalId":${p[1].id}}`);
    expect(repeated.status).toBe(403);
    expect(repeated.body.error).toContain(`conflict on ${p[1].code}`);
    const form2 = await app.post(`/committee/${f.call.id}/board`).set("Cookie", f.chair.cookie).type("form").send(`intent=move&proposalId=${p[0].id}&proposalId=${p[1].id}&chairRank=1&reason=twice`);
    expect(form2.status).toBeGreaterThanOrEqual(400);
    expect(form2.status).toBeLessThan(500);
    const before = await ReviewAssignment.count({ where: { callId: f.call.id } });
    const mixed = await app.put(`/api/v1/calls/${f.call.id}/review/assignments`).set(json(f.chair.cookie))
      .send({ assignments: [{ proposalId: p[0].id, reviewerId: f.other.user.id }, { proposalId: p[3].id, reviewerId: f.other.user.id }] });
    expect(mixed.status).toBe(403);
    expect(mixed.body.issues[0].path).toBe("assignments.1");
    expect(await ReviewAssignment.count({ where: { callId: f.call.id } })).toBe(before);
    expect(await BoardEntry.count({ where: { callId: f.call.id } })).toBe(0);
  });
});

describe("a conflicted chair's reads", () => {
  it("never carry the conflicted proposals' comments, reviewers or grades", async () => {
    const app = await request();
    const reads = [
      `/api/v1/calls/${f.call.id}/board`,
      `/api/v1/calls/${f.call.id}/review`,
      `/api/v1/calls/${f.call.id}/reviews`,
      `/committee/${f.call.id}/board.data`,
      `/committee/${f.call.id}/allocation.data`,
      `/committee/${f.call.id}.data`,
      `/committee/${f.call.id}/assignments.data`,
      `/committee/${f.call.id}/ranked-list.csv`,
      `/review/${f.proposals[1].id}.data`,
      `/review/${f.proposals[2].id}.data`,
      `/review/${f.proposals[3].id}.data`,
      `/committee.data`,
      `/review.data`,
      `/api/v1/review/assignments`,
      `/api/v1/calls/${f.call.id}/review/teams`,
      `/api/v1/calls/${f.call.id}/reproducibility`,
    ];
    for (const url of reads) {
      const res = await app.get(url).set("Cookie", f.chair.cookie);
      expect(res.status, url).toBe(200);
      const text = res.text || JSON.stringify(res.body);
      for (const note of hiddenNotes()) expect(text, url).not.toContain(note);
    }
    // what the other chair reads does hold them (the check above can fail)
    const theirs = await app.get(`/api/v1/calls/${f.call.id}/reviews`).set("Cookie", f.other.cookie);
    for (const note of hiddenNotes()) expect(JSON.stringify(theirs.body)).toContain(note);
    const board = await app.get(`/api/v1/calls/${f.call.id}/board`).set("Cookie", f.chair.cookie);
    for (const i of [1, 2, 3]) {
      const r = board.body.proposals.find((x: { proposalId: number }) => x.proposalId === f.proposals[i].id);
      expect([r.reviews, r.rawMean, r.normalisedScore, r.spread, r.disagreement, r.computedRank, r.rankInterval, r.probabilityAboveLine]).toEqual([null, null, null, null, null, null, null, null]);
    }
    const state = await app.get(`/api/v1/calls/${f.call.id}/review`).set("Cookie", f.chair.cookie);
    const hidden = new Set([1, 2, 3].map((i) => f.proposals[i].id));
    expect(state.body.assignments.filter((a: { proposalId: number }) => hidden.has(a.proposalId))).toEqual([]);
    expect(state.body.conflicts.filter((c: { proposalId: number }) => hidden.has(c.proposalId))).toEqual([]);
  });
});

/** A page's `.data` (React Router's single fetch), decoded: route id → its loader's data. */
async function pageData(path: string, cookie: string) {
  const res = await (await request())
    .get(path)
    .set("Cookie", cookie)
    .buffer(true)
    .parse(textBody);
  expect(res.status, path).toBe(200);
  return (await decodeData(res.body as string)) as Record<string, { data: never }>;
}

const csvColumn = (csv: string, name: string) => {
  const [header, ...lines] = csv.trim().split(/\r?\n/).map((l) => l.split(","));
  const i = header.indexOf(name);
  return lines.map((l) => l[i]);
};

describe("where a conflicted proposal sits in what the conflicted chair reads", () => {
  // computed order (MERITS, every reviewer graded all four): programme 0, 2, 1, 3
  let g: Fixture;
  let top: Awaited<ReturnType<typeof newUser>>;
  beforeAll(async () => {
    g = await conflictedCall("COI Order");
    // a chair on the team of the top-ranked programme only
    top = await newUser({ roles: ["chair"], name: "COI Order Top Chair" });
    await ProposalMember.create({ proposalId: g.proposals[0].id, userId: top.user.id, email: top.email, role: "coi", acceptedAt: new Date() });
  });

  it("the conflicted proposals come last, by proposal id, not in their computed order (board, allocation, both CSVs, fill's answer)", async () => {
    const app = await request();
    const p = g.proposals.map((x) => x.id);
    const codes = g.proposals.map((x) => x.code);
    const expected = [p[0], p[1], p[2], p[3]];
    // hours for every proposal, set by the other chair, so that the allocation CSV has lines
    const t = (await computeFeasibilitySheet({ proposalId: p[0] })).totals.find((x) => x.semesterCode === g.call.semesterCode && x.hours > 0)!;
    const put = await app.put(`/api/v1/calls/${g.call.id}/allocation`).set(json(g.other.cookie))
      .send({ rows: p.map((proposalId) => ({ proposalId, telescopeId: t.telescopeId, moonCategory: t.moonCategory, semesterCode: g.call.semesterCode, hours: 1 })), tiers: p.map((proposalId) => ({ proposalId, tier: "queue" })) });
    expect(put.status, JSON.stringify(put.body)).toBe(200);

    const board = await app.get(`/api/v1/calls/${g.call.id}/board`).set("Cookie", g.chair.cookie);
    expect(board.body.proposals.map((r: { proposalId: number }) => r.proposalId), "board API").toEqual(expected);
    // what the other chair reads is in computed order (so the check above can fail)
    const theirs = await app.get(`/api/v1/calls/${g.call.id}/board`).set("Cookie", g.other.cookie);
    expect(theirs.body.proposals.map((r: { proposalId: number }) => r.proposalId)).toEqual([p[0], p[2], p[1], p[3]]);

    const boardPage = (await pageData(`/committee/${g.call.id}/board.data`, g.chair.cookie))["routes/committee.$callId.board"].data as { board: { proposals: { proposalId: number }[] } };
    expect(boardPage.board.proposals.map((r) => r.proposalId), "board page").toEqual(expected);
    const sheet = (await pageData(`/committee/${g.call.id}/allocation.data`, g.chair.cookie))["routes/committee.$callId.allocation"].data as { sheet: { rows: { proposalId: number; position: number }[] } };
    expect(sheet.sheet.rows.map((r) => r.proposalId), "allocation page").toEqual(expected);

    const ranked = await app.get(`/committee/${g.call.id}/ranked-list.csv`).set("Cookie", g.chair.cookie);
    expect(csvColumn(ranked.text, "code"), "ranked list CSV").toEqual(codes);
    const allocation = await app.get(`/committee/${g.call.id}/allocation.csv`).set("Cookie", g.chair.cookie);
    expect(allocation.status).toBe(200);
    expect(csvColumn(allocation.text, "code"), "allocation CSV").toEqual(codes);

    const mine = await app.put(`/api/v1/calls/${g.call.id}/allocation`).set(json(g.chair.cookie)).send({ rows: [] });
    expect(mine.status, JSON.stringify(mine.body)).toBe(200);
    expect(mine.body.proposals.map((r: { proposalId: number }) => r.proposalId), "allocation PUT's answer").toEqual(expected);

    const fill = await app.post(`/api/v1/calls/${g.call.id}/allocation/fill-by-rank`).set(json(g.chair.cookie)).send({});
    expect(fill.status, JSON.stringify(fill.body)).toBe(200);
    // every proposal's hours were set by hand by the other chair: all kept, listed as above
    expect(fill.body.kept, "fill by rank's answer").toEqual(expected);
  });

  it("the semester check (its API and the board page) gives a conflicted programme no position and lists it last", async () => {
    // runs after the test above gave every proposal hours and a tier
    const app = await request();
    const p = g.proposals.map((x) => x.id);
    const started = await app.post(`/api/v1/calls/${g.call.id}/semester-check`).set(json(g.other.cookie)).send({ realisations: 1 });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    let body: { status: string; result: { programmes: { proposalId: number; position: number | null }[] } | null } = { status: "queued", result: null };
    for (let i = 0; i < 240 && body.status !== "done" && body.status !== "failed"; i++) {
      await new Promise((r) => setTimeout(r, 250));
      body = (await app.get(`/api/v1/semester-checks/${started.body.id}`).set("Cookie", g.other.cookie)).body;
    }
    expect(body.status).toBe("done");
    const seen = (rows: { proposalId: number; position: number | null }[]) => rows.map((r) => [r.proposalId, r.position]);
    // the other chair: by position, as the board orders them
    expect(seen(body.result!.programmes)).toEqual([[p[0], 1], [p[2], 2], [p[1], 3], [p[3], 4]]);
    const mine = await app.get(`/api/v1/semester-checks/${started.body.id}`).set("Cookie", g.chair.cookie);
    expect(seen(mine.body.result.programmes), "semester check API").toEqual([[p[0], 1], [p[1], null], [p[2], null], [p[3], null]]);
    const page = (await pageData(`/committee/${g.call.id}/board.data`, g.chair.cookie))["routes/committee.$callId.board"].data as { semesterCheck: typeof body };
    expect(seen(page.semesterCheck.result!.programmes), "board page").toEqual([[p[0], 1], [p[1], null], [p[2], null], [p[3], null]]);
  });

  it("the other proposals' computed ranks leave no gap where a conflicted one ranks (board, allocation page, ranked list)", async () => {
    const app = await request();
    const p = g.proposals.map((x) => x.id);
    // `top` is conflicted on programme 0, computed rank 1: the others are 1, 2, 3 among themselves
    const rankOf = (rows: { proposalId: number; computedRank: number | null }[]) => Object.fromEntries(rows.map((r) => [r.proposalId, r.computedRank]));
    const want = { [p[0]]: null, [p[2]]: 1, [p[1]]: 2, [p[3]]: 3 };
    const board = await app.get(`/api/v1/calls/${g.call.id}/board`).set("Cookie", top.cookie);
    expect(rankOf(board.body.proposals), "board API").toEqual(want);
    const boardPage = (await pageData(`/committee/${g.call.id}/board.data`, top.cookie))["routes/committee.$callId.board"].data as { board: { proposals: { proposalId: number; computedRank: number | null }[] } };
    expect(rankOf(boardPage.board.proposals), "board page").toEqual(want);
    const sheet = (await pageData(`/committee/${g.call.id}/allocation.data`, top.cookie))["routes/committee.$callId.allocation"].data as { sheet: { rows: { proposalId: number; computedRank: number | null }[] } };
    expect(rankOf(sheet.sheet.rows), "allocation page").toEqual(want);
    const ranked = await app.get(`/committee/${g.call.id}/ranked-list.csv`).set("Cookie", top.cookie);
    expect(csvColumn(ranked.text, "computed_rank").slice(0, 3), "ranked list CSV").toEqual(["1", "2", "3"]);
    // the other chair sees the true ranks
    const theirs = await app.get(`/api/v1/calls/${g.call.id}/board`).set("Cookie", g.other.cookie);
    expect(rankOf(theirs.body.proposals)).toEqual({ [p[0]]: 1, [p[2]]: 2, [p[1]]: 3, [p[3]]: 4 });
  });
});
