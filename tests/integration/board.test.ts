// The ranking board's JSON through HTTP on the test MariaDB: normalised scores checked against
// simple-statistics 7.8.8 (registry), oversubscription against the offered hours less an earlier
// call's locked commitment, and the access rules.
import { mean, standardDeviation, zScore } from "simple-statistics";
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, AuditEntry, BoardEntry, CallAllocation, CallOffer, Proposal, ReviewAssignment, Telescope } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let chair: Person, reviewer: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let proposals: Proposal[];
let telescopeId: number;
// overall merits per reviewer (rows) and proposal (columns); null = not assigned. Invented.
const merits: (number | null)[][] = [
  [9, 8, 6.5, 7],
  [5, 6, 3, null],
  [7, null, 8, 4],
];

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Board Chair" });
  reviewer = await newUser({ roles: ["reviewer"], name: "Board Reviewer" });
  const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Board Reviewer ${i}` })));
  call = await testCall();
  proposals = [];
  for (let i = 0; i < 4; i++) {
    const pi = await newUser({ name: `Board PI ${i}` });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Board test programme ${i} of ${call.semesterCode}` });
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposals.push((await Proposal.findByPk(proposal.id))!);
  }
  for (const [r, row] of merits.entries()) {
    for (const [c, overall] of row.entries()) {
      if (overall === null) continue;
      await ReviewAssignment.create({ callId: call.id, proposalId: proposals[c].id, reviewerId: reviewers[r].user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
    }
  }
  // an earlier call whose locked allocation commits 40 dark hours of this call's semester
  telescopeId = (await Telescope.findOne({ order: [["id", "ASC"]] }))!.id;
  const earlier = await testCall();
  const { proposal: old } = await readyProposal({ user: chair.user, callId: earlier.id, title: "Earlier multi-semester programme" });
  await CallAllocation.create({ callId: earlier.id, lockedAt: new Date(), lockedById: chair.user.id });
  await Allocation.create({ callId: earlier.id, proposalId: old.id, telescopeId, moonCategory: "dark", semesterCode: call.semesterCode, hours: 40 });
  // an unlocked call's allocation commits nothing
  const draftCall = await testCall();
  const { proposal: other } = await readyProposal({ user: chair.user, callId: draftCall.id, title: "Unlocked programme" });
  await Allocation.create({ callId: draftCall.id, proposalId: other.id, telescopeId, moonCategory: "grey", semesterCode: call.semesterCode, hours: 25 });
});

describe("GET /api/v1/calls/:callId/board", () => {
  it("gives each proposal the normalised score that simple-statistics computes", async () => {
    const res = await (await request()).get(`/api/v1/calls/${call.id}/board`).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    const all = merits.flat().filter((m): m is number => m !== null);
    // reviewer 1 has 3 grades, reviewers 0 and 2 have 4 and 3: all are normalised on their own set
    const z = merits.map((row) => {
      const own = row.filter((m): m is number => m !== null);
      return row.map((m) => (m === null ? null : zScore(m, mean(own), standardDeviation(own))));
    });
    for (const [c, p] of proposals.entries()) {
      const row = res.body.proposals.find((x: { proposalId: number }) => x.proposalId === p.id);
      const zs = z.map((r) => r[c]).filter((v): v is number => v !== null);
      const raw = merits.map((r) => r[c]).filter((v): v is number => v !== null);
      expect(row.code).toBe(p.code);
      expect(row.reviews).toBe(raw.length);
      expect(row.rawMean).toBeCloseTo(mean(raw), 10);
      expect(row.spread).toBeCloseTo(Math.max(...zs) - Math.min(...zs), 10);
      expect(row.normalisedScore).toBeCloseTo(Math.min(10, Math.max(1, mean(all) + mean(zs) * standardDeviation(all))), 10);
      expect(row.disagreement).toBe(Math.max(...zs) - Math.min(...zs) > 1.5);
      expect(row.fallbackReviewerIds).toEqual([]);
      expect(row.chairRank).toBeNull();
    }
    const expected = proposals
      .map((p, c) => ({ id: p.id, z: mean(z.map((r) => r[c]).filter((v): v is number => v !== null)) }))
      .sort((a, b) => b.z - a.z)
      .map((x) => x.id);
    expect(res.body.proposals.map((x: { proposalId: number }) => x.proposalId)).toEqual(expected);
    expect(res.body.proposals.map((x: { computedRank: number }) => x.computedRank)).toEqual([1, 2, 3, 4]);
  });

  it("counts oversubscription against offered hours less the locked commitment of an earlier call", async () => {
    const res = await (await request()).get(`/api/v1/calls/${call.id}/board`).set("Cookie", chair.cookie);
    const requested = new Map<string, number>();
    for (const p of proposals) {
      for (const t of (await computeFeasibilitySheet({ proposalId: p.id })).totals) {
        if (t.semesterCode !== call.semesterCode) continue;
        requested.set(`${t.telescopeId}|${t.moonCategory}`, (requested.get(`${t.telescopeId}|${t.moonCategory}`) ?? 0) + t.hours);
      }
    }
    expect([...requested.values()].some((h) => h > 0)).toBe(true);
    const dark = res.body.oversubscription.find((o: { telescopeId: number; moonCategory: string }) => o.telescopeId === telescopeId && o.moonCategory === "dark");
    expect(dark.committedHours).toBe(40);
    expect(dark.offeredHours).toBe(260);
    const grey = res.body.oversubscription.find((o: { telescopeId: number; moonCategory: string }) => o.telescopeId === telescopeId && o.moonCategory === "grey");
    expect(grey.committedHours).toBe(0);
    expect(grey.offeredHours).toBe(300);
    for (const o of res.body.oversubscription) {
      const want = requested.get(`${o.telescopeId}|${o.moonCategory}`) ?? 0;
      expect(o.requestedHours).toBeCloseTo(want, 9);
      expect(o.ratio).toBeCloseTo(want / o.offeredHours, 9);
    }
  });

  it("shows the office the hours earlier calls already committed to this call's semester", async () => {
    const admin = await newUser({ roles: ["admin"], name: "Board Office" });
    const page = await (await request()).get(`/admin/calls/${call.id}`).set("Cookie", admin.cookie);
    expect(page.status).toBe(200);
    // the locked earlier call's 40 dark hours; the unlocked call's 25 grey hours commit nothing
    expect(page.text).toMatch(new RegExp(`data-testid="committed-${telescopeId}-dark"[^>]*>40\\.0(<!-- -->)? h already committed`));
    expect(page.text).not.toContain(`data-testid="committed-${telescopeId}-grey"`);
  });

  it("is the chair's: a reviewer gets 403, a bad id 400 naming the field, an unknown call 404", async () => {
    const app = await request();
    expect((await app.get(`/api/v1/calls/${call.id}/board`).set("Cookie", reviewer.cookie)).status).toBe(403);
    const bad = await app.get(`/api/v1/calls/abc/board`).set("Cookie", chair.cookie);
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toContain("callId");
    expect((await app.get(`/api/v1/calls/99999999/board`).set("Cookie", chair.cookie)).status).toBe(404);
  });
});

describe("rank uncertainty: GET …/board and GET …/reproducibility", () => {
  type Row = { proposalId: number; computedRank: number; rankInterval: { low: number; high: number }; probabilityAboveLine: number | null; requested: { telescopeId: number; moonCategory: string; semesterCode: string; hours: number }[] };

  it("gives the probability of lying above a one-proposal line that exhaustive enumeration of the resamples gives", async () => {
    const app = await request();
    const first = (await app.get(`/api/v1/calls/${call.id}/board`).set("Cookie", chair.cookie)).body.proposals as Row[];
    // everything fits in 300 h: every ranked proposal is always above the line
    expect(first.map((r) => r.probabilityAboveLine)).toEqual([1, 1, 1, 1]);
    for (const r of first) {
      expect(r.rankInterval.low).toBeLessThanOrEqual(r.computedRank);
      expect(r.rankInterval.high).toBeGreaterThanOrEqual(r.computedRank);
    }
    // every proposal asks the same hours of one cell: offer room for one of them only
    const asked = first[0].requested.find((r) => r.semesterCode === call.semesterCode && r.hours > 0)!;
    const where = { callId: call.id, telescopeId: asked.telescopeId, moonCategory: asked.moonCategory as "dark" };
    const offer = (await CallOffer.findOne({ where }))!;
    const committed = asked.moonCategory === "dark" && asked.telescopeId === telescopeId ? 40 : 0;
    await offer.update({ hoursOffered: committed + asked.hours * 1.5 });
    try {
      const rows = (await app.get(`/api/v1/calls/${call.id}/board`).set("Cookie", chair.cookie)).body.proposals as Row[];
      // The reference: z-scores from simple-statistics, then every resample of every proposal's
      // grades enumerated (27 × 4 × 27 × 4 joint outcomes), ties to the better computed rank.
      const z = merits.map((row) => {
        const own = row.filter((m): m is number => m !== null);
        return row.map((m) => (m === null ? null : zScore(m, mean(own), standardDeviation(own))));
      });
      const zOf = (proposalId: number) => { const c = proposals.findIndex((p) => p.id === proposalId); return z.map((r) => r[c]).filter((v): v is number => v !== null); };
      const resampleMeans = (v: number[]) => Array.from({ length: v.length ** v.length }, (_, code) => { let sum = 0; for (let j = 0, c = code; j < v.length; j++, c = Math.floor(c / v.length)) sum += v[c % v.length]; return sum / v.length; });
      const means = rows.map((r) => resampleMeans(zOf(r.proposalId)));
      const wins = new Array(rows.length).fill(0);
      let total = 0;
      const walk = (i: number, picked: number[]) => {
        if (i === rows.length) {
          let best = 0;
          for (let k = 1; k < picked.length; k++) if (picked[k] > picked[best]) best = k;
          wins[best]++;
          total++;
          return;
        }
        for (const m of means[i]) walk(i + 1, [...picked, m]);
      };
      walk(0, []);
      for (const [i, r] of rows.entries()) {
        const exact = wins[i] / total;
        const sigma = Math.sqrt((exact * (1 - exact)) / 2000);
        expect(Math.abs(r.probabilityAboveLine! - exact), `proposal ${r.proposalId}: ${r.probabilityAboveLine} against ${exact}`).toBeLessThanOrEqual(4 * sigma + 1e-12);
      }
      const again = (await app.get(`/api/v1/calls/${call.id}/board`).set("Cookie", chair.cookie)).body.proposals as Row[];
      expect(again).toEqual(rows);
      const repro = await app.get(`/api/v1/calls/${call.id}/reproducibility`).set("Cookie", chair.cookie);
      expect(repro.status).toBe(200);
      expect(Object.keys(repro.body)).toEqual(expect.arrayContaining(["expectedAgreement", "spread", "draws", "seed"]));
      expect(repro.body.expectedAgreement).toBeGreaterThanOrEqual(0);
      expect(repro.body.expectedAgreement).toBeLessThanOrEqual(1);
      expect(repro.body.proposals).toBe(4);
      expect((await app.get(`/api/v1/calls/${call.id}/reproducibility`).set("Cookie", chair.cookie)).body).toEqual(repro.body);
    } finally {
      await offer.update({ hoursOffered: 300 });
    }
  });

  it("is the chair's: a reviewer gets 403, a bad id 400 naming the field, an unknown call 404", async () => {
    const app = await request();
    expect((await app.get(`/api/v1/calls/${call.id}/reproducibility`).set("Cookie", reviewer.cookie)).status).toBe(403);
    const bad = await app.get(`/api/v1/calls/1x/reproducibility`).set("Cookie", chair.cookie);
    expect(bad.status).toBe(400);
    expect(bad.body.issues[0].path).toBe("callId");
    expect((await app.get(`/api/v1/calls/99999999/reproducibility`).set("Cookie", chair.cookie)).status).toBe(404);
  });
});

const asJson = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

describe("the chair's changes: positions, hours, tiers, lock and unlock", () => {
  it("moves a proposal with a required reason, audited, and shows both ranks", async () => {
    const app = await request();
    const target = proposals[3];
    const noReason = await app.post(`/api/v1/calls/${call.id}/board/rank`).set(asJson(chair.cookie)).send({ proposalId: target.id, chairRank: 1, reason: " " });
    expect(noReason.status).toBe(400);
    expect(JSON.stringify(noReason.body)).toContain("reason");
    const moved = await app.post(`/api/v1/calls/${call.id}/board/rank`).set(asJson(chair.cookie)).send({ proposalId: target.id, chairRank: 1, reason: "Unique instrument window this semester" });
    expect(moved.status).toBe(200);
    const board = await app.get(`/api/v1/calls/${call.id}/board`).set("Cookie", chair.cookie);
    const row = board.body.proposals.find((p: { proposalId: number }) => p.proposalId === target.id);
    expect(row.chairRank).toBe(1);
    expect(row.computedRank).not.toBe(1);
    const audit = await AuditEntry.findOne({ where: { action: "board.rank_moved", proposalId: target.id } });
    expect(audit?.details).toMatchObject({ to: 1, reason: "Unique instrument window this semester" });
    const foreign = await app.post(`/api/v1/calls/${call.id}/board/rank`).set(asJson(chair.cookie)).send({ proposalId: 99999999, chairRank: 2, reason: "not on this board" });
    expect(foreign.status).toBe(400);
  });

  it("saves hours and tiers, refuses hours the call does not offer, then locks with the outcomes and refuses changes with 409", async () => {
    const app = await request();
    const bad = await app.put(`/api/v1/calls/${call.id}/allocation`).set(asJson(chair.cookie)).send({ rows: [{ proposalId: proposals[0].id, telescopeId, moonCategory: "dark", semesterCode: "1999A", hours: 5 }] });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toContain("semesterCode");
    const negative = await app.put(`/api/v1/calls/${call.id}/allocation`).set(asJson(chair.cookie)).send({ rows: [{ proposalId: proposals[0].id, telescopeId, moonCategory: "dark", semesterCode: call.semesterCode, hours: -1 }] });
    expect(negative.status).toBe(400);
    expect(JSON.stringify(negative.body)).toContain("hours");

    const saved = await app.put(`/api/v1/calls/${call.id}/allocation`).set(asJson(chair.cookie)).send({
      rows: [
        { proposalId: proposals[0].id, telescopeId, moonCategory: "dark", semesterCode: call.semesterCode, hours: 12.5 },
        { proposalId: proposals[1].id, telescopeId, moonCategory: "grey", semesterCode: call.semesterCode, hours: 4 },
      ],
      tiers: [
        { proposalId: proposals[0].id, tier: "assured" },
        { proposalId: proposals[1].id, tier: "queue" },
        { proposalId: proposals[2].id, tier: null, waitlisted: true },
      ],
    });
    expect(saved.status).toBe(200);
    expect(await Allocation.sum("hours", { where: { callId: call.id } })).toBe(16.5);
    expect((await BoardEntry.findOne({ where: { proposalId: proposals[0].id } }))?.tier).toBe("assured");

    const locked = await app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(asJson(chair.cookie)).send("{}");
    expect(locked.status).toBe(200);
    expect(locked.body.outcomes).toEqual({ accepted: 2, waitlisted: 1, declined: 1 });
    const statuses = await Promise.all(proposals.map(async (p) => (await Proposal.findByPk(p.id))!.status));
    expect(statuses).toEqual(["accepted", "accepted", "waitlisted", "declined"]);

    const again = await app.put(`/api/v1/calls/${call.id}/allocation`).set(asJson(chair.cookie)).send({ rows: [] , tiers: [{ proposalId: proposals[3].id, tier: "filler" }] });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatch(/locked/);
    const move = await app.post(`/api/v1/calls/${call.id}/board/rank`).set(asJson(chair.cookie)).send({ proposalId: proposals[3].id, chairRank: null, reason: "back to computed" });
    expect(move.status).toBe(409);
    expect((await app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(asJson(chair.cookie)).send("{}")).status).toBe(409);

    const noReason = await app.post(`/api/v1/calls/${call.id}/allocation/unlock`).set(asJson(chair.cookie)).send({});
    expect(noReason.status).toBe(400);
    expect(JSON.stringify(noReason.body)).toContain("reason");
    const unlocked = await app.post(`/api/v1/calls/${call.id}/allocation/unlock`).set(asJson(chair.cookie)).send({ reason: "A reviewer's late grade arrived" });
    expect(unlocked.status).toBe(200);
    for (const p of proposals) expect((await Proposal.findByPk(p.id))!.status).toBe("in_review");
    const audits = await AuditEntry.findAll({ where: { entityType: "call", entityId: call.id }, order: [["id", "ASC"]] });
    expect(audits.map((a) => a.action)).toEqual(expect.arrayContaining(["allocation.saved", "allocation.locked", "allocation.unlocked"]));
    // the allocation is kept through the unlock
    expect(await Allocation.sum("hours", { where: { callId: call.id } })).toBe(16.5);
  });

  it("fills by rank: every small request fits the assured budget and gets its requested hours", async () => {
    const app = await request();
    // the hours the chair PUT above count as set by hand: refilled only on the chair's explicit choice
    const res = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set(asJson(chair.cookie)).send({ replaceHandSet: true });
    expect(res.status).toBe(200);
    expect(res.body.tiers.map((t: { tier: string }) => t.tier)).toEqual(["assured", "assured", "assured", "assured"]);
    let requested = 0;
    for (const p of proposals) for (const t of (await computeFeasibilitySheet({ proposalId: p.id })).totals) requested += t.hours;
    expect(requested).toBeGreaterThan(0);
    expect(await Allocation.sum("hours", { where: { callId: call.id } })).toBeCloseTo(requested, 9);
    // the chair's move of proposal 3 to the top puts it first in the fill's order
    expect(res.body.tiers[0].proposalId).toBe(proposals[3].id);
  });

  it("refuses every change to a reviewer", async () => {
    const app = await request();
    expect((await app.put(`/api/v1/calls/${call.id}/allocation`).set(asJson(reviewer.cookie)).send({ rows: [] })).status).toBe(403);
    expect((await app.post(`/api/v1/calls/${call.id}/allocation/lock`).set(asJson(reviewer.cookie)).send("{}")).status).toBe(403);
    expect((await CallAllocation.findOne({ where: { callId: call.id } }))?.lockedAt ?? null).toBeNull();
  });
});
