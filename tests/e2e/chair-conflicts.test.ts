// The chair's conflicts in Chromium: the conflicted chair's board says plainly that the grades of
// their team's proposal (and of one they declared a conflict on) are withheld, offers no move for
// them and says why; the allocation page shows their hours with the controls disabled and the
// reason beside them, and still saves the rest; the other chair's board shows the grades.
import { describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Allocation, Telescope } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { conflictedCall, DECLARED_REASON } from "../integration/chair-conflicts-fixtures";

const WITHHELD = "withheld: you have a conflict on this proposal";

describe("a chair's conflicts on the board and the allocation page", () => {
  const suite = appInBrowser();

  it("withholds the conflicted proposals' grades and controls from that chair, not from the other", { timeout: 150_000 }, async () => {
    const f = await conflictedCall("COI Browser");
    const [p0, p1, p2] = f.proposals;
    const cell = (await computeFeasibilitySheet({ proposalId: p0.id })).totals.find((t) => t.semesterCode === f.call.semesterCode && t.hours > 0)!;
    const telescope = (await Telescope.findByPk(cell.telescopeId))!;
    const signedIn = async (cookie: string) => {
      const context = await suite.browser.newContext({ viewport: { width: 1500, height: 1000 } });
      const [name, value] = cookie.split("=");
      await context.addCookies([{ name, value, url: suite.server.url }]);
      return context;
    };

    const mine = await signedIn(f.chair.cookie);
    const page = await mine.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${f.call.id}/board`);
    await page.locator('html[data-hydrated="yes"]').waitFor();
    expect(await page.getByTestId(`withheld-${p1.id}`).textContent()).toBe(WITHHELD);
    expect(await page.getByTestId(`normalised-withheld-${p2.id}`).textContent()).toBe(WITHHELD);
    expect(await page.getByTestId(`normalised-${p1.id}`).count()).toBe(0);
    expect(await page.getByTestId(`normalised-${p0.id}`).textContent()).toMatch(/^\d+\.\d\d/);
    expect(await page.locator(`#moveProposal option[value="${p1.id}"]`).isDisabled()).toBe(true);
    expect(await page.locator(`#moveProposal option[value="${p0.id}"]`).isDisabled()).toBe(false);
    const why = await page.getByTestId("move-conflicts").textContent();
    expect(why).toContain(`${p1.code} (you are a Co-I)`);
    expect(why).toContain(`${p2.code} (you declared a conflict: ${DECLARED_REASON})`);
    expect(await page.getByRole("button", { name: "Fill by rank" }).isEnabled()).toBe(true);
    await screenshot(page, "chair-conflicts-01-board-withheld");

    await page.goto(`${suite.server.url}/committee/${f.call.id}/allocation`);
    await page.locator('form[data-hydrated="yes"]').waitFor();
    expect(await page.getByLabel(`Tier of ${p1.code}`).isDisabled()).toBe(true);
    expect(await page.getByLabel(`Waitlist ${p1.code}`).isDisabled()).toBe(true);
    expect(await page.getByLabel(`${p1.code} ${telescope.name} ${cell.moonCategory} hours`).isDisabled()).toBe(true);
    expect(await page.getByTestId(`conflict-${p1.id}`).textContent()).toContain("You have a conflict on this proposal (you are a Co-I)");
    expect(await page.getByLabel(`Tier of ${p0.code}`).isDisabled()).toBe(false);
    // the rest of the sheet still saves, the conflicted rows as they were
    await page.getByLabel(`Tier of ${p0.code}`).selectOption("queue");
    await page.getByLabel(`${p0.code} ${telescope.name} ${cell.moonCategory} hours`).fill("2.5");
    await page.getByRole("button", { name: "Save the allocation" }).click();
    await page.getByText(/^Allocation saved:/).waitFor();
    expect(await Allocation.sum("hours", { where: { proposalId: p0.id, semesterCode: f.call.semesterCode, telescopeId: cell.telescopeId, moonCategory: cell.moonCategory } })).toBe(2.5);
    expect(await Allocation.count({ where: { proposalId: [p1.id, p2.id, f.proposals[3].id] } })).toBe(0);
    await screenshot(page, "chair-conflicts-02-allocation-disabled");
    expect(errors).toEqual([]);
    await mine.close();

    const theirs = await signedIn(f.other.cookie);
    const other = await theirs.newPage();
    await other.goto(`${suite.server.url}/committee/${f.call.id}/board`);
    await other.locator('html[data-hydrated="yes"]').waitFor();
    expect(await other.getByTestId(`normalised-${p1.id}`).textContent()).toMatch(/^\d+\.\d\d/);
    expect(await other.getByTestId(`withheld-${p1.id}`).count()).toBe(0);
    expect(await other.getByText(WITHHELD).count()).toBe(0);
    expect(await other.locator(`#moveProposal option[value="${p1.id}"]`).isDisabled()).toBe(false);
    await screenshot(other, "chair-conflicts-03-other-chair");
    await theirs.close();
  });
});
