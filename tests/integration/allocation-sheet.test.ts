// The allocation page (/committee/:callId/allocation) and the board's exports through HTTP on the
// test MariaDB: the page's JSON save with its field-level refusals; the CSV files read with a plain
// split (the checked columns carry no comma); the iCalendar file parsed with Mozilla's ical.js 2.2.1
// (registry), an RFC 5545 reader independent of the writer (ics).
import ICAL from "ical.js";
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { createObservation } from "~/lib/proposals/observations.server";
import { observationSchema } from "~/lib/schemas/proposals";
import { Allocation, AuditEntry, BoardEntry, Proposal, ReviewAssignment } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let chair: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let proposals: Proposal[];
const page = () => `/committee/${call.id}/allocation`;

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Sheet Chair" });
  const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Sheet Reviewer ${i}` })));
  call = await testCall();
  proposals = [];
  for (let i = 0; i < 3; i++) {
    const pi = await newUser({ name: `Sheet PI ${i}` });
    const { proposal, target, option, filter } = await readyProposal({ user: pi.user, callId: call.id, title: `Sheet programme ${i}, field ${call.semesterCode}` });
    if (i === 0) {
      // an astrometric observation: epochs to export
      await createObservation({
        user: pi.user,
        proposalId: proposal.id,
        input: observationSchema.parse({
          targetId: target.id, instrumentId: option.instrumentId, filterId: filter.id, mode: "snr", snrGoal: "80", framesPerEpoch: "4",
          epochsPerSemester: "3", moonCategory: "dark", maxAirmass: "1.8", seeingArcsec: "1.0", baselineYears: "2", requiredPmPrecisionMasPerYr: "0.5",
        }),
      });
    }
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}-${call.semesterCode}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposals.push((await Proposal.findByPk(proposal.id))!);
  }
  // reviewer r gives proposal c the grade 8 − c − r/2: proposal 0 ranks first
  for (const [r, rev] of reviewers.entries()) for (const [c, p] of proposals.entries()) {
    const overall = 8 - c - r / 2;
    await ReviewAssignment.create({ callId: call.id, proposalId: p.id, reviewerId: rev.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
  }
});

async function loaderData() {
  const res = await (await request()).get(`${page()}.data`).set("Cookie", chair.cookie);
  return res;
}

describe("the allocation page", () => {
  it("lists the board in order with the requested hours and a column per offered telescope × moon category", async () => {
    const res = await (await request()).get(page()).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    const first = res.text.indexOf(proposals[0].code!);
    const last = res.text.indexOf(proposals[2].code!);
    expect(first).toBeGreaterThan(0);
    expect(last).toBeGreaterThan(first);
    expect(res.text).toContain("Nothing is saved yet");
    expect((await loaderData()).status).toBe(200);
  });

  it("saves tiers and hours posted as JSON, and refuses hours without a tier next to that field", async () => {
    const app = await request();
    const sheet = await computeFeasibilitySheet({ proposalId: proposals[0].id });
    const cell = sheet.totals.find((t) => t.semesterCode === call.semesterCode && t.hours > 0)!;
    const row = (p: Proposal, tier: string, hours: number | string) => ({
      proposalId: p.id, tier, waitlisted: false,
      cells: [{ telescopeId: cell.telescopeId, moonCategory: cell.moonCategory, semesterCode: call.semesterCode, hours }],
    });
    const bad = await app.post(page()).set("Cookie", chair.cookie).set("Content-Type", "application/json")
      .send({ intent: "save", rows: [row(proposals[0], "", 5), row(proposals[1], "queue", "-1")] });
    expect(bad.status).toBe(400);
    expect(bad.text).toContain("Give a tier to a proposal with hours.");
    expect(bad.text).toContain("Hours cannot be negative.");
    expect(await Allocation.count({ where: { callId: call.id } })).toBe(0);

    const notJson = await app.post(page()).set("Cookie", chair.cookie).set("Content-Type", "application/json").send("{not json");
    expect(notJson.status).toBe(400);

    const notOffered = await app.post(page()).set("Cookie", chair.cookie).set("Content-Type", "application/json")
      .send({ intent: "save", rows: [{ ...row(proposals[0], "assured", 5), cells: [{ telescopeId: 999_999, moonCategory: "dark", semesterCode: call.semesterCode, hours: 5 }] }] });
    expect(notOffered.status).toBe(400);
    expect(notOffered.text).toContain("offers no dark time on telescope 999999");

    const good = await app.post(page()).set("Cookie", chair.cookie).set("Content-Type", "application/json")
      .send({ intent: "save", rows: [row(proposals[0], "assured", "12.5"), row(proposals[1], "filler", 3), { ...row(proposals[2], "", 0), waitlisted: true }] });
    expect(good.status).toBe(200);
    const saved = await Allocation.findAll({ where: { callId: call.id }, order: [["proposalId", "ASC"]] });
    expect(saved.map((a) => [a.proposalId, a.hours])).toEqual([[proposals[0].id, 12.5], [proposals[1].id, 3]]);
    const entries = await BoardEntry.findAll({ where: { callId: call.id }, order: [["proposalId", "ASC"]] });
    expect(entries.map((e) => [e.tier, e.waitlisted])).toEqual([["assured", false], ["filler", false], [null, true]]);
    expect(await AuditEntry.count({ where: { action: "allocation.saved", entityId: call.id } })).toBeGreaterThan(0);
  });

  it("is the chair's: a reviewer gets 403, a malformed call id 404", async () => {
    const outsider = await newUser({ roles: ["reviewer"], name: "Sheet Outsider" });
    expect((await (await request()).get(page()).set("Cookie", outsider.cookie)).status).toBe(403);
    expect((await (await request()).get(`/committee/12abc/allocation`).set("Cookie", chair.cookie)).status).toBe(404);
    expect((await (await request()).get(`/committee/${call.id}/allocation.csv`).set("Cookie", outsider.cookie)).status).toBe(403);
  });
});

describe("exports", () => {
  it("gives the ranked list in the board's order and the allocation as CSV", async () => {
    const app = await request();
    const ranked = await app.get(`/committee/${call.id}/ranked-list.csv`).set("Cookie", chair.cookie);
    expect(ranked.status).toBe(200);
    expect(ranked.headers["content-type"]).toMatch(/^text\/csv/);
    expect(ranked.headers["content-disposition"]).toContain(`ranked-list-${call.semesterCode}.csv`);
    const lines = ranked.text.trim().split("\n");
    const header = lines[0].split(",");
    expect(header.slice(0, 5)).toEqual(["position", "computed_rank", "chair_rank", "chair_rank_reason", "code"]);
    // titles carry a comma, so csv-stringify quotes them; the codes (no comma) stand in column 5
    expect(lines[1]).toContain(`"Sheet programme 0, field ${call.semesterCode}"`);
    expect(lines.slice(1).map((l) => l.split(",")[4])).toEqual(proposals.map((p) => p.code));
    expect(lines[1].split(",").slice(-4)).toEqual(["assured", "12.50", "0.00", "in_review"]);

    const allocation = await app.get(`/committee/${call.id}/allocation.csv`).set("Cookie", chair.cookie);
    expect(allocation.status).toBe(200);
    const rows = allocation.text.trim().split("\n");
    expect(rows).toHaveLength(3); // header + two proposals with hours
    expect(rows[1].startsWith(`1,${proposals[0].code},`)).toBe(true);
    expect(rows[1]).toContain(",assured,");
    expect(rows[1]).toContain(",12.50,");
  });

  it("exports an accepted programme's planned epochs as iCalendar that ical.js reads back", async () => {
    const app = await request();
    const early = await app.get(`/committee/${call.id}/proposals/${proposals[0].id}/epochs.ics`).set("Cookie", chair.cookie);
    expect(early.status).toBe(409);
    expect(early.text).toMatch(/accepted/);
    const locked = await app.post(`/api/v1/calls/${call.id}/allocation/lock`).set("Cookie", chair.cookie).set("Content-Type", "application/json").send("{}");
    expect(locked.status).toBe(200);
    const res = await app.get(`/committee/${call.id}/proposals/${proposals[0].id}/epochs.ics`).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/calendar/);
    // RFC 5545 §3.1: lines end in CRLF
    expect(res.text).toContain("\r\n");
    const sheet = await computeFeasibilitySheet({ proposalId: proposals[0].id });
    const epochs = sheet.observations.flatMap((o) => (o.astrometry ? o.astrometry.epochs.map((e) => ({ date: e.date, target: o.targetName })) : []));
    expect(epochs.length).toBeGreaterThan(0);
    const calendar = new ICAL.Component(ICAL.parse(res.text));
    const events = calendar.getAllSubcomponents("vevent").map((v) => new ICAL.Event(v));
    expect(events.map((e) => e.startDate.toString()).sort()).toEqual(epochs.map((e) => e.date).sort());
    expect(events.every((e) => e.startDate.isDate)).toBe(true);
    expect(new Set(events.map((e) => e.uid)).size).toBe(events.length);
    expect(events[0].summary).toContain(proposals[0].code!);
    // a declined programme (no hours) has none
    const declined = await app.get(`/committee/${call.id}/proposals/${proposals[2].id}/epochs.ics`).set("Cookie", chair.cookie);
    expect(declined.status).toBe(409);
    expect((await (await request()).get(`/committee/${call.id}/proposals/abc/epochs.ics`).set("Cookie", chair.cookie)).status).toBe(404);
  });
});
