// The allocation page in Chromium: the running totals and warnings follow what the chair types,
// a tier is required for hours (message by the field, typed hours kept), a save survives a reload,
// and the board's fill by rank keeps the hours saved by hand unless the chair ticks to refill them.
import { describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, BoardEntry, Proposal, ReviewAssignment, Telescope } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("the allocation page", () => {
  const suite = appInBrowser();

  it("recomputes running totals and warnings as hours and tiers change, and saves", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Sheet Browser Chair" });
    const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Sheet Browser Reviewer ${i}` })));
    const call = await testCall(); // 300 h offered per telescope × moon category
    const ids: number[] = [];
    for (let i = 0; i < 2; i++) {
      const pi = await newUser({ name: `Sheet Browser PI ${i}` });
      const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Sheet browser programme ${i}` });
      await Proposal.update({ status: "in_review", code: `S${i + 1}-${call.semesterCode}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
      ids.push(proposal.id);
    }
    for (const [r, rev] of reviewers.entries()) for (const [c, id] of ids.entries()) {
      const overall = 8 - 2 * c - r; // programme 0 first
      await ReviewAssignment.create({ callId: call.id, proposalId: id, reviewerId: rev.user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
    }
    const sheet = await computeFeasibilitySheet({ proposalId: ids[0] });
    const cell = sheet.totals.find((t) => t.semesterCode === call.semesterCode && t.hours > 0)!;
    const telescope = (await Telescope.findByPk(cell.telescopeId))!;
    const requested = cell.hours;

    const context = await suite.browser.newContext({ viewport: { width: 1500, height: 1000 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/allocation`);
    await page.getByRole("heading", { name: `Allocation for ${call.semesterCode}` }).waitFor();
    await page.locator('form[data-hydrated="yes"]').waitFor();
    const hoursBox = (i: number) => page.getByLabel(`S${i + 1}-${call.semesterCode} ${telescope.name} ${cell.moonCategory} hours`);
    const running = (i: number) => page.getByTestId(`running-${ids[i]}-${cell.telescopeId}-${cell.moonCategory}`);
    const total = page.getByTestId(`total-${cell.telescopeId}-${cell.moonCategory}`);
    // before anything is saved the hours are the requested ones (both programmes are the same fixture)
    expect(Number(await hoursBox(0).inputValue())).toBeCloseTo(requested, 6);
    await expect.poll(() => running(1).textContent()).toBe(`Σ ${(2 * requested).toFixed(1)}`);

    // 250 assured h of 300 offered: over the 80 % share (240 h); the totals follow at once
    await page.getByLabel(`Tier of S1-${call.semesterCode}`).selectOption("assured");
    await hoursBox(0).fill("250");
    await expect.poll(() => running(0).textContent()).toBe("Σ 250.0");
    await expect.poll(() => running(1).textContent()).toBe(`Σ ${(250 + requested).toFixed(1)}`);
    await expect.poll(() => page.getByTestId("allocation-warnings").textContent()).toContain("assured 250.0 h is more than 80 % of offered (240.0 h)");
    // a second programme of 150 h: 400 h > 390 h (offered + 30 %), and the offered line falls after it
    await hoursBox(1).fill("150");
    await expect.poll(() => page.getByTestId("allocation-warnings").textContent()).toContain("all tiers 400.0 h are more than offered + 30 % (390.0 h)");
    await expect.poll(() => page.getByTestId("offered-line").count()).toBe(1);
    await expect.poll(() => total.textContent()).toContain("400.0 / 300.0");
    await screenshot(page, "allocation-01-warnings");

    // hours without a tier: refused by the field, the typed hours kept
    await page.getByRole("button", { name: "Save the allocation" }).click();
    await page.getByText("Give a tier to a proposal with hours.").waitFor();
    expect(await hoursBox(1).inputValue()).toBe("150");
    expect(await Allocation.count({ where: { callId: call.id } })).toBe(0);

    // within limits: the warnings go
    await hoursBox(0).fill("200");
    await hoursBox(1).fill("40");
    await page.getByLabel(`Tier of S2-${call.semesterCode}`).selectOption("queue");
    await expect.poll(() => page.getByTestId("allocation-warnings").textContent()).toContain("Within limits");
    await expect.poll(() => page.getByTestId("offered-line").count()).toBe(0);
    await page.getByRole("button", { name: "Save the allocation" }).click();
    await page.getByText(/^Allocation saved:/).waitFor();
    const saved = await Allocation.findAll({ where: { callId: call.id, telescopeId: cell.telescopeId, moonCategory: cell.moonCategory }, order: [["proposalId", "ASC"]] });
    expect(saved.map((a) => a.hours)).toEqual([200, 40]);
    expect((await BoardEntry.findAll({ where: { callId: call.id }, order: [["proposalId", "ASC"]] })).map((e) => e.tier)).toEqual(["assured", "queue"]);
    await page.reload();
    await page.getByRole("heading", { name: `Allocation for ${call.semesterCode}` }).waitFor();
    await page.locator('form[data-hydrated="yes"]').waitFor();
    expect(await hoursBox(0).inputValue()).toBe("200");
    expect(await page.getByLabel(`Tier of S2-${call.semesterCode}`).inputValue()).toBe("queue");
    await screenshot(page, "allocation-02-saved");
    await page.getByTestId(`by-hand-${ids[0]}`).waitFor();

    // fill by rank on the board keeps what the chair set by hand: 200 h assured, 40 h queue
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByTestId("replace-hand-set").waitFor();
    await page.getByRole("button", { name: "Fill by rank" }).click();
    await page.getByText(/2 proposals whose hours you set by hand kept as they are\.$/).waitFor();
    await page.goto(`${suite.server.url}/committee/${call.id}/allocation`);
    await page.locator('form[data-hydrated="yes"]').waitFor();
    expect(await hoursBox(0).inputValue()).toBe("200");
    expect(await hoursBox(1).inputValue()).toBe("40");
    expect(await page.getByLabel(`Tier of S2-${call.semesterCode}`).inputValue()).toBe("queue");
    await screenshot(page, "allocation-03-kept-after-fill");

    // ticked, the fill replaces them with the requested hours
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByLabel(/also refill the 2 proposals whose hours you set by hand/).check();
    await page.getByTestId("replace-hand-set").scrollIntoViewIfNeeded();
    await screenshot(page, "allocation-04-refill-ticked");
    await page.getByRole("button", { name: "Fill by rank" }).click();
    await page.getByText(/^Filled by rank: 2 assured/).waitFor();
    await page.goto(`${suite.server.url}/committee/${call.id}/allocation`);
    await page.locator('form[data-hydrated="yes"]').waitFor();
    expect(Number(await hoursBox(0).inputValue())).toBeCloseTo(requested, 6);
    expect(await page.getByTestId(`by-hand-${ids[0]}`).count()).toBe(0);
    expect(errors).toEqual([]);
    await context.close();
  });
});
