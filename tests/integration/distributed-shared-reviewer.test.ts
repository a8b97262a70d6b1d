// Distributed review with one reviewer named by two teams, through HTTP on the test MariaDB. Each
// submitting team owes k reviews, so a person both teams designated owes 2k: the suggestion gives
// them 2k proposals (conflicts permitting), and on the ranking board each of the two teams is
// measured against those 2k, not against k as if the person reviewed for one team only.
import { beforeAll, describe, expect, it } from "vitest";
import { callBoard } from "~/lib/allocation/board.server";
import { Call, CallReview, ProposalMember, Proposal, ReviewAssignment, User } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });
const K = 2;
const names = ["A", "B", "C", "D", "E", "F"] as const;
type Name = (typeof names)[number];

let chair: Person;
let call: Call;
let shared: Person; // a Co-I on A and B, whom both teams designate
const pi = {} as Record<Name, Person>;
const prop = {} as Record<Name, Proposal>;
const reviewerOf = (n: Name) => (n === "A" || n === "B" ? shared : pi[n]);

async function suggestion() {
  const res = await (await request()).post(`/api/v1/calls/${call.id}/review/suggest`).set(json(chair.cookie)).send("{}");
  expect(res.status).toBe(200);
  return res.body as { assignments: { proposalId: number; reviewerId: number }[]; short: { reviewerId: number; count: number; reason: string }[] };
}

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Shared Reviewer Chair" });
  call = await testCall();
  await call.update({ reviewMode: "distributed", reviewsPerSubmitter: K, separateCompetitors: false, unreviewedPolicy: "flag" });
  shared = await newUser({ name: "Reviewer for two teams" });
  await User.update({ institution: "Shared Reviewer Institute" }, { where: { id: shared.user.id } });
  let serial = 300;
  for (const n of names) {
    pi[n] = await newUser({ name: `Shared-call PI ${n}` });
    await User.update({ institution: `Shared-call Institute ${n}` }, { where: { id: pi[n].user.id } });
    const { proposal } = await readyProposal({ user: pi[n].user, callId: call.id, title: `Shared-call programme ${n} of ${call.semesterCode}` });
    if (n === "A" || n === "B") await ProposalMember.create({ proposalId: proposal.id, userId: shared.user.id, email: shared.email, role: "coi", acceptedAt: new Date() });
    serial += 1;
    await Proposal.update({ status: "submitted", serial, code: `${serial}/${call.semesterCode.slice(2)}`, submittedAt: new Date(), designatedReviewerId: reviewerOf(n).user.id }, { where: { id: proposal.id } });
    prop[n] = (await Proposal.findByPk(proposal.id))!;
  }
  await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
  const started = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(form({ intent: "start" }));
  expect(started.status).toBe(200);
  const future = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 16);
  const setup = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(`intent=setup&reviewDeadline=${future}&perProposal=3`);
  expect(setup.status).toBe(200);
});

describe("a reviewer two teams designated", () => {
  it("is seated once and suggested 2k proposals, never the two teams' own; the others k each", async () => {
    const s = await suggestion();
    const count = (userId: number) => s.assignments.filter((a) => a.reviewerId === userId).length;
    expect(count(shared.user.id)).toBe(2 * K);
    const theirs = s.assignments.filter((a) => a.reviewerId === shared.user.id).map((a) => a.proposalId);
    expect(theirs).not.toContain(prop.A.id);
    expect(theirs).not.toContain(prop.B.id);
    for (const n of ["C", "D", "E", "F"] as const) expect(count(pi[n].user.id), n).toBe(K);
    expect(s.short).toEqual([]);
    const committed = await (await request()).put(`/api/v1/calls/${call.id}/review/assignments`).set(json(chair.cookie)).send(JSON.stringify({ assignments: s.assignments, commit: true }));
    expect(committed.status, JSON.stringify(committed.body)).toBe(200);
    expect(await ReviewAssignment.count({ where: { callId: call.id, reviewerId: shared.user.id } })).toBe(2 * K);
  });

  it("owes 2k for both teams: k delivered leaves both late after the review deadline", async () => {
    const mine = await ReviewAssignment.findAll({ where: { callId: call.id, reviewerId: shared.user.id }, order: [["id", "ASC"]] });
    const grade = { science: "7", feasibility: "7", legacy: "6", overall: "7", commentToPi: Array.from({ length: 55 }, (_, i) => `word${i}`).join(" "), commentToCommittee: "", intent: "submit" };
    for (const a of mine.slice(0, K)) {
      const res = await (await request()).post(`/review/${a.proposalId}`).set("Cookie", shared.cookie).type("form").send(form(grade));
      expect(res.status, res.text.slice(0, 300)).toBe(200);
    }
    await CallReview.update({ reviewDeadlineAt: new Date(Date.now() - 60_000) }, { where: { callId: call.id } });
    const board = await callBoard({ callId: call.id });
    const duty = (n: Name) => board.proposals.find((r) => r.proposalId === prop[n].id)!.reviewDuty;
    for (const n of ["A", "B"] as const) expect(duty(n), n).toEqual({ reviewerId: shared.user.id, owed: 2 * K, delivered: K, late: true, teams: 2 });
    expect(duty("C")).toEqual({ reviewerId: pi.C.user.id, owed: K, delivered: 0, late: true, teams: 1 });
    const page = await (await request()).get(`/committee/${call.id}/board`).set("Cookie", chair.cookie);
    expect(page.status).toBe(200);
    expect(page.text.replaceAll("<!-- -->", "")).toContain(`${K} of ${2 * K}`);
    expect(page.text.replaceAll("<!-- -->", "")).toContain("reviewer shared by 2 teams");
  });
});
