// The chair's conflicts of interest through HTTP on the test MariaDB: a chair on a proposal's team
// (PI or Co-I) or with a declared conflict reads its hours but not its grades, scores, comments or
// reviewers, and every change they try to it is refused with a 403 naming it; another chair of the
// same call reads and changes it as usual; fill by rank ignores what the conflicted chair set.
import { Op } from "sequelize";
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, BoardEntry, CallOffer, Proposal, ReviewAssignment } from "~/models/index.server";
import { postForAnswer, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { committeeNote, conflictedCall, DECLARED_REASON } from "./chair-conflicts-fixtures";

const WITHHELD = "withheld: you have a conflict on this proposal";
type Fixture = Awaited<ReturnType<typeof conflictedCall>>;
let f: Fixture;
let cell: { telescopeId: number; moonCategory: "dark" | "grey" | "bright" };
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });
type BoardRow = { proposalId: number; code: string; rawMean: number | null; normalisedScore: number | null; computedRank: number | null; requested: unknown[]; withheld: string | null };

beforeAll(async () => {
  await ensureDatabase();
  f = await conflictedCall("Chair COI");
  const t = (await computeFeasibilitySheet({ proposalId: f.proposals[1].id })).totals.find((x) => x.semesterCode === f.call.semesterCode && x.hours > 0)!;
  cell = { telescopeId: t.telescopeId, moonCategory: t.moonCategory };
});

const row = (p: Proposal, hours: number) => ({ proposalId: p.id, ...cell, semesterCode: f.call.semesterCode, hours });

describe("the board and its API for a conflicted chair", () => {
  it("withholds the grades of the three conflicted proposals and keeps their hours; the other chair sees them", async () => {
    const app = await request();
    const mine = await app.get(`/api/v1/calls/${f.call.id}/board`).set("Cookie", f.chair.cookie);
    const theirs = await app.get(`/api/v1/calls/${f.call.id}/board`).set("Cookie", f.other.cookie);
    expect(mine.status).toBe(200);
    expect(theirs.status).toBe(200);
    const of = (body: { proposals: BoardRow[] }, i: number) => body.proposals.find((p) => p.proposalId === f.proposals[i].id)!;
    for (const i of [1, 2, 3]) {
      const r = of(mine.body, i);
      expect(r.withheld).toBe(WITHHELD);
      expect([r.rawMean, r.normalisedScore, r.computedRank]).toEqual([null, null, null]);
      expect(r.code).toBe(f.proposals[i].code);
      expect(r.requested.length).toBeGreaterThan(0);
      const seen = of(theirs.body, i);
      expect(seen.withheld).toBeNull();
      expect(typeof seen.normalisedScore).toBe("number");
      expect(typeof seen.rawMean).toBe("number");
    }
    expect(of(mine.body, 0).withheld).toBeNull();
    expect(of(mine.body, 0).normalisedScore).toBeCloseTo(of(theirs.body, 0).normalisedScore!, 10);
    // their place in the list would tell their grades: they come last
    expect(mine.body.proposals.map((p: BoardRow) => p.proposalId).slice(0, 1)).toEqual([f.proposals[0].id]);
  });

  it("shows the message and the disabled move on the page, and the other chair's page shows the score", async () => {
    const app = await request();
    const mine = await app.get(`/committee/${f.call.id}/board`).set("Cookie", f.chair.cookie);
    expect(mine.status).toBe(200);
    expect(mine.text).toContain(`data-testid="withheld-${f.proposals[1].id}"`);
    expect(mine.text).toContain(WITHHELD);
    expect(mine.text).not.toContain(`data-testid="normalised-${f.proposals[1].id}"`);
    expect(mine.text).toMatch(new RegExp(`<option value="${f.proposals[1].id}" disabled="">`));
    expect(mine.text).toContain("you are a Co-I");
    expect(mine.text).toContain(`you declared a conflict: ${DECLARED_REASON}`.replace("'", "&#x27;"));
    const theirs = await app.get(`/committee/${f.call.id}/board`).set("Cookie", f.other.cookie);
    expect(theirs.text).toContain(`data-testid="normalised-${f.proposals[1].id}"`);
    expect(theirs.text).not.toContain(WITHHELD);
  });

  it("refuses the conflicted chair's move with a 403 naming the proposal, on the API and the page; the other chair moves it", async () => {
    const app = await request();
    const api = await app.post(`/api/v1/calls/${f.call.id}/board/rank`).set(json(f.chair.cookie)).send({ proposalId: f.proposals[1].id, chairRank: 1, reason: "my own programme first" });
    expect(api.status).toBe(403);
    expect(api.body.issues[0].path).toBe("proposalId");
    expect(api.body.error).toContain(f.proposals[1].code);
    const page = await postForAnswer(`/committee/${f.call.id}/board`, f.chair.cookie, [["intent", "move"], ["proposalId", f.proposals[3].id], ["chairRank", "1"], ["reason", "my own programme first"]]);
    expect(page.status).toBe(403);
    expect(JSON.stringify(page.answer)).toContain(`conflict on ${f.proposals[3].code}`);
    expect(await BoardEntry.count({ where: { proposalId: [f.proposals[1].id, f.proposals[3].id] } })).toBe(0);
    const other = await app.post(`/api/v1/calls/${f.call.id}/board/rank`).set(json(f.other.cookie)).send({ proposalId: f.proposals[1].id, chairRank: 2, reason: "strong legacy value" });
    expect(other.status).toBe(200);
    expect((await BoardEntry.findOne({ where: { proposalId: f.proposals[1].id } }))!.chairRank).toBe(2);
    await app.post(`/api/v1/calls/${f.call.id}/board/rank`).set(json(f.other.cookie)).send({ proposalId: f.proposals[1].id, chairRank: null, reason: "back" });
  });

  it("leaves the ranked list's grade columns withheld for the conflicted chair", async () => {
    const res = await (await request()).get(`/committee/${f.call.id}/ranked-list.csv`).set("Cookie", f.chair.cookie);
    expect(res.status).toBe(200);
    const line = res.text.split("\n").find((l) => l.includes(f.proposals[1].code!))!;
    expect(line).toContain(WITHHELD);
    const theirs = await (await request()).get(`/committee/${f.call.id}/ranked-list.csv`).set("Cookie", f.other.cookie);
    expect(theirs.text.split("\n").find((l) => l.includes(f.proposals[1].code!))).not.toContain(WITHHELD);
  });
});

describe("the allocation for a conflicted chair", () => {
  it("refuses hours, a tier or the waitlist on a conflicted proposal (403 naming the field) and saves the rest", async () => {
    const app = await request();
    const hours = await app.put(`/api/v1/calls/${f.call.id}/allocation`).set(json(f.chair.cookie)).send({ rows: [row(f.proposals[0], 4), row(f.proposals[1], 6)], tiers: [{ proposalId: f.proposals[0].id, tier: "queue" }, { proposalId: f.proposals[1].id, tier: "assured" }] });
    expect(hours.status).toBe(403);
    expect(hours.body.issues[0].path).toBe("rows.1.proposalId");
    expect(hours.body.error).toContain(f.proposals[1].code);
    const tier = await app.put(`/api/v1/calls/${f.call.id}/allocation`).set(json(f.chair.cookie)).send({ rows: [], tiers: [{ proposalId: f.proposals[3].id, tier: "filler" }] });
    expect(tier.status).toBe(403);
    expect(tier.body.issues[0].path).toBe("tiers.0.proposalId");
    const waitlist = await app.put(`/api/v1/calls/${f.call.id}/allocation`).set(json(f.chair.cookie)).send({ rows: [], tiers: [{ proposalId: f.proposals[2].id, tier: null, waitlisted: true }] });
    expect(waitlist.status).toBe(403);
    expect(waitlist.body.error).toContain(f.proposals[2].code);
    expect(await Allocation.count({ where: { callId: f.call.id } })).toBe(0);
    expect(await BoardEntry.count({ where: { proposalId: [f.proposals[1].id, f.proposals[2].id, f.proposals[3].id], [Op.or]: [{ tier: { [Op.ne]: null } }, { waitlisted: true }] } })).toBe(0);
    const fine = await app.put(`/api/v1/calls/${f.call.id}/allocation`).set(json(f.chair.cookie)).send({ rows: [row(f.proposals[0], 4)], tiers: [{ proposalId: f.proposals[0].id, tier: "queue" }] });
    expect(fine.status).toBe(200);
    expect(fine.body.proposals.map((p: { proposalId: number }) => p.proposalId)[0]).toBe(f.proposals[0].id); // the conflicted ones last
    expect(await Allocation.sum("hours", { where: { proposalId: f.proposals[0].id } })).toBe(4);
  });

  it("saves the page's sheet with the conflicted rows as stored, and refuses it with one of them changed", async () => {
    const app = await request();
    const page = `/committee/${f.call.id}/allocation`;
    const html = await app.get(page).set("Cookie", f.chair.cookie);
    expect(html.status).toBe(200);
    expect(html.text).toContain(`data-testid="conflict-${f.proposals[1].id}"`);
    const sheetRow = (p: Proposal, tier: string, hours: number) => ({ proposalId: p.id, tier, waitlisted: false, cells: [{ ...cell, semesterCode: f.call.semesterCode, hours }] });
    const asStored = [sheetRow(f.proposals[0], "queue", 5), sheetRow(f.proposals[1], "", 0), sheetRow(f.proposals[2], "", 0), sheetRow(f.proposals[3], "", 0)];
    const ok = await app.post(page).set(json(f.chair.cookie)).send({ intent: "save", rows: asStored });
    expect(ok.status).toBe(200);
    expect(await Allocation.sum("hours", { where: { proposalId: f.proposals[0].id } })).toBe(5);
    const changed = await app.post(page).set(json(f.chair.cookie)).send({ intent: "save", rows: [asStored[0], sheetRow(f.proposals[1], "assured", 8), asStored[2], asStored[3]] });
    expect(changed.status).toBe(403);
    expect(changed.text).toContain(`You have a conflict on ${f.proposals[1].code}`);
    expect(await Allocation.count({ where: { proposalId: f.proposals[1].id } })).toBe(0);
  });

  it("lets the other chair set the conflicted proposal's hours, and the conflicted chair's fill keeps them", async () => {
    const app = await request();
    const set = await app.put(`/api/v1/calls/${f.call.id}/allocation`).set(json(f.other.cookie)).send({ rows: [row(f.proposals[1], 3.5)], tiers: [{ proposalId: f.proposals[1].id, tier: "filler" }] });
    expect(set.status).toBe(200);
    const entry = (await BoardEntry.findOne({ where: { proposalId: f.proposals[1].id } }))!;
    expect([entry.allocatedByHand, entry.allocatedByHandById]).toEqual([true, f.other.user.id]);
    // even the explicit "also refill" does not let the conflicted chair replace another chair's choice on it
    const fill = await app.post(`/api/v1/calls/${f.call.id}/allocation/fill-by-rank`).set(json(f.chair.cookie)).send({ replaceHandSet: true });
    expect(fill.status).toBe(200);
    expect(fill.body.kept).toEqual([f.proposals[1].id]);
    expect(await Allocation.sum("hours", { where: { proposalId: f.proposals[1].id } })).toBe(3.5);
    expect((await BoardEntry.findOne({ where: { proposalId: f.proposals[1].id } }))!.tier).toBe("filler");
  });

  it("fills a conflicted proposal by its computed rank, not by what the conflicted chair set for it", async () => {
    // as a chair could have left it before their conflict was known: a position and hand-set hours
    await BoardEntry.destroy({ where: { proposalId: f.proposals[3].id } });
    await BoardEntry.create({ callId: f.call.id, proposalId: f.proposals[3].id, chairRank: 1, chairRankReason: "set before the conflict", chairRankById: f.chair.user.id, tier: "assured", allocatedByHand: true, allocatedByHandById: f.chair.user.id });
    await Allocation.destroy({ where: { proposalId: f.proposals[3].id } });
    await Allocation.create({ callId: f.call.id, proposalId: f.proposals[3].id, ...cell, semesterCode: f.call.semesterCode, hours: 99 });
    const fill = await (await request()).post(`/api/v1/calls/${f.call.id}/allocation/fill-by-rank`).set(json(f.chair.cookie)).send({});
    expect(fill.status).toBe(200);
    expect(fill.body.kept).not.toContain(f.proposals[3].id);
    const requested = (await computeFeasibilitySheet({ proposalId: f.proposals[3].id })).totals.filter((t) => t.semesterCode === f.call.semesterCode).reduce((s, t) => s + t.hours, 0);
    expect(await Allocation.sum("hours", { where: { proposalId: f.proposals[3].id, semesterCode: f.call.semesterCode } })).toBeCloseTo(requested, 6);
    const after = (await BoardEntry.findOne({ where: { proposalId: f.proposals[3].id } }))!;
    expect(after.allocatedByHand).toBe(false);
  });
});

describe("fill by rank on a tight budget", () => {
  it("places a conflicted proposal by its computed rank when its chair fills, not at the position that chair gave it", async () => {
    const g = await conflictedCall("Chair COI Rank");
    const app = await request();
    // room for one proposal's request only: r ≤ 80 % of offered (assured), 2r > offered + 30 % (filler)
    const r = (await computeFeasibilitySheet({ proposalId: g.proposals[0].id })).totals.find((t) => t.semesterCode === g.call.semesterCode && t.telescopeId === cell.telescopeId && t.moonCategory === cell.moonCategory)!.hours;
    await CallOffer.update({ hoursOffered: 1.4 * r }, { where: { callId: g.call.id, telescopeId: cell.telescopeId, moonCategory: cell.moonCategory } });
    const board = await app.get(`/api/v1/calls/${g.call.id}/board`).set("Cookie", g.other.cookie);
    const top = board.body.proposals.find((p: BoardRow) => p.computedRank === 1).proposalId;
    const own = g.proposals[3];
    expect(top).not.toBe(own.id);
    // the position the chair gave their own programme before the conflict rule knew of it
    await BoardEntry.create({ callId: g.call.id, proposalId: own.id, chairRank: 1, chairRankReason: "set before the conflict", chairRankById: g.chair.user.id, tier: null });
    const hoursOf = async (id: number) => (await Allocation.sum("hours", { where: { proposalId: id, semesterCode: g.call.semesterCode } })) ?? 0;
    const mine = await app.post(`/api/v1/calls/${g.call.id}/allocation/fill-by-rank`).set(json(g.chair.cookie)).send({});
    expect(mine.status).toBe(200);
    expect(await hoursOf(top)).toBeCloseTo(r, 9);
    expect(await hoursOf(own.id)).toBe(0);
    // the same position set by the other chair counts
    await BoardEntry.update({ chairRankById: g.other.user.id }, { where: { proposalId: own.id } });
    expect((await app.post(`/api/v1/calls/${g.call.id}/allocation/fill-by-rank`).set(json(g.chair.cookie)).send({})).status).toBe(200);
    expect(await hoursOf(own.id)).toBeCloseTo(r, 9);
    expect(await hoursOf(top)).toBe(0);
  });
});

describe("the review pages for a conflicted chair", () => {
  it("withholds the reviewers, grades and comments of a conflicted proposal (API and pages); the other chair reads them", async () => {
    const app = await request();
    const state = await app.get(`/api/v1/calls/${f.call.id}/review`).set("Cookie", f.chair.cookie);
    expect(state.status).toBe(200);
    expect(state.body.assignments.some((a: { proposalId: number }) => a.proposalId === f.proposals[1].id)).toBe(false);
    expect(state.body.assignments.some((a: { proposalId: number }) => a.proposalId === f.proposals[0].id)).toBe(true);
    expect(state.body.proposals.find((p: { proposalId: number }) => p.proposalId === f.proposals[1].id).withheld).toBe(WITHHELD);
    const reviews = await app.get(`/api/v1/calls/${f.call.id}/reviews`).set("Cookie", f.chair.cookie);
    expect(reviews.status).toBe(200);
    expect(reviews.body.reviews.map((r: { proposalId: number }) => r.proposalId)).toEqual([f.proposals[0].id, f.proposals[0].id, f.proposals[0].id]);
    expect(reviews.body.withheld.map((w: { proposalId: number }) => w.proposalId).sort()).toEqual([f.proposals[1].id, f.proposals[2].id, f.proposals[3].id].sort());
    const theirs = await app.get(`/api/v1/calls/${f.call.id}/reviews`).set("Cookie", f.other.cookie);
    expect(theirs.body.reviews).toHaveLength(12);
    expect(theirs.body.withheld).toEqual([]);

    const progress = await app.get(`/committee/${f.call.id}`).set("Cookie", f.chair.cookie);
    expect(progress.text).toContain(`data-testid="progress-withheld-${f.proposals[1].id}"`);
    expect(progress.text).toContain(committeeNote(0, 0));
    expect(progress.text).not.toContain(committeeNote(1, 0));
    const matrix = await app.get(`/committee/${f.call.id}/assignments`).set("Cookie", f.chair.cookie);
    expect(matrix.text).toContain(`data-testid="assign-withheld-${f.proposals[1].id}"`);
    const reading = await app.get(`/review/${f.proposals[1].id}`).set("Cookie", f.chair.cookie);
    expect(reading.status).toBe(200);
    expect(reading.text).toContain('data-testid="reviews-withheld"');
    expect(reading.text).not.toContain(committeeNote(1, 0));
    const otherReading = await app.get(`/review/${f.proposals[1].id}`).set("Cookie", f.other.cookie);
    expect(otherReading.text).toContain(committeeNote(1, 0));
  });

  it("refuses to assign or reassign a conflicted proposal's reviewers (403) and keeps its assignments when the rest is saved", async () => {
    const app = await request();
    const extra = f.reviewers.map((r) => r.user.id);
    const own = extra.map((reviewerId) => ({ proposalId: f.proposals[0].id, reviewerId }));
    const named = await app.put(`/api/v1/calls/${f.call.id}/review/assignments`).set(json(f.chair.cookie)).send({ assignments: [...own, { proposalId: f.proposals[1].id, reviewerId: extra[0] }] });
    expect(named.status).toBe(403);
    expect(named.body.issues[0].path).toBe("assignments.3");
    expect(named.body.error).toContain(f.proposals[1].code);
    const before = await ReviewAssignment.count({ where: { proposalId: [f.proposals[1].id, f.proposals[2].id, f.proposals[3].id] } });
    const rest = await app.put(`/api/v1/calls/${f.call.id}/review/assignments`).set(json(f.chair.cookie)).send({ assignments: own });
    expect(rest.status).toBe(200);
    expect(await ReviewAssignment.count({ where: { proposalId: [f.proposals[1].id, f.proposals[2].id, f.proposals[3].id] } })).toBe(before);
    const suggestion = await app.post(`/api/v1/calls/${f.call.id}/review/suggest`).set(json(f.chair.cookie)).send({ perProposal: 2 });
    expect(suggestion.status).toBe(200);
    expect(suggestion.body.assignments.some((a: { proposalId: number }) => a.proposalId !== f.proposals[0].id)).toBe(false);
    const assignment = (await ReviewAssignment.findOne({ where: { proposalId: f.proposals[1].id, reviewerId: extra[0] } }))!;
    const reassign = await postForAnswer(`/committee/${f.call.id}`, f.chair.cookie, [["intent", "reassign"], ["assignmentId", assignment.id], ["reviewerId", extra[1]]]);
    expect(reassign.status).toBe(403);
    expect(JSON.stringify(reassign.answer)).toContain(`conflict on ${f.proposals[1].code}`);
    const reopen = await postForAnswer(`/committee/${f.call.id}`, f.chair.cookie, [["intent", "reopen"], ["assignmentId", assignment.id]]);
    expect(reopen.status).toBe(403);
    expect((await ReviewAssignment.findByPk(assignment.id))!.status).toBe("submitted");
  });
});
