// RA pressure on the ranking board in Chromium: the chair sees the chart and table for the first
// telescope offered, with its clear fractions, and switching telescope changes what is shown
// (heading, requested total from the proposals' feasibility sheets, clear fractions, requested bars).
import { afterAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Call, Proposal, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import { screenshot, screenshotDir, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("RA pressure on the ranking board", () => {
  const suite = appInBrowser();
  let saved: { telescopeId: number; month: number; clearFraction: number }[] = [];
  let touched: number[] = [];
  afterAll(async () => {
    await TelescopeClearFraction.destroy({ where: { telescopeId: touched } });
    await TelescopeClearFraction.bulkCreate(saved);
  });

  it("shows requested against available per RA bin and follows the telescope chosen", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "RA Browser Chair" });
    const call = await testCall();
    const ids: number[] = [];
    let used = 0;
    for (let i = 0; i < 2; i++) {
      const pi = await newUser({ name: `RA Browser PI ${i}` });
      const { proposal, option } = await readyProposal({ user: pi.user, callId: call.id, title: `RA browser programme ${i}` });
      used = option.telescopeId;
      await Proposal.update({ status: "in_review", code: `00${i + 1}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
      ids.push(proposal.id);
    }
    const telescopes = await Telescope.findAll({ order: [["id", "ASC"]] });
    const first = telescopes[0];
    const other = telescopes.find((t) => t.id !== used)!;
    expect(first.id).toBe(used); // the default view is the telescope the programmes ask for
    touched = telescopes.map((t) => t.id);
    saved = (await TelescopeClearFraction.findAll({ where: { telescopeId: touched } })).map((f) => ({ telescopeId: f.telescopeId as number, month: f.month, clearFraction: f.clearFraction }));
    await TelescopeClearFraction.destroy({ where: { telescopeId: touched } });
    await TelescopeClearFraction.create({ telescopeId: first.id, month: 2, clearFraction: 0.55 });
    let requested = 0;
    for (const id of ids) for (const t of (await computeFeasibilitySheet({ proposalId: id })).totals) if (t.telescopeId === first.id && t.semesterCode === call.semesterCode) requested += t.hours;
    expect(requested).toBeGreaterThan(0);

    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    const section = page.locator("section", { has: page.locator("#ra-pressure-heading") });
    await page.getByRole("heading", { name: `RA pressure at ${first.name}` }).waitFor();
    expect(await section.getByTestId("ra-totals").textContent()).toContain(`Requested ${requested.toFixed(1)} h`);
    expect(await section.getByTestId("ra-clear-fractions").textContent()).toBe("Clear fraction used: Feb 0.55 · Mar not set (counted as 1) · Apr not set (counted as 1) · May not set (counted as 1) · Jun not set (counted as 1) · Jul not set (counted as 1)");
    const requestedBars = () => section.locator("svg rect title").filter({ hasText: "requested" }).count();
    expect(await requestedBars()).toBeGreaterThan(0);
    expect(await section.getByTestId("ra-table").locator("tbody tr").count()).toBe(24);
    await section.scrollIntoViewIfNeeded();
    await screenshot(page, "ra-pressure-01-first-telescope");

    await section.getByRole("link", { name: other.name }).click();
    await page.getByRole("heading", { name: `RA pressure at ${other.name}` }).waitFor();
    expect(new URL(page.url()).searchParams.get("telescopeId")).toBe(String(other.id));
    expect(await section.getByTestId("ra-totals").textContent()).toContain("Requested 0.0 h");
    expect(await section.getByTestId("ra-clear-fractions").textContent()).toContain("Feb not set (counted as 1)");
    expect(await requestedBars()).toBe(0);
    expect(await section.getByRole("link", { name: other.name }).getAttribute("aria-current")).toBe("page");
    await screenshot(page, "ra-pressure-02-other-telescope");
    expect(errors).toEqual([]);
  });

  it("on the demo call in review, the requested total is what the oversubscription table shows for that telescope", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "RA Demo Chair" });
    const demoCall = await Call.findOne({ where: { semesterCode: demoCallPlan().review.semesterCode } });
    expect(demoCall).not.toBeNull();
    expect(await Proposal.count({ where: { callId: demoCall!.id, status: "in_review" } })).toBeGreaterThan(3);
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${demoCall!.id}/board`);
    const heading = page.locator("#ra-pressure-heading");
    await heading.waitFor();
    const telescopeName = (await heading.textContent())!.replace("RA pressure at ", "");
    const rows = page.locator("section", { has: page.getByRole("heading", { name: "Oversubscription" }) }).locator("tbody tr", { hasText: telescopeName });
    expect(await rows.count()).toBe(3);
    const shown = (await rows.locator("td:nth-child(3)").allTextContents()).map(Number);
    const section = page.locator("section", { has: heading });
    const total = Number((await section.getByTestId("ra-totals").locator("strong").first().textContent())!.replace(" h", ""));
    const unplaced = await section.getByText("Not in the bins").count();
    expect(unplaced).toBe(0);
    expect(total).toBeGreaterThan(1);
    expect(Math.abs(total - shown.reduce((a, b) => a + b, 0))).toBeLessThan(0.2); // three cells rounded to 0.1 h
    await section.scrollIntoViewIfNeeded();
    await screenshot(page, "ra-pressure-03-demo-call");
    // the other telescope's chart, close up
    const other = (await section.getByRole("navigation", { name: "Telescope for RA pressure" }).getByRole("link").allTextContents()).find((t) => t !== telescopeName)!;
    await section.getByRole("link", { name: other }).click();
    await page.getByRole("heading", { name: `RA pressure at ${other}` }).waitFor();
    await section.locator("svg").screenshot({ path: `${screenshotDir}/ra-pressure-04-demo-chart.png` });
    expect(await section.locator("svg rect title").filter({ hasText: "requested" }).count()).toBeGreaterThan(3);
    expect(errors).toEqual([]);
  });
});
