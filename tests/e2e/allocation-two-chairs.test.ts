// Two chairs on one allocation (issue 12, found by tests/security/allocation-attacks.test.ts): the
// page saves its whole sheet, so a save from a page read before someone else's save is refused
// with the message above the sheet, the typed hours kept and the other chair's hours in place.
import { describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, Proposal, ReviewAssignment, Telescope } from "~/models/index.server";
import { request } from "../helpers/app";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("the allocation page with two chairs", () => {
  const suite = appInBrowser();

  it("refuses a save over a newer one and keeps what was typed", { timeout: 120_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "First Browser Chair" });
    const other = await newUser({ roles: ["chair"], name: "Second Browser Chair" });
    const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Two Chairs Reviewer ${i}` })));
    const call = await testCall();
    const pi = await newUser({ name: "Two Chairs PI" });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Two chairs programme" });
    await Proposal.update({ status: "in_review", code: `T1-${call.semesterCode}`, serial: 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    for (const [r, rev] of reviewers.entries()) {
      await ReviewAssignment.create({ callId: call.id, proposalId: proposal.id, reviewerId: rev.user.id, status: "submitted", overall: 7 - r, science: 7, feasibility: 7, legacy: 7, submittedAt: new Date() });
    }
    const sheet = await computeFeasibilitySheet({ proposalId: proposal.id });
    const cell = sheet.totals.find((t) => t.semesterCode === call.semesterCode && t.hours > 0)!;
    const telescope = (await Telescope.findByPk(cell.telescopeId))!;

    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 900 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/allocation`);
    await page.locator('form[data-hydrated="yes"]').waitFor();

    // meanwhile the other chair saves 9 h
    const put = await (await request()).put(`/api/v1/calls/${call.id}/allocation`).set({ Cookie: other.cookie, "Content-Type": "application/json" })
      .send({ rows: [{ proposalId: proposal.id, telescopeId: cell.telescopeId, moonCategory: cell.moonCategory, semesterCode: call.semesterCode, hours: 9 }], tiers: [{ proposalId: proposal.id, tier: "queue" }] });
    expect(put.status).toBe(200);

    const hours = page.getByLabel(`T1-${call.semesterCode} ${telescope.name} ${cell.moonCategory} hours`);
    await page.getByLabel(`Tier of T1-${call.semesterCode}`).selectOption("assured");
    await hours.fill("3");
    await page.getByRole("button", { name: "Save the allocation" }).click();
    await page.getByRole("alert").filter({ hasText: "Someone saved this allocation after you opened the page" }).waitFor();
    expect(await hours.inputValue()).toBe("3");
    expect(await Allocation.sum("hours", { where: { proposalId: proposal.id } })).toBe(9);
    await screenshot(page, "allocation-two-chairs-01-refused");

    // read again: the other chair's 9 h are shown, and a save from here goes through
    await page.reload();
    await page.locator('form[data-hydrated="yes"]').waitFor();
    expect(Number(await hours.inputValue())).toBe(9);
    await hours.fill("4");
    await page.getByRole("button", { name: "Save the allocation" }).click();
    await page.getByText(/^Allocation saved:/).waitFor();
    expect(await Allocation.sum("hours", { where: { proposalId: proposal.id } })).toBe(4);
    // the refused save's own 409 is the one resource error Chromium logs
    expect(errors.filter((e) => !/status of 409/.test(e))).toEqual([]);
    await context.close();
  });
});
