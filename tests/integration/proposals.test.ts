// The PI's workspace through HTTP (the built app on the test MariaDB): access rules, overview
// with optimistic locking, team, targets with CSV import, observations.
import { magnitudesOf } from "~/models/Target";
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, Instrument, Observation, OutgoingMail, Proposal, ProposalMember, Target, Telescope, User } from "~/models/index.server";
import { instrumentOptions } from "~/lib/proposals/observations.server";
import { createProposal } from "~/lib/proposals/proposals.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;

function overviewBody(values: Record<string, string | string[]>) {
  const body = new URLSearchParams();
  for (const [k, v] of Object.entries(values)) for (const x of ([] as string[]).concat(v)) body.append(k, x);
  return body.toString();
}

async function post(path: string, cookie: string, values: Record<string, string | number | boolean>) {
  return (await request()).post(path).set("Cookie", cookie).type("form").send(form(values));
}

let pi: Person;
let stranger: Person;
let call: Awaited<ReturnType<typeof testCall>>;

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Test PI" });
  stranger = await newUser({ name: "Someone Else" });
  call = await testCall();
});

describe("access: a user who is not on the team finds nothing", () => {
  let proposalId: number;
  let targetId: number;
  let observationId: number;
  beforeAll(async () => {
    const ready = await readyProposal({ user: pi.user, callId: call.id, title: "Private programme of the test PI" });
    proposalId = ready.proposal.id;
    targetId = ready.target.id;
    observationId = (await Observation.findOne({ where: { proposalId } }))!.id;
  });

  const pages = ["", "/team", "/targets", "/observations", "/feasibility", "/science-case", "/change-log", "/pdf"];
  it("GET /proposals/:id/submit (the strip's action address) leads the PI to the summary, and is a 404 for a stranger", async () => {
    const path = `/proposals/${proposalId}/submit`;
    const mine = await (await request()).get(path).set("Cookie", pi.cookie);
    expect(mine.status).toBe(302);
    expect(mine.headers.location).toBe(`/proposals/${proposalId}`);
    expect((await (await request()).get(path).set("Cookie", stranger.cookie)).status).toBe(404);
  });

  for (const page of pages) {
    it(`GET /proposals/:id${page}: 200 for the PI, 404 for a stranger, sign-in for the anonymous`, async () => {
      const path = `/proposals/${proposalId}${page}`;
      const mine = await (await request()).get(path).set("Cookie", pi.cookie);
      expect(mine.status).toBe(200);
      const theirs = await (await request()).get(path).set("Cookie", stranger.cookie);
      expect(theirs.status).toBe(404);
      expect(theirs.text).not.toContain("Private programme of the test PI");
      const anonymous = await (await request()).get(path);
      expect(anonymous.status).toBe(302);
      expect(anonymous.headers.location).toBe(`/sign-in?redirectTo=${encodeURIComponent(path)}`);
    });
  }

  it("a proposal id that does not exist answers the same 404 as someone else's", async () => {
    const res = await (await request()).get("/proposals/99999999").set("Cookie", pi.cookie);
    expect(res.status).toBe(404);
    expect((await (await request()).get("/proposals/abc").set("Cookie", pi.cookie)).status).toBe(404);
  });

  const actions: { name: string; path: (id: number) => string; body: () => Record<string, string | number> }[] = [
    { name: "overview save", path: (id) => `/proposals/${id}?index`, body: () => ({ intent: "save", version: 1, title: "Hijacked title", abstract: "", scienceCategory: "" }) },
    { name: "invite", path: (id) => `/proposals/${id}/team`, body: () => ({ intent: "invite", email: "intruder@test.example" }) },
    { name: "add target", path: (id) => `/proposals/${id}/targets`, body: () => ({ intent: "create", name: "Intruder", ra: "10", dec: "10" }) },
    { name: "delete target", path: (id) => `/proposals/${id}/targets`, body: () => ({ intent: "delete", targetId }) },
    { name: "import CSV", path: (id) => `/proposals/${id}/targets`, body: () => ({ intent: "import", csv: "name,ra,dec\nIntruder,11,11" }) },
    { name: "delete observation", path: (id) => `/proposals/${id}/observations`, body: () => ({ intent: "delete", observationId }) },
    { name: "submit", path: (id) => `/proposals/${id}/submit`, body: () => ({ intent: "submit" }) },
    { name: "withdraw", path: (id) => `/proposals/${id}/submit`, body: () => ({ intent: "withdraw" }) },
  ];
  for (const a of actions) {
    it(`POST ${a.name} by a stranger: 404 and nothing changes`, async () => {
      const before = await Promise.all([Proposal.findByPk(proposalId), Target.count({ where: { proposalId } }), Observation.count({ where: { proposalId } }), ProposalMember.count({ where: { proposalId } })]);
      const res = await post(a.path(proposalId), stranger.cookie, a.body());
      expect(res.status).toBe(404);
      const after = await Promise.all([Proposal.findByPk(proposalId), Target.count({ where: { proposalId } }), Observation.count({ where: { proposalId } }), ProposalMember.count({ where: { proposalId } })]);
      expect(after[0]!.toJSON()).toEqual(before[0]!.toJSON());
      expect(after.slice(1)).toEqual(before.slice(1));
    });
  }

  it("POST add observation by a stranger: 404", async () => {
    const [option] = await instrumentOptions({ callId: call.id });
    const res = await post(`/proposals/${proposalId}/observations`, stranger.cookie, {
      intent: "create", targetId, instrumentId: option.instrumentId, filterId: option.filters[0].id, mode: "snr", snrGoal: 20, framesPerEpoch: 1, epochsPerSemester: 1, moonCategory: "dark", maxAirmass: 2, seeingArcsec: 1,
    });
    expect(res.status).toBe(404);
    expect(await Observation.count({ where: { proposalId } })).toBe(1);
  });

  it("GET /api/v1/proposals/:id: 200 with the feasibility sheet for the PI, 404 JSON for a stranger, 401 JSON anonymous, 400 for a malformed id", async () => {
    const mine = await (await request()).get(`/api/v1/proposals/${proposalId}`).set("Cookie", pi.cookie);
    expect(mine.status).toBe(200);
    expect(mine.headers["content-type"]).toMatch(/application\/json/);
    expect(mine.body.proposal.title).toBe("Private programme of the test PI");
    expect(mine.body.proposal.targets).toHaveLength(1);
    expect(mine.body.feasibilitySheet.requestedHours).toBeGreaterThan(0);
    const theirs = await (await request()).get(`/api/v1/proposals/${proposalId}`).set("Cookie", stranger.cookie);
    expect(theirs.status).toBe(404);
    expect(theirs.headers["content-type"]).toMatch(/application\/json/);
    expect(theirs.body.error).toBeTruthy();
    expect(JSON.stringify(theirs.body)).not.toContain("Private programme");
    const anonymous = await (await request()).get(`/api/v1/proposals/${proposalId}`);
    expect(anonymous.status).toBe(401);
    expect(anonymous.body.error).toBeTruthy();
    const bad = await (await request()).get("/api/v1/proposals/12abc").set("Cookie", pi.cookie);
    expect(bad.status).toBe(400);
    expect(bad.body.issues[0].path).toBe("proposalId");
  });

  it("GET /api/v1/proposals lists only the caller's proposals, with requested hours", async () => {
    const mine = await (await request()).get("/api/v1/proposals").set("Cookie", pi.cookie);
    expect(mine.status).toBe(200);
    const row = mine.body.proposals.find((p: { id: number }) => p.id === proposalId);
    expect(row).toMatchObject({ status: "draft", role: "pi", semesterCode: call.semesterCode, targets: 1, observations: 1 });
    expect(row.requestedHours).toBeGreaterThan(0);
    const theirs = await (await request()).get("/api/v1/proposals").set("Cookie", stranger.cookie);
    expect(theirs.body.proposals.map((p: { id: number }) => p.id)).not.toContain(proposalId);
    expect((await (await request()).get("/api/v1/proposals")).status).toBe(401);
  });
});

describe("starting a proposal and My proposals", () => {
  it("GET /proposals/new preselects the call named in ?call and lists open calls", async () => {
    const res = await (await request()).get(`/proposals/new?call=${call.semesterCode}`).set("Cookie", pi.cookie);
    expect(res.status).toBe(200);
    expect(res.text).toMatch(new RegExp(`value="${call.id}"[^>]*checked|checked[^>]*value="${call.id}"`));
  });

  it("refuses a short title next to the field and keeps the abstract that was typed", async () => {
    const res = await post("/proposals/new", pi.cookie, { intent: "create", callId: call.id, title: "Hi", abstract: "Kept words of the abstract" });
    expect(res.status).toBe(400);
    expect(res.text).toContain("Give the proposal a title of at least 5 characters.");
    expect(res.text).toContain("Kept words of the abstract");
  });

  it("refuses a call whose deadline has passed", async () => {
    const closed = await testCall({ deadlineInDays: -1 });
    const res = await post("/proposals/new", pi.cookie, { intent: "create", callId: closed.id, title: "Too late for this call" });
    expect(res.status).toBe(400);
    expect(res.text).toContain(`The deadline of call ${closed.semesterCode} has passed.`);
    expect(await Proposal.count({ where: { callId: closed.id } })).toBe(0);
  });

  it("creates a draft with the creator as PI, audited, and lists it under My proposals", async () => {
    const res = await post("/proposals/new", pi.cookie, { intent: "create", callId: call.id, title: "A fresh draft for the list", abstract: "" });
    expect(res.status).toBe(302);
    const id = Number(res.headers.location.match(/^\/proposals\/(\d+)$/)?.[1]);
    const proposal = await Proposal.findByPk(id);
    expect(proposal).toMatchObject({ status: "draft", code: null, callId: call.id, semestersRequested: [call.semesterCode] });
    expect(await ProposalMember.findOne({ where: { proposalId: id } })).toMatchObject({ role: "pi", userId: pi.user.id });
    expect(await AuditEntry.count({ where: { proposalId: id, action: "proposal.created" } })).toBe(1);
    const list = await (await request()).get("/proposals").set("Cookie", pi.cookie);
    expect(list.status).toBe(200);
    expect(list.text).toContain("A fresh draft for the list");
    const other = await (await request()).get("/proposals").set("Cookie", stranger.cookie);
    expect(other.text).not.toContain("A fresh draft for the list");
  });
});

describe("overview with optimistic locking", () => {
  let id: number;
  beforeAll(async () => {
    id = (await createProposal({ user: pi.user, callId: call.id, title: "Overview under test", abstract: "" })).id;
  });
  const values = (over: Record<string, string | string[]>) => ({ title: "Overview under test", abstract: "Short abstract.", scienceCategory: "galaxies", ...over });

  it("saves, bumps the version and writes the audit log", async () => {
    const version = (await Proposal.findByPk(id))!.version;
    const res = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ isTargetOfOpportunity: "on" }) }));
    expect(res.status).toBe(200);
    const p = (await Proposal.findByPk(id))!;
    expect(p.version).toBe(version + 1);
    expect(p).toMatchObject({ abstract: "Short abstract.", scienceCategory: "galaxies", isTargetOfOpportunity: true });
    const audit = await AuditEntry.findOne({ where: { proposalId: id, action: "proposal.overview_updated" }, order: [["id", "DESC"]] });
    expect(audit!.details).toMatchObject({ changed: expect.arrayContaining(["abstract", "scienceCategory", "isTargetOfOpportunity"]) });
  });

  it("refuses an abstract over 250 words, says how many, and keeps the text", async () => {
    const version = (await Proposal.findByPk(id))!.version;
    const long = Array.from({ length: 251 }, (_, i) => `word${i}`).join(" ");
    const res = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ abstract: long }) }));
    expect(res.status).toBe(400);
    expect(res.text).toContain("The abstract has 251 words; the limit is 250.");
    expect(res.text).toContain("word250");
    expect((await Proposal.findByPk(id))!.version).toBe(version);
  });

  it("a multi-semester programme needs at least two semesters, including the call's own", async () => {
    const version = (await Proposal.findByPk(id))!.version;
    const one = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ isMultiSemester: "on", semestersRequested: [call.semesterCode] }) }));
    expect(one.status).toBe(400);
    expect(one.text).toContain("at least two semesters");
    const year = Number(call.semesterCode.slice(0, 4));
    const following = call.semesterCode.endsWith("A") ? [`${year}B`, `${year + 1}A`] : [`${year + 1}A`, `${year + 1}B`];
    const withoutOwn = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ isMultiSemester: "on", semestersRequested: following }) }));
    expect(withoutOwn.status).toBe(400);
    expect(withoutOwn.text).toContain(`must include the call`);
    const ok = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ isMultiSemester: "on", semestersRequested: [call.semesterCode, following[0]] }) }));
    expect(ok.status).toBe(200);
    expect((await Proposal.findByPk(id))!.semestersRequested).toEqual([call.semesterCode, following[0]]);
  });

  it("a save from a stale form gets a 409 with both versions; the saved one is untouched", async () => {
    const version = (await Proposal.findByPk(id))!.version;
    const first = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ title: "Title saved first" }) }));
    expect(first.status).toBe(200);
    const second = await (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ title: "Title typed in the stale form" }) }));
    expect(second.status).toBe(409);
    expect(second.text).toContain("Someone saved the summary while you were editing");
    expect(second.text).toContain("Title typed in the stale form");
    expect(second.text).toContain("Title saved first");
    expect((await Proposal.findByPk(id))!.title).toBe("Title saved first");
  });

  it("two saves racing with the same version: exactly one wins, the other gets the conflict", async () => {
    const version = (await Proposal.findByPk(id))!.version;
    const send = async (title: string) =>
      (await request()).post(`/proposals/${id}?index`).set("Cookie", pi.cookie).type("form").send(overviewBody({ intent: "save", version: String(version), ...values({ title }) }));
    const results = await Promise.all([send("Racing title one"), send("Racing title two")]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 409]);
    const p = (await Proposal.findByPk(id))!;
    expect(p.version).toBe(version + 1);
    const winner = results.find((r) => r.status === 200)!;
    const loser = results.find((r) => r.status === 409)!;
    expect(["Racing title one", "Racing title two"]).toContain(p.title);
    expect(loser.text).toContain(p.title === "Racing title one" ? "Racing title two" : "Racing title one");
    expect(winner.status).toBe(200);
  });
});

describe("team", () => {
  let id: number;
  const coiEmail = `coi-${Date.now()}@test.example`;
  beforeAll(async () => {
    id = (await createProposal({ user: pi.user, callId: call.id, title: "Team under test", abstract: "" })).id;
  });

  it("invites a Co-I by e-mail: a member row waiting for sign-in, an invitation in the mail queue, an audit entry", async () => {
    const res = await post(`/proposals/${id}/team`, pi.cookie, { intent: "invite", email: coiEmail.toUpperCase() });
    expect(res.status).toBe(200);
    expect(await ProposalMember.findOne({ where: { proposalId: id, email: coiEmail } })).toMatchObject({ role: "coi", userId: null });
    const mail = await OutgoingMail.findOne({ where: { toAddress: coiEmail }, order: [["id", "DESC"]] });
    expect(mail!.subject).toContain("Team under test");
    expect(mail!.textBody).toContain(`/proposals/${id}`);
    expect(await AuditEntry.count({ where: { proposalId: id, action: "member.invited" } })).toBe(1);
  });

  it("refuses the same address twice and a malformed one, next to the field", async () => {
    const again = await post(`/proposals/${id}/team`, pi.cookie, { intent: "invite", email: coiEmail });
    expect(again.status).toBe(400);
    expect(again.text).toContain("is already on the team");
    const bad = await post(`/proposals/${id}/team`, pi.cookie, { intent: "invite", email: "not-an-address" });
    expect(bad.status).toBe(400);
    expect(bad.text).toContain("Enter a valid e-mail address");
  });

  it("a Co-I invited before signing in cannot be made PI yet", async () => {
    const member = (await ProposalMember.findOne({ where: { proposalId: id, email: coiEmail } }))!;
    const res = await post(`/proposals/${id}/team`, pi.cookie, { intent: "hand-over", memberId: member.id });
    expect(res.status).toBe(409);
    expect(res.text).toContain("has not signed in yet");
  });

  it("the invitee signs in with that address and finds the proposal in their list; the membership is claimed", async () => {
    await User.create({ email: coiEmail, name: "Invited Colleague", institution: "Test Institute", lastSignInAt: null });
    const cookie = await sessionCookieFor(coiEmail);
    const list = await (await request()).get("/proposals").set("Cookie", cookie);
    expect(list.status).toBe(200);
    expect(list.text).toContain("Team under test");
    const member = (await ProposalMember.findOne({ where: { proposalId: id, email: coiEmail } }))!;
    expect(member.userId).not.toBeNull();
    expect(member.acceptedAt).not.toBeNull();
    // a Co-I edits the draft …
    const target = await post(`/proposals/${id}/targets`, cookie, { intent: "create", name: "Added by the Co-I", ra: "12:00:00", dec: "+30:00:00" });
    expect(target.status).toBe(200);
    // … but cannot hand over the PI role, remove others, submit or withdraw
    const piMember = (await ProposalMember.findOne({ where: { proposalId: id, role: "pi" } }))!;
    expect((await post(`/proposals/${id}/team`, cookie, { intent: "hand-over", memberId: member.id })).status).toBe(403);
    expect((await post(`/proposals/${id}/team`, cookie, { intent: "remove", memberId: piMember.id })).status).toBe(409);
    const submit = await post(`/proposals/${id}/submit`, cookie, { intent: "submit" });
    expect(submit.status).toBe(403);
    expect(submit.text).toContain("Only the PI can submit the proposal.");
    expect((await post(`/proposals/${id}/submit`, cookie, { intent: "withdraw" })).status).toBe(403);
    expect((await Proposal.findByPk(id))!.status).toBe("draft");
  });

  it("the PI hands the PI role to a signed-in Co-I; the roles swap and it is audited", async () => {
    const member = (await ProposalMember.findOne({ where: { proposalId: id, email: coiEmail } }))!;
    const res = await post(`/proposals/${id}/team`, pi.cookie, { intent: "hand-over", memberId: member.id });
    expect(res.status).toBe(200);
    expect((await ProposalMember.findByPk(member.id))!.role).toBe("pi");
    expect((await ProposalMember.findOne({ where: { proposalId: id, userId: pi.user.id } }))!.role).toBe("coi");
    expect(await AuditEntry.count({ where: { proposalId: id, action: "member.pi_handed_over" } })).toBe(1);
    // the former PI, now a Co-I, leaves the team
    const self = (await ProposalMember.findOne({ where: { proposalId: id, userId: pi.user.id } }))!;
    const leave = await post(`/proposals/${id}/team`, pi.cookie, { intent: "remove", memberId: self.id });
    expect(leave.status).toBe(302);
    expect(leave.headers.location).toBe("/proposals");
    expect((await (await request()).get(`/proposals/${id}`).set("Cookie", pi.cookie)).status).toBe(404);
  });
});

describe("targets", () => {
  let id: number;
  beforeAll(async () => {
    id = (await createProposal({ user: pi.user, callId: call.id, title: "Targets under test", abstract: "" })).id;
  });

  it("adds a target from sexagesimal input, refuses bad coordinates and duplicates next to the field", async () => {
    const ok = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "Vesper Knot", ra: "05:12:33.4", dec: "-21:04:12", pmra: "2.5", pmdec: "-1", magnitude: "16.1", band: "R", notes: "" });
    expect(ok.status).toBe(200);
    const t = (await Target.findOne({ where: { proposalId: id, name: "Vesper Knot" } }))!;
    expect(t.raDeg).toBeCloseTo(15 * (5 + 12 / 60 + 33.4 / 3600), 9);
    expect(t.decDeg).toBeCloseTo(-(21 + 4 / 60 + 12 / 3600), 9);
    const badRa = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "Bad RA", ra: "25:00:00", dec: "+10:00:00" });
    expect(badRa.status).toBe(400);
    expect(badRa.text).toContain("RA: hours must be 0–23");
    expect(badRa.text).toContain("Bad RA");
    const noBand = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "No band", ra: "10", dec: "10", magnitude: "14" });
    expect(noBand.status).toBe(400);
    expect(noBand.text).toContain("Give the band of the magnitude.");
    const sameName = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "vesper knot", ra: "100", dec: "10" });
    expect(sameName.status).toBe(400);
    expect(sameName.text).toContain("is already a target of this proposal");
    const samePlace = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "Twin", ra: "05:12:33.45", dec: "-21:04:12.3" });
    expect(samePlace.status).toBe(400);
    expect(samePlace.text).toContain("within 1″ of");
    expect(await Target.count({ where: { proposalId: id } })).toBe(1);
  });

  it("keeps one magnitude per band from the form and from CSV columns mag_<band>", async () => {
    const id = (await createProposal({ user: pi.user, callId: call.id, title: "Magnitudes per band", abstract: "" })).id;
    const ok = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "Two-band Field", ra: "140", dec: "12", mag_V: "16.4", mag_R: "15.9", notes: "" });
    expect(ok.status).toBe(200);
    const t = (await Target.findOne({ where: { proposalId: id, name: "Two-band Field" } }))!;
    expect(magnitudesOf(t)).toEqual({ V: 16.4, R: 15.9 });
    expect([t.magnitude, t.band]).toEqual([16.4, "V"]); // the mirror of the first band (U B V R I order)
    const twice = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "create", name: "Twice", ra: "141", dec: "12", mag_V: "16.4", magnitude: "16.0", band: "V" });
    expect(twice.status).toBe(400);
    expect(twice.text).toContain("The V magnitude is given twice");
    const csv = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "import", csv: "name,ra,dec,mag_B,mag_I\nCsv Field,142,12,17.2,15.1" });
    expect(csv.status).toBe(200);
    expect(magnitudesOf((await Target.findOne({ where: { proposalId: id, name: "Csv Field" } }))!)).toEqual({ B: 17.2, I: 15.1 });
    // a writer that sets only the older pair (the demo seeder does) gets the one-band map
    const old = await Target.create({ proposalId: id, name: "Old style", raDeg: 143, decDeg: 12, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 14.2, band: "R", notes: null });
    expect(magnitudesOf((await Target.findByPk(old.id))!)).toEqual({ R: 14.2 });
  });

  it("edits and deletes a target (its observations go with it), audited", async () => {
    const t = (await Target.findOne({ where: { proposalId: id, name: "Vesper Knot" } }))!;
    const edit = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "update", targetId: t.id, name: "Vesper Knot East", ra: "78.14", dec: "-21.07", pmra: "", pmdec: "", magnitude: "", band: "" });
    expect(edit.status).toBe(200);
    expect((await Target.findByPk(t.id))!).toMatchObject({ name: "Vesper Knot East", raDeg: 78.14, magnitude: null });
    const [option] = await instrumentOptions({ callId: call.id });
    await Observation.create({ proposalId: id, targetId: t.id, instrumentId: option.instrumentId, filterId: option.filters[0].id, snrGoal: 10, exposureSeconds: null, baselineYears: null, requiredPmPrecisionMasPerYr: null });
    const del = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "delete", targetId: t.id });
    expect(del.status).toBe(200);
    expect(await Target.findByPk(t.id)).toBeNull();
    expect(await Observation.count({ where: { targetId: t.id } })).toBe(0);
    expect(await AuditEntry.count({ where: { proposalId: id, action: "target.deleted" } })).toBe(1);
  });

  it("imports a CSV: good rows saved, each bad row reported with line, field and reason and kept for re-import", async () => {
    await Target.create({ proposalId: id, name: "Already here", raDeg: 150, decDeg: 10, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: null, band: null, notes: null });
    const csv = [
      "name,ra,dec,pmra,pmdec,magnitude,band",
      "Cairn Field 1,10:00:00,+20:00:00,1.5,-2.0,15.0,V",
      "Cairn Field 2,150.5,+20.5,,,,",
      "Cairn Field 3,10:30:00.5,-05:00:00,,,17.2,I",
      "Broken RA,10:61:00,+20:00:00,,,,",
      "Far south,11:00:00,-95:00:00,,,,",
      "cairn field 1,12:00:00,+10:00:00,,,,",
      "Shadow of old,10:00:00.01,+10:00:00.1,,,,",
      "Bad magnitude,13:00:00,+10:00:00,,,bright,V",
    ].join("\n");
    const res = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "import", csv });
    expect(res.status).toBe(200);
    expect(await Target.count({ where: { proposalId: id } })).toBe(4);
    const text = res.text.replaceAll("<!-- -->", "");
    expect(text).toContain("3 accepted and saved");
    expect(text).toContain("5 refused");
    expect(text).toContain("minutes must be 0–59");
    expect(text).toContain("must be in the range −90 ≤ Dec ≤ +90 degrees");
    expect(text).toMatch(/duplicate: .*Cairn Field 1.* is already on line 2/);
    expect(text).toMatch(/within 1″ of .*Already here/);
    expect(text).toContain("The magnitude must be a number.");
    // the refused rows are put back in the box, the accepted ones are not
    const box = text.match(/<textarea[^>]*id="csv"[^>]*>([\s\S]*?)<\/textarea>/)?.[1] ?? "";
    expect(box).toContain("Broken RA");
    expect(box).toContain("Bad magnitude");
    expect(box).not.toContain("Cairn Field 2");
    const audit = await AuditEntry.findOne({ where: { proposalId: id, action: "targets.imported" } });
    expect(audit!.details).toMatchObject({ accepted: 3, refused: 5 });
  });

  it("imports an uploaded CSV file, and explains a bad header or an empty paste", async () => {
    const upload = await (await request())
      .post(`/proposals/${id}/targets`)
      .set("Cookie", pi.cookie)
      .field("intent", "import")
      .field("csv", "")
      .attach("file", Buffer.from("name;ra;dec\nUploaded one;14:00:00;+40:00:00\n"), { filename: "targets.csv", contentType: "text/csv" });
    expect(upload.status).toBe(200);
    expect(await Target.count({ where: { proposalId: id, name: "Uploaded one" } })).toBe(1);
    const header = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "import", csv: "object,alpha,delta\nX,1,2" });
    expect(header.status).toBe(400);
    expect(header.text).toContain("missing columns name, ra, dec");
    expect(header.text).toContain("object,alpha,delta");
    const empty = await post(`/proposals/${id}/targets`, pi.cookie, { intent: "import", csv: "  " });
    expect(empty.status).toBe(400);
    expect(empty.text).toContain("Paste the CSV or choose a file.");
  });
});

describe("observations", () => {
  let id: number;
  let targetId: number;
  let option: Awaited<ReturnType<typeof instrumentOptions>>[number];
  beforeAll(async () => {
    id = (await createProposal({ user: pi.user, callId: call.id, title: "Observations under test", abstract: "" })).id;
    targetId = (await Target.create({ proposalId: id, name: "Lantern Field", raDeg: 196.3, decDeg: 22.2, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 16, band: "V", notes: null })).id;
    [option] = await instrumentOptions({ callId: call.id });
  });
  const base = () => ({ intent: "create", targetId, instrumentId: option.instrumentId, filterId: option.filters[0].id, mode: "snr", snrGoal: "80", exposureSeconds: "", framesPerEpoch: "4", epochsPerSemester: "2", baselineYears: "3", requiredPmPrecisionMasPerYr: "0.5", moonCategory: "grey", maxAirmass: "1.6", seeingArcsec: "1.1" });

  it("offers the instruments and filters of the call's telescopes", async () => {
    const options = await instrumentOptions({ callId: call.id });
    expect(options.length).toBeGreaterThanOrEqual(2);
    expect(options.every((o) => o.filters.length > 0)).toBe(true);
  });

  it("adds an observation with an SNR goal; an exposure time typed too is dropped (exactly one is kept)", async () => {
    const res = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), exposureSeconds: "120" });
    expect(res.status).toBe(200);
    const o = (await Observation.findOne({ where: { proposalId: id }, order: [["id", "DESC"]] }))!;
    expect(o).toMatchObject({ snrGoal: 80, exposureSeconds: null, framesPerEpoch: 4, epochsPerSemester: 2, baselineYears: 3, requiredPmPrecisionMasPerYr: 0.5, moonCategory: "grey", maxAirmass: 1.6, seeingArcsec: 1.1 });
    const edit = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), intent: "update", observationId: o.id, mode: "exposure", exposureSeconds: "300" });
    expect(edit.status).toBe(200);
    expect((await Observation.findByPk(o.id))!).toMatchObject({ snrGoal: null, exposureSeconds: 300 });
  });

  it("refuses missing and out-of-range values next to their fields", async () => {
    const res = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), framesPerEpoch: "0", maxAirmass: "4", seeingArcsec: "fine" });
    expect(res.status).toBe(400);
    expect(res.text).toContain("The number of frames per epoch must be at least 1.");
    expect(res.text).toContain("The airmass limit must be at most 3.");
    expect(res.text).toContain("The seeing must be a number.");
    const missing = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), snrGoal: "", baselineYears: "" });
    expect(missing.status).toBe(400);
    expect(missing.text).toContain("Enter the SNR goal, or switch to an exposure time.");
    expect(missing.text).toContain("A proper-motion precision needs a baseline in years.");
    const before = await Observation.count({ where: { proposalId: id } });
    expect(before).toBe(1);
  });

  it("refuses an instrument the call does not offer, a filter of another instrument, and another proposal's target", async () => {
    const elsewhere = await Telescope.create({ name: `Offsite ${Date.now()}`, siteName: "Elsewhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 });
    const foreign = await Instrument.create({ telescopeId: elsewhere.id, name: "Offsite camera", pixelScaleArcsec: 1, readNoiseE: 5, darkEPerPixelPerS: 0.01, gainEPerAdu: 1, fullWellE: 50000, readoutSeconds: 10, acquisitionSeconds: 60, astrometricFloorMas: 10, throughput: 0.3 });
    const a = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), instrumentId: foreign.id });
    expect(a.status).toBe(400);
    expect(a.text).toContain("Choose an instrument on a telescope that this call offers.");
    const options = await instrumentOptions({ callId: call.id });
    const other = options.find((o) => o.instrumentId !== option.instrumentId)!;
    const b = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), filterId: other.filters[0].id });
    expect(b.status).toBe(400);
    expect(b.text).toContain(`Choose one of the filters of ${option.instrumentName}.`);
    const otherProposal = await createProposal({ user: stranger.user, callId: call.id, title: "Someone else's", abstract: "" });
    const theirTarget = await Target.create({ proposalId: otherProposal.id, name: "Not yours", raDeg: 1, decDeg: 1, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: null, band: null, notes: null });
    const c = await post(`/proposals/${id}/observations`, pi.cookie, { ...base(), targetId: theirTarget.id });
    expect(c.status).toBe(400);
    expect(c.text).toContain("Choose one of this proposal");
    expect(await Observation.count({ where: { targetId: theirTarget.id } })).toBe(0);
  });

  it("deletes an observation", async () => {
    const o = (await Observation.findOne({ where: { proposalId: id } }))!;
    const res = await post(`/proposals/${id}/observations`, pi.cookie, { intent: "delete", observationId: o.id });
    expect(res.status).toBe(200);
    expect(await Observation.findByPk(o.id)).toBeNull();
  });
});

describe("a proposal with 50 targets", () => {
  it("loads its pages and its JSON", { timeout: 120_000 }, async () => {
    const id = (await createProposal({ user: pi.user, callId: call.id, title: "Fifty fields", abstract: "" })).id;
    const [option] = await instrumentOptions({ callId: call.id });
    const csv = ["name,ra,dec,pmra,pmdec,magnitude,band", ...Array.from({ length: 50 }, (_, i) => `Survey field ${i + 1},${(150 + i * 1.7).toFixed(3)},${(10 + (i % 10) * 2.5).toFixed(3)},1,-1,${14 + (i % 5)},V`)].join("\n");
    expect((await post(`/proposals/${id}/targets`, pi.cookie, { intent: "import", csv })).status).toBe(200);
    const targets = await Target.findAll({ where: { proposalId: id } });
    expect(targets).toHaveLength(50);
    await Observation.bulkCreate(targets.map((t) => ({ proposalId: id, targetId: t.id, instrumentId: option.instrumentId, filterId: option.filters.find((f) => f.band === "V")!.id, snrGoal: 50, exposureSeconds: null, baselineYears: null, requiredPmPrecisionMasPerYr: null, framesPerEpoch: 3, epochsPerSemester: 1 })));
    for (const path of [`/proposals/${id}/targets`, `/proposals/${id}/observations`, `/proposals/${id}`, `/proposals/${id}/feasibility`, `/api/v1/proposals/${id}`, "/proposals"]) {
      const res = await (await request()).get(path).set("Cookie", pi.cookie);
      expect(res.status, path).toBe(200);
    }
  });
});
