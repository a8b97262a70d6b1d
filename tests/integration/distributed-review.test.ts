// Distributed review through HTTP on the test MariaDB: the team names its reviewer before it
// submits; the chair's suggestion gives each designated reviewer k proposals of the call under the
// conflict rules and the competitor rule (same telescope × moon category); a submitter without the
// reviewer role grades on the desk through the assignment alone; late teams are flagged on the
// board or left unranked; the team rates the helpfulness of each comment, the chair sees the mean.
import { Op } from "sequelize";
import { beforeAll, describe, expect, it } from "vitest";
import { callBoard } from "~/lib/allocation/board.server";
import { anonymisedComments } from "~/lib/decisions/anonymise";
import { updateCall } from "~/lib/office/office.server";
import { helpfulnessByReviewer } from "~/lib/review/helpfulness.server";
import { sequelize, Call, CallReview, DecisionLetter, Observation, Proposal, ProposalMember, ReviewAssignment, ReviewHelpfulness, User } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { DISTRIBUTED_DEMO_TITLE, up as seedDistributedDemo } from "../../sequelize/seeders/20261202090600-demo-distributed";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;

const longComment = Array.from({ length: 55 }, (_, i) => `word${i}`).join(" ");
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

let chair: Person;
let call: Call;
// D* request dark time, B* bright time, on the same telescope
const names = ["D1", "D2", "D3", "B1", "B2", "B3"] as const;
type Name = (typeof names)[number];
const pi = {} as Record<Name, Person>;
const prop = {} as Record<Name, Proposal>;
let coiD2: Person; // D2's designated reviewer (a Co-I), at B1's PI's institution
let coiB1: Person; // a Co-I of B1 who rates too
let stranger: Person;
/** the designated reviewer of each proposal */
const reviewerOf = (n: Name) => (n === "D2" ? coiD2 : pi[n]);
const nameOfReviewer = (userId: number) => names.find((n) => reviewerOf(n).user.id === userId)!;
const nameOfProposal = (proposalId: number) => names.find((n) => prop[n].id === proposalId)!;

async function designate(owner: Person, n: Name, member: Person) {
  const m = await ProposalMember.findOne({ where: { proposalId: prop[n].id, userId: member.user.id } });
  return (await request()).post(`/proposals/${prop[n].id}/team`).set("Cookie", owner.cookie).type("form").send(form({ intent: "designate-reviewer", memberId: String(m?.id ?? 4_000_000_000) }));
}

async function suggestion() {
  const res = await (await request()).post(`/api/v1/calls/${call.id}/review/suggest`).set(json(chair.cookie)).send(JSON.stringify({}));
  expect(res.status).toBe(200);
  return res.body as { assignments: { proposalId: number; reviewerId: number }[]; short: { reviewerId: number; count: number; reason: string }[]; impossible: unknown[] };
}
/** "reviewer → proposals", by name, sorted */
function byReviewer(pairs: { proposalId: number; reviewerId: number }[]) {
  const out: Record<string, string[]> = {};
  for (const p of pairs) (out[nameOfReviewer(p.reviewerId)] ??= []).push(nameOfProposal(p.proposalId));
  for (const k of Object.keys(out)) out[k].sort();
  return out;
}

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Distributed Chair" });
  stranger = await newUser({ name: "Distributed Stranger" });
  await User.update({ institution: "Stranger Institute" }, { where: { id: stranger.user.id } });
  call = await testCall();
  await call.update({ reviewMode: "distributed", reviewsPerSubmitter: 3, separateCompetitors: false, unreviewedPolicy: "flag" });
  for (const n of names) {
    pi[n] = await newUser({ name: `PI of ${n}` });
    await User.update({ institution: n === "B1" ? "Shared Institute" : `Institute ${n}` }, { where: { id: pi[n].user.id } });
    const { proposal } = await readyProposal({ user: pi[n].user, callId: call.id, title: `Distributed programme ${n} of ${call.semesterCode}` });
    if (n.startsWith("B")) await Observation.update({ moonCategory: "bright" }, { where: { proposalId: proposal.id } });
    prop[n] = proposal;
  }
  coiD2 = await newUser({ name: "Co-I of D2" });
  await User.update({ institution: "Shared Institute" }, { where: { id: coiD2.user.id } });
  await ProposalMember.create({ proposalId: prop.D2.id, userId: coiD2.user.id, email: coiD2.email, role: "coi", acceptedAt: new Date() });
  coiB1 = await newUser({ name: "Co-I of B1" });
  await User.update({ institution: "Institute B1 bis" }, { where: { id: coiB1.user.id } });
  await ProposalMember.create({ proposalId: prop.B1.id, userId: coiB1.user.id, email: coiB1.email, role: "coi", acceptedAt: new Date() });
});

describe("the team's reviewer, before submission", () => {
  it("a distributed call's proposal cannot be submitted without a designated reviewer", async () => {
    const res = await (await request()).post(`/proposals/${prop.D1.id}/submit`).set("Cookie", pi.D1.cookie).type("form").send(form({ intent: "submit" }));
    expect(res.status).toBe(409);
    expect(res.text).toContain("No reviewer chosen yet");
    expect((await Proposal.findByPk(prop.D1.id))!.status).toBe("draft");
  });

  it("the team tab shows the choice; a Co-I cannot make it, someone off the team cannot be chosen", async () => {
    const page = await (await request()).get(`/proposals/${prop.D2.id}/team`).set("Cookie", pi.D2.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("The team&#x27;s reviewer");
    expect(page.text).toContain("No reviewer chosen yet");
    const byCoi = await designate(coiD2, "D2", coiD2);
    expect(byCoi.status).toBe(403);
    // a member id of another proposal's team
    const other = await ProposalMember.findOne({ where: { proposalId: prop.D1.id } });
    const foreign = await (await request()).post(`/proposals/${prop.D2.id}/team`).set("Cookie", pi.D2.cookie).type("form").send(form({ intent: "designate-reviewer", memberId: String(other!.id) }));
    expect(foreign.status).toBe(400);
    expect(foreign.text).toContain("not on this team");
    expect((await Proposal.findByPk(prop.D2.id))!.designatedReviewerId).toBeNull();
  });

  it("the PI designates (themself or a Co-I) and the proposal submits", async () => {
    for (const n of names) {
      const res = await designate(pi[n], n, reviewerOf(n));
      expect(res.status, n).toBe(200);
      expect((await Proposal.findByPk(prop[n].id))!.designatedReviewerId).toBe(reviewerOf(n).user.id);
    }
    const submitted = await (await request()).post(`/proposals/${prop.D2.id}/submit`).set("Cookie", pi.D2.cookie).type("form").send(form({ intent: "submit" }));
    expect(submitted.status, submitted.text.slice(0, 300)).toBe(200);
    expect((await Proposal.findByPk(prop.D2.id))!.status).toBe("submitted");
    // the others as if submitted (their checklists are the same one)
    let serial = 100;
    for (const n of names.filter((x) => x !== "D2")) {
      serial += 1;
      await Proposal.update({ status: "submitted", serial, code: `${serial}/${call.semesterCode.slice(2)}`, submittedAt: new Date() }, { where: { id: prop[n].id } });
    }
  });
});

describe("the call's review mode once proposals are in", () => {
  it("the office cannot switch a call with submitted proposals back to panel review", async () => {
    const admin = await newUser({ roles: ["admin"], name: "Distributed Office" });
    const c = (await Call.findByPk(call.id))!;
    const values = {
      semesterCode: c.semesterCode, title: c.title, opensAt: c.opensAt, deadlineAt: c.deadlineAt, semesterStart: c.semesterStart, semesterEnd: c.semesterEnd,
      pageLimit: c.pageLimit, currency: c.currency as "eur", accessFeePerHourCents: c.accessFeePerHourCents, pageChargeCents: c.pageChargeCents,
      reviewMode: "panel" as const, reviewsPerSubmitter: 3, separateCompetitors: false, unreviewedPolicy: "flag" as const, offers: [],
    };
    await expect(updateCall({ actor: admin.user, callId: call.id, values })).rejects.toThrow(/Who reviews cannot change: 6 proposals were already submitted/);
    expect((await Call.findByPk(call.id))!.reviewMode).toBe("distributed");
  });
});

describe("the assignment", () => {
  beforeAll(async () => {
    await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
    const res = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(form({ intent: "start" }));
    expect(res.status).toBe(200);
  });

  it("the panel is the designated reviewers, none of whom holds the reviewer role", async () => {
    const res = await (await request()).get(`/api/v1/calls/${call.id}/review`).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    expect(res.body.panel.map((r: { reviewerId: number }) => r.reviewerId).sort()).toEqual(names.map((n) => reviewerOf(n).user.id).sort());
    const page = await (await request()).get(`/committee/${call.id}`).set("Cookie", chair.cookie);
    expect(page.text).toContain("reviewed by its submitters");
  });

  it("without the competitor rule: k each, never one's own, the institution rule holds, reviews spread evenly", async () => {
    const s = await suggestion();
    const mine = byReviewer(s.assignments);
    for (const n of names) {
      expect(mine[n], n).not.toContain(n);
      expect(mine[n]?.length ?? 0, n).toBe(3);
    }
    // D2's reviewer shares B1's PI's institution (both ways)
    expect(mine.D2).not.toContain("B1");
    expect(mine.B1).not.toContain("D2");
    // 18 reviews over 6 proposals: 3 each
    const perProposal = names.map((n) => s.assignments.filter((a) => a.proposalId === prop[n].id).length);
    expect(Math.max(...perProposal) - Math.min(...perProposal)).toBeLessThanOrEqual(1);
    expect(s.assignments.length).toBe(18);
    expect(s.short).toEqual([]);
  });

  it("with the competitor rule, a team reviews only proposals asking for another moon category — fewer than k where that leaves fewer, said", async () => {
    await call.update({ separateCompetitors: true });
    const state = await (await request()).get(`/api/v1/calls/${call.id}/review`).set("Cookie", chair.cookie);
    const reason = (p: Name, r: Name) => state.body.conflicts.find((c: { proposalId: number; reviewerId: number }) => c.proposalId === prop[p].id && c.reviewerId === reviewerOf(r).user.id)?.reason;
    expect(reason("D3", "D1")).toMatch(/same telescope and moon category/);
    expect(reason("B1", "D1")).toBeUndefined();
    const s = await suggestion();
    // every clean pair is taken (each reviewer has at most k = 3 of them): the outcome is fixed
    expect(byReviewer(s.assignments)).toEqual({
      D1: ["B1", "B2", "B3"],
      D2: ["B2", "B3"],
      D3: ["B1", "B2", "B3"],
      B1: ["D1", "D3"],
      B2: ["D1", "D2", "D3"],
      B3: ["D1", "D2", "D3"],
    });
    expect(s.short.map((x) => [nameOfReviewer(x.reviewerId), x.count]).sort()).toEqual([["B1", 2], ["D2", 2]]);
    expect(s.short[0].reason).toMatch(/only 2 proposals of the call are free of conflicts/);
    // k = 8 on a call of six: everyone is short, and told why
    await call.update({ reviewsPerSubmitter: 8 });
    const small = await suggestion();
    expect(small.short.length).toBe(6);
    await call.update({ reviewsPerSubmitter: 3 });
  });

  it("the chair commits the suggestion; a pair breaking the competitor rule is refused", async () => {
    const bad = await (await request()).put(`/api/v1/calls/${call.id}/review/assignments`).set(json(chair.cookie)).send(JSON.stringify({ assignments: [{ proposalId: prop.D3.id, reviewerId: pi.D1.user.id }] }));
    expect(bad.status).toBe(400);
    expect(bad.body.error).toMatch(/same telescope and moon category/);
    const future = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 16);
    const setup = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(`intent=setup&reviewDeadline=${future}&perProposal=3`);
    expect(setup.status).toBe(200);
    const s = await suggestion();
    const res = await (await request()).put(`/api/v1/calls/${call.id}/review/assignments`).set(json(chair.cookie)).send(JSON.stringify({ assignments: s.assignments, commit: true }));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(await ReviewAssignment.count({ where: { callId: call.id } })).toBe(16);
  });
});

describe("the desk for a submitter-reviewer (no reviewer role)", () => {
  it("lists their assignments and opens an assigned proposal, but not another one", async () => {
    const desk = await (await request()).get("/review").set("Cookie", pi.D1.cookie);
    expect(desk.status).toBe(200);
    expect(desk.text).toContain(`Distributed programme B1 of ${call.semesterCode}`);
    expect((await (await request()).get(`/review/${prop.B2.id}`).set("Cookie", pi.D1.cookie)).status).toBe(200);
    expect((await (await request()).get(`/review/${prop.D3.id}`).set("Cookie", pi.D1.cookie)).status).toBe(404);
    expect((await (await request()).get("/review").set("Cookie", stranger.cookie)).status).toBe(403);
  });

  it("grades and submits on the desk", async () => {
    const grade = { science: "8", feasibility: "7.5", legacy: "6", overall: "8", commentToPi: longComment, commentToCommittee: "" };
    const overall: Record<Name, string> = { D1: "0", D2: "0", D3: "0", B1: "8", B2: "6", B3: "4" };
    for (const n of ["B1", "B2", "B3"] as const) {
      const res = await (await request()).post(`/review/${prop[n].id}`).set("Cookie", pi.D1.cookie).type("form").send(form({ ...grade, overall: overall[n], intent: "submit" }));
      expect(res.status, res.text.slice(0, 300)).toBe(200);
    }
    // B2's reviewer delivers all three
    const d = { D1: "9", D2: "7", D3: "5" } as const;
    for (const n of ["D1", "D2", "D3"] as const) {
      const res = await (await request()).post(`/review/${prop[n].id}`).set("Cookie", pi.B2.cookie).type("form").send(form({ ...grade, overall: d[n], intent: "submit" }));
      expect(res.status).toBe(200);
    }
    // D3's reviewer delivers one of three
    const one = await (await request()).post(`/review/${prop.B1.id}`).set("Cookie", pi.D3.cookie).type("form").send(form({ ...grade, overall: "7", intent: "submit" }));
    expect(one.status).toBe(200);
    expect(await ReviewAssignment.count({ where: { callId: call.id, status: "submitted" } })).toBe(7);
  });
});

describe("delivery by the review deadline", () => {
  it("before the deadline nobody is late", async () => {
    const board = await callBoard({ callId: call.id });
    expect(board.proposals.every((r) => r.reviewDuty && !r.reviewDuty.late)).toBe(true);
  });

  it("after it, teams whose reviewer did not deliver all are flagged, and still ranked (policy: flag)", async () => {
    await CallReview.update({ reviewDeadlineAt: new Date(Date.now() - 60_000) }, { where: { callId: call.id } });
    const board = await callBoard({ callId: call.id });
    const duty = Object.fromEntries(board.proposals.map((r) => [nameOfProposal(r.proposalId), r.reviewDuty]));
    expect(duty.D1).toEqual({ reviewerId: pi.D1.user.id, owed: 3, delivered: 3, late: false, teams: 1 });
    expect(duty.B2).toMatchObject({ owed: 3, delivered: 3, late: false });
    expect(duty.D3).toMatchObject({ owed: 3, delivered: 1, late: true });
    expect(duty.D2).toMatchObject({ owed: 2, delivered: 0, late: true });
    expect(duty.B1).toMatchObject({ late: true });
    expect(duty.B3).toMatchObject({ late: true });
    // every proposal has a review, so each has a rank under "flag"
    expect(board.proposals.every((r) => r.computedRank !== null)).toBe(true);
    const page = await (await request()).get(`/committee/${call.id}/board`).set("Cookie", chair.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("Team&#x27;s reviews");
    expect(page.text).toMatch(/1 of 3(<!-- -->)? <span[^>]*>late<\/span>/);
  });

  it("under 'not ranked' the late teams lose their computed rank and sort last with the reason; the rest are 1, 2", async () => {
    await call.update({ unreviewedPolicy: "unranked" });
    const board = await callBoard({ callId: call.id });
    const ranked = board.proposals.filter((r) => r.computedRank !== null).map((r) => [nameOfProposal(r.proposalId), r.computedRank]);
    expect(ranked.map(([, rank]) => rank)).toEqual([1, 2]);
    expect(ranked.map(([n]) => n).sort()).toEqual(["B2", "D1"]);
    const last = board.proposals.slice(2);
    expect(last.map((r) => nameOfProposal(r.proposalId)).sort()).toEqual(["B1", "B3", "D2", "D3"]);
    expect(last.find((r) => r.proposalId === prop.D3.id)!.rankWithheld).toBe("not ranked: the team delivered 1 of its 3 reviews by the review deadline");
    await call.update({ unreviewedPolicy: "flag" });
  });
});

describe("helpfulness of the comments", () => {
  let onB1: ReviewAssignment; // D1's review of B1
  let d3OnB1: ReviewAssignment;
  let onB2: ReviewAssignment;
  beforeAll(async () => {
    onB1 = (await ReviewAssignment.findOne({ where: { proposalId: prop.B1.id, reviewerId: pi.D1.user.id } }))!;
    d3OnB1 = (await ReviewAssignment.findOne({ where: { proposalId: prop.B1.id, reviewerId: pi.D3.user.id } }))!;
    onB2 = (await ReviewAssignment.findOne({ where: { proposalId: prop.B2.id, reviewerId: pi.D1.user.id } }))!;
  });
  const rate = async (who: Person, proposal: Proposal, assignmentId: number | string, rating: string) =>
    (await request()).post(`/proposals/${proposal.id}/decision`).set("Cookie", who.cookie).type("form").send(form({ intent: "rate", assignmentId: String(assignmentId), rating }));

  it("refused before the decision is sent", async () => {
    const res = await rate(pi.B1, prop.B1, onB1.id, "4");
    expect(res.status).toBe(409);
  });

  it("once sent, the PI and a Co-I rate each comment; a rating can change and stays one per person", async () => {
    for (const n of ["B1", "B2"] as const) {
      const reviews = await ReviewAssignment.findAll({ where: { proposalId: prop[n].id, status: "submitted" } });
      await DecisionLetter.create({
        proposalId: prop[n].id,
        callId: call.id,
        batchId: null,
        outcome: "accepted",
        subject: "Decision",
        body: "Accepted.",
        facts: { proposalId: prop[n].id, code: "x", title: "t", semesterCode: call.semesterCode, callTitle: call.title, piName: "PI", outcome: "accepted", hours: [], tier: null, charge: null, comments: anonymisedComments(prop[n].id, reviews), date: "2027-01-01" },
        chargeId: null,
        sentAt: new Date(),
        sentById: chair.user.id,
      });
    }
    const page = await (await request()).get(`/proposals/${prop.B1.id}/decision`).set("Cookie", pi.B1.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("How helpful was this comment?");
    expect((await rate(pi.B1, prop.B1, onB1.id, "2")).status).toBe(200);
    expect((await rate(pi.B1, prop.B1, onB1.id, "5")).status).toBe(200);
    expect((await rate(coiB1, prop.B1, onB1.id, "3")).status).toBe(200);
    expect((await rate(pi.B1, prop.B1, d3OnB1.id, "1")).status).toBe(200);
    expect(await ReviewHelpfulness.count({ where: { assignmentId: onB1.id } })).toBe(2);
    expect((await ReviewHelpfulness.findOne({ where: { assignmentId: onB1.id, raterId: pi.B1.user.id } }))!.rating).toBe(5);
    const again = await (await request()).get(`/proposals/${prop.B1.id}/decision`).set("Cookie", pi.B1.cookie);
    expect(again.text).toMatch(/aria-pressed="true"[^>]*>5</);
  });

  it("refused for anyone off the team (404), for a comment of another proposal and for a bad rating (400)", async () => {
    expect((await rate(stranger, prop.B1, onB1.id, "4")).status).toBe(404);
    expect((await rate(pi.D1, prop.B1, onB1.id, "5")).status).toBe(404); // the reviewer themself
    const foreign = await rate(pi.B1, prop.B1, onB2.id, "4");
    expect(foreign.status).toBe(400);
    expect(foreign.text).toContain("There is no such comment on this proposal.");
    const six = await rate(pi.B1, prop.B1, onB1.id, "6");
    expect(six.status).toBe(400);
    expect(six.text).toContain("Choose a rating from 1 (not helpful) to 5 (very helpful).");
    const none = await rate(pi.B1, prop.B1, "abc", "4");
    expect(none.status).toBe(400);
    expect(await ReviewHelpfulness.count({ where: { assignmentId: onB2.id } })).toBe(0);
  });

  it("the chair sees per reviewer the mean and the number of ratings", async () => {
    expect((await rate(pi.B2, prop.B2, onB2.id, "1")).status).toBe(200);
    const figures = await helpfulnessByReviewer({ callId: call.id });
    // D1: 5 and 3 on B1, 1 on B2 → mean 3 over 3 ratings; D3: 1 over 1
    expect(figures.find((f) => f.reviewerId === pi.D1.user.id)).toEqual({ reviewerId: pi.D1.user.id, mean: 3, ratings: 3 });
    expect(figures.find((f) => f.reviewerId === pi.D3.user.id)).toEqual({ reviewerId: pi.D3.user.id, mean: 1, ratings: 1 });
    const page = await (await request()).get(`/committee/${call.id}/assignments`).set("Cookie", chair.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toMatch(new RegExp(`data-helpfulness="${pi.D1.user.id}"[^>]*>helpful 3\\.0/5 \\(3 ratings\\)`));
    // the reviewer's desk shows nothing of it
    const desk = await (await request()).get("/review").set("Cookie", pi.D1.cookie);
    expect(desk.text).not.toContain("helpful");
  });
});

describe("the demo's distributed call (seeded relative to today)", () => {
  // the seeder is idempotent and puts the call right if an earlier test file rolled migrations back
  beforeAll(async () => {
    await seedDistributedDemo({ context: sequelize });
  });
  it("ten proposals in review, each designated reviewer with four, reviews partly in, no conflicted pair", async () => {
    const seeded = await Call.findOne({ where: { reviewMode: "distributed", title: { [Op.like]: `${DISTRIBUTED_DEMO_TITLE}%` } } });
    expect(seeded).not.toBeNull();
    expect(seeded!.deadlineAt.getTime()).toBeLessThan(Date.now());
    const proposals = await Proposal.findAll({ where: { callId: seeded!.id } });
    expect(proposals.length).toBe(10);
    expect(proposals.every((x) => x.status === "in_review" && x.designatedReviewerId)).toBe(true);
    const rows = await ReviewAssignment.findAll({ where: { callId: seeded!.id } });
    const reviewers = [...new Set(proposals.map((x) => x.designatedReviewerId))];
    for (const r of reviewers) expect(rows.filter((a) => a.reviewerId === r).length).toBe(4);
    const submitted = rows.filter((a) => a.status === "submitted").length;
    expect(submitted).toBeGreaterThan(0);
    expect(submitted).toBeLessThan(rows.length);
    const state = await (await request()).get(`/api/v1/calls/${seeded!.id}/review`).set("Cookie", chair.cookie);
    expect(state.status).toBe(200);
    const conflicted = new Set(state.body.conflicts.map((c: { proposalId: number; reviewerId: number }) => `${c.proposalId}:${c.reviewerId}`));
    expect(state.body.conflicts.some((c: { reason: string }) => /same telescope and moon category/.test(c.reason))).toBe(true);
    expect(rows.filter((a) => conflicted.has(`${a.proposalId}:${a.reviewerId}`))).toEqual([]);
    const review = await CallReview.findOne({ where: { callId: seeded!.id } });
    expect(review!.reviewDeadlineAt!.getTime()).toBeGreaterThan(Date.now());
  });
});
