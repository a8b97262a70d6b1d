// Fill by rank after the chair's own edits, through HTTP on the test MariaDB: the board's "Fill by
// rank" keeps the hours, tier and waitlist the chair set by hand on the allocation page and fills
// the other proposals around them; replacing the hand-set ones too is the chair's explicit choice.
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, BoardEntry, Proposal, ReviewAssignment } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let chair: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let proposals: Proposal[];
let cell: { telescopeId: number; moonCategory: "dark" | "grey" | "bright"; hours: number };

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Fill Chair" });
  const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Fill Reviewer ${i}` })));
  call = await testCall();
  proposals = [];
  for (let i = 0; i < 3; i++) {
    const pi = await newUser({ name: `Fill PI ${i}` });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Fill programme ${i}` });
    await Proposal.update({ status: "in_review", code: `F${i + 1}-${call.semesterCode}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposals.push((await Proposal.findByPk(proposal.id))!);
  }
  for (const [r, rev] of reviewers.entries()) for (const [c, p] of proposals.entries()) {
    const overall = 8 - 2 * c - r / 2; // proposal 0 ranks first
    await ReviewAssignment.create({ callId: call.id, proposalId: p.id, reviewerId: rev.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
  }
  const sheet = await computeFeasibilitySheet({ proposalId: proposals[0].id });
  cell = sheet.totals.find((t) => t.semesterCode === call.semesterCode && t.hours > 0)!;
});

const fillOnBoard = async (extra: Record<string, string> = {}) =>
  (await request()).post(`/committee/${call.id}/board`).set("Cookie", chair.cookie).type("form").send(new URLSearchParams({ intent: "fill", ...extra }).toString());
const hoursOf = async (p: Proposal) => (await Allocation.sum("hours", { where: { callId: call.id, proposalId: p.id } })) ?? 0;
const entryOf = async (p: Proposal) => (await BoardEntry.findOne({ where: { proposalId: p.id } }))!;

/** The allocation page's save: every row as the page sends it, the chair's value for `p` in place of the stored one. */
async function saveSheet(edit: { proposal: Proposal; tier: string; hours: number; waitlisted?: boolean }) {
  const app = await request();
  const data = await app.get(`/committee/${call.id}/allocation.data`).set("Cookie", chair.cookie);
  expect(data.status).toBe(200);
  const rows = [];
  for (const p of proposals) {
    const mine = p.id === edit.proposal.id;
    const e = await entryOf(p);
    rows.push({
      proposalId: p.id,
      tier: mine ? edit.tier : (e?.tier ?? ""),
      waitlisted: mine ? (edit.waitlisted ?? false) : e.waitlisted,
      cells: [{ telescopeId: cell.telescopeId, moonCategory: cell.moonCategory, semesterCode: call.semesterCode, hours: mine ? edit.hours : await hoursOf(p) }],
    });
  }
  return app.post(`/committee/${call.id}/allocation`).set("Cookie", chair.cookie).set("Content-Type", "application/json").send({ intent: "save", rows });
}

describe("fill by rank after the chair's own edits", () => {
  it("keeps the hours and tier the chair set by hand, and fills the others around them", async () => {
    const first = await fillOnBoard();
    expect(first.status).toBe(200);
    for (const p of proposals) expect(await hoursOf(p)).toBeCloseTo(cell.hours, 6);

    // the chair cuts proposal 1 to 1.5 queue hours and waitlists proposal 2, by hand on the allocation page
    expect((await saveSheet({ proposal: proposals[1], tier: "queue", hours: 1.5 })).status).toBe(200);
    expect((await saveSheet({ proposal: proposals[2], tier: "", hours: 0, waitlisted: true })).status).toBe(200);
    expect(await hoursOf(proposals[1])).toBe(1.5);

    // proposal 0's hours, which only the fill set, are cleared by the database to show the fill writes them again
    await Allocation.destroy({ where: { callId: call.id, proposalId: proposals[0].id } });
    const again = await fillOnBoard();
    expect(again.status).toBe(200);
    expect(again.text).toContain("2 proposals whose hours you set by hand kept as they are");
    expect(await hoursOf(proposals[0])).toBeCloseTo(cell.hours, 6);
    expect(await hoursOf(proposals[1])).toBe(1.5);
    expect((await entryOf(proposals[1])).tier).toBe("queue");
    expect(await hoursOf(proposals[2])).toBe(0);
    expect(await entryOf(proposals[2])).toMatchObject({ tier: null, waitlisted: true });

    // the allocation page marks the hand-set rows
    const page = await (await request()).get(`/committee/${call.id}/allocation`).set("Cookie", chair.cookie);
    expect(page.text).toContain(`data-testid="by-hand-${proposals[1].id}"`);
    expect(page.text).not.toContain(`data-testid="by-hand-${proposals[0].id}"`);
  });

  it("takes the choice through the API too, and refuses a choice that is not true or false", async () => {
    const app = await request();
    const bad = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set({ Cookie: chair.cookie, "Content-Type": "application/json" }).send({ replaceHandSet: "yes" });
    expect(bad.status).toBe(400);
    expect(bad.body.issues[0].path).toBe("replaceHandSet");
    const res = await app.post(`/api/v1/calls/${call.id}/allocation/fill-by-rank`).set({ Cookie: chair.cookie, "Content-Type": "application/json" }).send("{}");
    expect(res.status).toBe(200);
    expect([...res.body.kept].sort()).toEqual([proposals[1].id, proposals[2].id].sort());
    expect(await hoursOf(proposals[1])).toBe(1.5);
  });

  it("replaces the hand-set hours too only when the chair asks for it", async () => {
    const res = await fillOnBoard({ replaceHandSet: "on" });
    expect(res.status).toBe(200);
    for (const p of proposals) expect(await hoursOf(p)).toBeCloseTo(cell.hours, 6);
    expect((await entryOf(proposals[2])).waitlisted).toBe(false);
    // after a fresh fill nothing counts as set by hand any more
    const next = await fillOnBoard();
    expect(next.text).not.toContain("set by hand kept");
  });
});
