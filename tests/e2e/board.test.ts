// The ranking board in Chromium: the chair sees the normalised order, sorts by raw mean, filters
// by code, and reads the oversubscription row for a telescope.
import { describe, expect, it } from "vitest";
import { Proposal, ReviewAssignment } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("the ranking board", () => {
  const suite = appInBrowser();

  it("ranks by normalised score, re-sorts by raw mean and filters", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Board Browser Chair" });
    const reviewers = await Promise.all([0, 1, 2].map((i) => newUser({ roles: ["reviewer"], name: `Board Browser Reviewer ${i}` })));
    const call = await testCall();
    const ids: number[] = [];
    for (let i = 0; i < 3; i++) {
      const pi = await newUser({ name: `Board Browser PI ${i}` });
      const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Board browser programme ${i}` });
      await Proposal.update({ status: "in_review", code: `00${i + 1}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
      ids.push(proposal.id);
    }
    // Raw means order programme 1 (5.67) > 0 (4.67) > 2 (4.00); the per-reviewer z-scores order
    // 0 (+0.433) > 1 (+0.216) > 2 (−0.650): worked with Python's statistics.pstdev, not this code.
    const merits = [
      [2, 10, 7],
      [6, 2, 1],
      [6, 5, 4],
    ];
    for (const [r, row] of merits.entries()) for (const [c, overall] of row.entries()) {
      await ReviewAssignment.create({ callId: call.id, proposalId: ids[c], reviewerId: reviewers[r].user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
    }
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByRole("heading", { name: `Ranking board for ${call.semesterCode}` }).waitFor();
    const proposalsSection = page.locator("section", { has: page.getByRole("heading", { name: "Proposals" }) });
    const titles = () => proposalsSection.locator("tbody tr td:nth-child(4)").allTextContents();
    await expect.poll(titles).toEqual(["Board browser programme 0", "Board browser programme 1", "Board browser programme 2"]);
    await screenshot(page, "board-01-ranked");

    await page.getByRole("button", { name: /^Raw mean/ }).click();
    await expect.poll(() => page.locator("th", { has: page.getByRole("button", { name: /^Raw mean/ }) }).getAttribute("aria-sort")).toBe("descending");
    await expect.poll(titles).toEqual(["Board browser programme 1", "Board browser programme 0", "Board browser programme 2"]);
    await screenshot(page, "board-02-by-raw-mean");

    await page.getByPlaceholder("code, title, category, institution").fill(`003/`);
    await expect.poll(titles).toEqual(["Board browser programme 2"]);
    await page.getByPlaceholder("code, title, category, institution").fill("no such programme");
    await expect.poll(() => page.getByText("No proposal on the board matches.").count()).toBe(1);
    expect(errors).toEqual([]);
  });
});
