// Dual-anonymous review in Chromium: the chair of such a call sees "hidden" for the PI's institution
// on the ranking board and reveals the teams once every grade is in; the board then shows it.
// The PI of an open dual-anonymous call sees the warnings on the science-case tab.
import { describe, expect, it } from "vitest";
import { storeScienceCase } from "~/lib/proposals/science-case.server";
import { Call, CallReview, Proposal, ReviewAssignment, ReviewPanelMember, User } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";
import { PDFDocument, StandardFonts } from "pdf-lib";

async function signedIn(suite: ReturnType<typeof appInBrowser>, email: string) {
  const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const [name, value] = (await sessionCookieFor(email)).split("=");
  await context.addCookies([{ name, value, url: suite.server.url }]);
  return context.newPage();
}

describe("dual-anonymous review in the browser", () => {
  const suite = appInBrowser();

  it("the chair reveals the teams once the grade is in; the board's PI institution changes from hidden to the name", { timeout: 120_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Reveal Chair" });
    const reviewer = await newUser({ roles: ["reviewer"], name: "Reveal Reviewer" });
    const pi = await newUser({ name: "Wren Halloway" });
    await User.update({ institution: "Cobblemoor Institute" }, { where: { id: pi.user.id } });
    const call = await testCall();
    await call.update({ teamVisibility: "dual_anonymous" });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Reveal programme of ${call.semesterCode}` });
    await Proposal.update({ status: "in_review", code: `001/${call.semesterCode.slice(2)}`, serial: 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
    await CallReview.create({ callId: call.id, reviewDeadlineAt: new Date(Date.now() + 86_400_000), perProposal: 1, startedAt: new Date(), committedAt: new Date() });
    await ReviewPanelMember.create({ callId: call.id, reviewerId: reviewer.user.id });
    await ReviewAssignment.create({ callId: call.id, proposalId: proposal.id, reviewerId: reviewer.user.id, committedAt: new Date(), status: "submitted", science: 8, feasibility: 7, legacy: 6, overall: 7.5, commentToPi: "fine", submittedAt: new Date() });

    const page = await signedIn(suite, chair.email);
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByTestId("teams-hidden").waitFor();
    const row = page.getByRole("row", { name: new RegExp(`Reveal programme of ${call.semesterCode}`) });
    await expect.poll(() => row.getByRole("cell", { name: "hidden", exact: true }).count()).toBe(1);
    expect(await page.getByText("Cobblemoor Institute").count()).toBe(0);
    await screenshot(page, "anonymity-01-board-hidden");

    await page.goto(`${suite.server.url}/committee/${call.id}`);
    await page.getByText("1 of 1 assigned reviews submitted").waitFor();
    await screenshot(page, "anonymity-02-before-reveal");
    await page.getByRole("button", { name: "Reveal the teams" }).click();
    await page.getByText("The teams are revealed to the chair").waitFor();
    await page.getByText(/^Revealed to the chair on/).waitFor();
    await screenshot(page, "anonymity-03-revealed");

    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await expect.poll(() => row.getByRole("cell", { name: "Cobblemoor Institute" }).count()).toBe(1);
    expect(await page.getByTestId("teams-hidden").count()).toBe(0);
    expect(errors).toEqual([]);
  });

  it("the PI sees where the science case names the team, page by page", { timeout: 60_000 }, async () => {
    const pi = await newUser({ name: "Perrin Ashgrove" });
    await User.update({ institution: "Thornwick Observatory" }, { where: { id: pi.user.id } });
    const call = await testCall();
    await call.update({ teamVisibility: "dual_anonymous" });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Warnings programme" });
    const doc = await PDFDocument.create();
    const font = await doc.embedFont(StandardFonts.Helvetica);
    doc.addPage([595, 842]).drawText("Science goals of the programme.", { x: 72, y: 770, size: 12, font });
    doc.addPage([595, 842]).drawText("In our previous work (Ashgrove et al. 2026) at Thornwick Observatory ...", { x: 72, y: 770, size: 12, font });
    await storeScienceCase({ proposalId: proposal.id, user: pi.user, file: { name: "case.pdf", type: "application/pdf", bytes: await doc.save() } });

    const page = await signedIn(suite, pi.email);
    await page.goto(`${suite.server.url}/proposals/${proposal.id}/science-case`);
    const list = page.getByTestId("anonymity-warnings");
    await list.waitFor();
    await expect.poll(() => list.getByRole("listitem").count()).toBe(3);
    expect(await list.getByRole("listitem").allInnerTexts()).toEqual([
      expect.stringMatching(/^Page 2: a team member's name, “Ashgrove”/),
      expect.stringMatching(/^Page 2: a team institution, “Thornwick Observatory”/),
      expect.stringMatching(/^Page 2: a phrase about the team's own work, “our previous work”/),
    ]);
    await expect.poll(() => page.getByTestId("anonymity-summary").innerText()).toMatch(/may name the team on page 2 \(3 findings\)/);
    await screenshot(page, "anonymity-04-pi-warnings");
  });

  it("the office makes a call dual-anonymous on the call form", { timeout: 60_000 }, async () => {
    const admin = await newUser({ roles: ["admin"], name: "Anonymity Office" });
    const call = await testCall();
    const page = await signedIn(suite, admin.email);
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/admin/calls/${call.id}`);
    await page.waitForSelector('html[data-hydrated="yes"]');
    const named = page.getByRole("radio", { name: /^Named: reviewers see the team/ });
    const anonymous = page.getByRole("radio", { name: /^Dual-anonymous: reviewers never see the team/ });
    expect(await named.isChecked()).toBe(true);
    expect(await anonymous.isChecked()).toBe(false);
    await anonymous.check();
    await page.getByRole("group", { name: "Reviewers see the team" }).screenshot({ path: "tests/screenshots/anonymity-05-call-form-option.png" });
    await page.getByRole("button", { name: "Save the call" }).click();
    await page.waitForURL(/\/admin\/calls\?saved=/);
    expect((await Call.findByPk(call.id))!.teamVisibility).toBe("dual_anonymous");
    await page.goto(`${suite.server.url}/admin/calls/${call.id}`);
    expect(await page.getByRole("radio", { name: /^Dual-anonymous/ }).isChecked()).toBe(true);
    await screenshot(page, "anonymity-06-call-form");
    expect(errors).toEqual([]);
  });
});
