// The semester check on the ranking board in Chromium: a bad number stays in its field with the
// message under it, Run shows the progress bar, then the table with a completion percentage per
// programme; moving a proposal makes the shown run stale.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Proposal, ReviewAssignment, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("the semester check on the ranking board", () => {
  const suite = appInBrowser();
  // the office's clear fractions (the demo's seeded ones) are put back after this file
  let saved: { telescopeId: number; month: number; clearFraction: number }[] = [];
  beforeAll(async () => {
    saved = (await TelescopeClearFraction.findAll()).map((f) => ({ telescopeId: f.telescopeId as number, month: f.month, clearFraction: f.clearFraction }));
  });
  afterAll(async () => {
    await TelescopeClearFraction.destroy({ where: {} });
    if (saved.length) await TelescopeClearFraction.bulkCreate(saved);
  });

  it("runs with a progress bar, shows completion per programme and goes stale after a move", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Check Browser Chair" });
    const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Check Browser Reviewer ${i}` })));
    const call = await testCall();
    const ids: number[] = [];
    for (let i = 0; i < 3; i++) {
      const pi = await newUser({ name: `Check Browser PI ${i}` });
      const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Check browser programme ${i}` });
      await Proposal.update({ status: "in_review", code: `00${i + 1}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
      ids.push(proposal.id);
    }
    for (const [r, reviewer] of reviewers.entries()) for (const [c, id] of ids.entries()) {
      const overall = [8, 6, 4][c] + r;
      await ReviewAssignment.create({ callId: call.id, proposalId: id, reviewerId: reviewer.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
    }
    await TelescopeClearFraction.destroy({ where: {} });
    for (const t of await Telescope.findAll()) for (let month = 1; month <= 12; month++) await TelescopeClearFraction.create({ telescopeId: t.id, month, clearFraction: 0.7 });

    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByRole("heading", { name: "Semester check" }).waitFor();
    await page.getByText("No check has run for this call yet.").waitFor();
    await page.getByRole("button", { name: "Fill by rank" }).click();
    await page.getByText(/^Filled by rank: 3 assured/).waitFor();

    // a refused number: the message under its field, the typed text kept
    await page.getByLabel("Realisations (1–1000)").fill("0");
    await page.getByRole("button", { name: "Run the semester check" }).click();
    await page.locator("#checkRealisations-error").getByText("must be at least 1").waitFor();
    expect(await page.getByLabel("Realisations (1–1000)").inputValue()).toBe("0");

    await page.getByLabel("Realisations (1–1000)").fill("1000");
    await page.getByLabel("Seed").fill("2027");
    await page.getByRole("button", { name: "Run the semester check" }).click();
    const bar = page.getByRole("progressbar", { name: "Semester check progress" });
    await bar.waitFor({ state: "visible" });
    await screenshot(page, "semester-check-01-running");
    const table = page.getByRole("table", { name: "Semester check per programme" });
    await table.waitFor({ timeout: 60_000 });
    await bar.waitFor({ state: "detached" });
    const completions = await table.getByTestId("completion").allTextContents();
    expect(completions).toHaveLength(3);
    for (const c of completions) expect(c).toMatch(/^\d{1,3} %$/);
    // one 1-epoch visit of a target up all semester, 70 % of nights clear: it always finds a night
    expect(completions).toEqual(["100 %", "100 %", "100 %"]);
    await page.getByText("Run of ").waitFor();
    // the board's own table carries each programme's completion beside its allocation
    const proposalsSection = page.locator("section", { has: page.getByRole("heading", { name: "Proposals" }) });
    await expect.poll(() => proposalsSection.locator('tbody [data-testid^="completion-"]').filter({ hasText: /^100 %$/ }).count()).toBe(3);
    await expect.poll(() => page.getByText(/1000 realisations, seed 2027/).count()).toBe(1);
    const telescopes = page.getByRole("table", { name: "Semester check per telescope" });
    expect(await telescopes.locator("tbody tr").count()).toBeGreaterThan(0);
    await page.getByRole("heading", { name: "Semester check" }).scrollIntoViewIfNeeded();
    await screenshot(page, "semester-check-02-result");

    // a move changes the board's order, an input of the check: the run shown is stale
    expect(await page.getByText(/^Stale — inputs changed/).count()).toBe(0);
    await page.getByLabel("Move proposal").selectOption({ label: `003/${call.semesterCode.slice(2)} Check browser programme 2` });
    await page.getByLabel("To position (empty = computed)").fill("1");
    await page.getByLabel("Reason", { exact: true }).fill("Its field sets early this semester");
    await page.getByRole("button", { name: "Move", exact: true }).click();
    await page.getByText("Moved to position 1.").waitFor();
    await page.getByText(/^Stale — inputs changed since this run/).waitFor();
    await page.getByRole("heading", { name: "Semester check" }).scrollIntoViewIfNeeded();
    await screenshot(page, "semester-check-03-stale");
    expect(errors.filter((e) => e.includes("status of 400 (Bad Request)"))).toHaveLength(1);
    expect(errors.filter((e) => !e.includes("status of 400 (Bad Request)"))).toEqual([]);
  });
});
