// The workspace's people and flow: the readiness strip on every tab (no checklist once sent),
// an invited existing account shown by name at once, the PI deleting a draft (audited), the team
// told by e-mail of a withdrawal, and per-semester requested hours.
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, Observation, OutgoingMail, Proposal, Target, User } from "~/models/index.server";
import { createProposal, updateOverview } from "~/lib/proposals/proposals.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let pi: Person;

async function post(path: string, cookie: string, values: Record<string, string | number>) {
  return (await request()).post(path).set("Cookie", cookie).type("form").send(form(values));
}
const get = async (path: string, cookie: string) => (await request()).get(path).set("Cookie", cookie);

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Workspace PI" });
});

describe("the readiness strip", () => {
  it("stands on every tab of a draft, with what is done, what is missing and the send button", async () => {
    const call = await testCall();
    const p = await createProposal({ user: pi.user, callId: call.id, title: "Draft for the strip", abstract: "" });
    for (const tab of ["", "/targets", "/observations", "/feasibility", "/science-case", "/team", "/change-log"]) {
      const page = await get(`/proposals/${p.id}${tab}`, pi.cookie);
      expect(page.status, tab).toBe(200);
      expect(page.text, tab).toContain('aria-label="Readiness"');
      expect(page.text, tab).toContain("Send the proposal");
      expect(page.text, tab).toContain("No target yet.");
      expect(page.text, tab).toContain('<span class="sr-only">Done: </span>Before the deadline');
    }
  });

  it("shows the tabs in their order, with the new names, and no Submit tab", async () => {
    const call = await testCall();
    const p = await createProposal({ user: pi.user, callId: call.id, title: "Draft for the tab order", abstract: "" });
    const page = await get(`/proposals/${p.id}`, pi.cookie);
    const nav = page.text.slice(page.text.indexOf('aria-label="Proposal sections"'));
    const labels = [...nav.slice(0, nav.indexOf("</nav>")).matchAll(/<a [^>]*>([^<]+)<\/a>/g)].map((m) => m[1]);
    expect(labels).toEqual(["Summary", "Targets", "Observations", "Feasibility sheet", "Science case", "Team", "Change log"]);
    expect((await get(`/proposals/${p.id}/history`, pi.cookie)).status).toBe(404);
    // the old Submit tab's address leads to the summary
    const old = await get(`/proposals/${p.id}/submit`, pi.cookie);
    expect(old.status).toBe(302);
    expect(old.headers.location).toBe(`/proposals/${p.id}`);
  });

  it("a submitted proposal shows its state and the withdraw button, not the checklist", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Sent programme for the strip" });
    expect((await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "submit" })).status).toBe(200);
    const page = await get(`/proposals/${proposal.id}/targets`, pi.cookie);
    const sent = (await Proposal.findByPk(proposal.id))!;
    expect(page.text).toContain(`Sent as <strong>${sent.code}</strong>`);
    expect(page.text).toContain(">Withdraw</button>");
    expect(page.text).not.toContain("Send the proposal");
    expect(page.text).not.toContain("Done: ");
    expect(page.text).not.toContain("Before submitting");
  });
});

describe("the team", () => {
  it("an invited address that already has an account shows its name and institution at once", async () => {
    const call = await testCall();
    const p = await createProposal({ user: pi.user, callId: call.id, title: "Draft with an existing Co-I", abstract: "" });
    const known = await newUser({ name: "Oriel Thandeka-Brook" });
    await known.user.update({ institution: "Marrowgate Institute" });
    const res = await post(`/proposals/${p.id}/team`, pi.cookie, { intent: "invite", email: known.email.toUpperCase() });
    expect(res.status).toBe(200);
    expect(res.text).toContain("Invitation sent to Oriel Thandeka-Brook (Marrowgate Institute)");
    const page = await get(`/proposals/${p.id}/team`, pi.cookie);
    expect(page.text).toContain("Oriel Thandeka-Brook");
    expect(page.text).toContain("Marrowgate Institute");
    // an address without an account still shows the dash until they sign in
    const stranger = `nobody-${Date.now()}@test.example`;
    await post(`/proposals/${p.id}/team`, pi.cookie, { intent: "invite", email: stranger });
    expect((await get(`/proposals/${p.id}/team`, pi.cookie)).text).toContain("invited, not signed in yet");
  });
});

describe("deleting a draft", () => {
  it("only the PI deletes a never-sent draft; it goes with everything in it, and the deletion is audited", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Draft to be deleted" });
    const coiEmail = `coi-del-${Date.now()}@test.example`;
    await post(`/proposals/${proposal.id}/team`, pi.cookie, { intent: "invite", email: coiEmail });
    await User.create({ email: coiEmail, name: "Deleting Co-I", institution: "Test Institute", lastSignInAt: null });
    const coiCookie = await sessionCookieFor(coiEmail);
    expect((await get(`/proposals/${proposal.id}`, coiCookie)).status).toBe(200);
    expect((await post(`/proposals/${proposal.id}/submit`, coiCookie, { intent: "delete" })).status).toBe(403);
    expect(await Proposal.findByPk(proposal.id)).not.toBeNull();

    const res = await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "delete" });
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe(`/proposals?deleted=${encodeURIComponent("Draft to be deleted")}`);
    expect(await Proposal.findByPk(proposal.id)).toBeNull();
    expect(await Target.count({ where: { proposalId: proposal.id } })).toBe(0);
    expect(await Observation.count({ where: { proposalId: proposal.id } })).toBe(0);
    const audit = await AuditEntry.findOne({ where: { action: "proposal.deleted", entityId: proposal.id } });
    expect(audit).toMatchObject({ actorId: pi.user.id, entityType: "proposal", proposalId: null });
    expect(audit!.details).toMatchObject({ title: "Draft to be deleted", semesterCode: call.semesterCode, team: [pi.email, coiEmail] });
    expect((await get(`/proposals/${proposal.id}`, pi.cookie)).status).toBe(404);
    expect((await get(`/proposals?deleted=${encodeURIComponent("Draft to be deleted")}`, pi.cookie)).text).toContain("was deleted.");
  });

  it("a proposal that was sent once keeps its record: deleting it is refused, saying why", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Sent once, then withdrawn" });
    await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "submit" });
    await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "withdraw" });
    const res = await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "delete" });
    expect(res.status).toBe(409);
    expect(res.text).toContain("stays on record; withdraw it instead");
    expect(await Proposal.findByPk(proposal.id)).not.toBeNull();
  });
});

describe("withdrawing", () => {
  it("tells every member of the team by e-mail, through the mail queue", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Programme withdrawn with the team told" });
    const coiEmail = `coi-wd-${Date.now()}@test.example`;
    await post(`/proposals/${proposal.id}/team`, pi.cookie, { intent: "invite", email: coiEmail });
    expect((await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "submit" })).status).toBe(200);
    const code = (await Proposal.findByPk(proposal.id))!.code!;
    expect((await post(`/proposals/${proposal.id}/submit`, pi.cookie, { intent: "withdraw" })).status).toBe(200);
    for (const to of [pi.email, coiEmail]) {
      const mail = await OutgoingMail.findOne({ where: { toAddress: to, subject: `Nightshare: ${code} "Programme withdrawn with the team told" was withdrawn` } });
      expect(mail, to).not.toBeNull();
      expect(mail!.textBody).toContain("the PI, withdrew the proposal");
      expect(mail!.textBody).toContain(`it keeps the code ${code}`);
    }
  });
});

describe("requested hours per semester", () => {
  it("My proposals shows the call's semester and the later ones apart, not their sum as one figure", async () => {
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Two-semester programme for the hours" });
    const year = Number(call.semesterCode.slice(0, 4));
    const next = call.semesterCode.endsWith("A") ? `${year}B` : `${year + 1}A`;
    const fresh = (await Proposal.findByPk(proposal.id))!;
    await updateOverview({
      user: pi.user, proposalId: proposal.id, version: fresh.version, title: fresh.title, abstract: fresh.abstract,
      scienceCategory: fresh.scienceCategory as "clusters-astrometry", isMultiSemester: true, semestersRequested: [call.semesterCode, next], isTargetOfOpportunity: false,
    });
    const api = await get(`/api/v1/proposals/${proposal.id}`, pi.cookie);
    const bySemester = api.body.feasibilitySheet.requestedHoursBySemester as { semesterCode: string; hours: number; callSemester: boolean }[];
    expect(bySemester.map((s) => s.semesterCode)).toEqual([call.semesterCode, next]);
    expect(bySemester[0].callSemester).toBe(true);
    expect(bySemester[0].hours).toBeGreaterThan(0);
    // the whole is the sum of its semesters, and more than the call's own semester asks
    expect(api.body.feasibilitySheet.requestedHours).toBeCloseTo(bySemester[0].hours + bySemester[1].hours, 1);
    expect(api.body.feasibilitySheet.requestedHoursThisSemester).toBe(bySemester[0].hours);
    const list = await get("/api/v1/proposals", pi.cookie);
    const row = list.body.proposals.find((r: { id: number }) => r.id === proposal.id);
    expect(row.requestedHoursThisSemester).toBe(bySemester[0].hours);
    expect(row.requestedHoursBySemester.map((s: { semesterCode: string }) => s.semesterCode)).toEqual([call.semesterCode, next]);
    const page = await get("/proposals", pi.cookie);
    expect(page.text).toContain("Hours, call&#x27;s semester");
    expect(page.text).toContain(`${next} ${bySemester[1].hours.toFixed(1)} h`);
  });
});
