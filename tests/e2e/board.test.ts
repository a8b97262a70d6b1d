// The ranking board in Chromium: the chair sees the normalised order, sorts by raw mean, filters
// by code, moves a proposal with a reason, fills by rank, locks and unlocks with a reason.
import { describe, expect, it } from "vitest";
import { Proposal, ReviewAssignment } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("the ranking board", () => {
  const suite = appInBrowser();

  it("ranks by normalised score, sorts, filters, moves, fills, locks and unlocks", { timeout: 180_000 }, async () => {
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
    const titles = () => proposalsSection.locator("tbody tr td:nth-child(5)").allTextContents();
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
    await page.getByPlaceholder("code, title, category, institution").fill("");

    // a move without a reason: the message sits by the field and the choice is kept
    await page.getByLabel("Move proposal").selectOption({ label: `003/${call.semesterCode.slice(2)} Board browser programme 2` });
    await page.getByLabel("To position (empty = computed)").fill("1");
    await page.getByRole("button", { name: "Move", exact: true }).click();
    await page.getByText("Give a reason of at least 3 characters.").waitFor();
    expect(await page.getByLabel("Move proposal").inputValue()).toBe(String(ids[2]));
    expect(await page.getByLabel("To position (empty = computed)").inputValue()).toBe("1");
    await page.getByLabel("Reason", { exact: true }).fill("Only semester its target is observable");
    await page.getByRole("button", { name: "Move", exact: true }).click();
    await page.getByText("Moved to position 1.").waitFor();
    // after a move the form starts empty for the next one
    await expect.poll(() => page.getByLabel("Reason", { exact: true }).inputValue()).toBe("");
    expect(await page.getByLabel("Move proposal").inputValue()).toBe("");
    await page.getByRole("button", { name: /^Rank/ }).click();
    const chairRanks = () => proposalsSection.locator("tbody tr td:nth-child(3)").allTextContents();
    await expect.poll(async () => (await chairRanks()).filter((t) => t.startsWith("1 ")).length).toBe(1);

    await page.getByRole("button", { name: "Fill by rank" }).click();
    await page.getByText(/^Filled by rank: 3 assured/).waitFor();
    const tiers = () => proposalsSection.locator("tbody tr td:nth-child(15)").allTextContents();
    await expect.poll(tiers).toEqual(["assured", "assured", "assured"]);
    await screenshot(page, "board-03-filled");

    await page.getByRole("button", { name: "Lock the allocation" }).click();
    await page.getByText(/^Allocation locked: 3 accepted, 0 waitlisted, 0 declined/).waitFor();
    expect(await Proposal.count({ where: { id: ids, status: "accepted" } })).toBe(3);
    await page.getByRole("button", { name: "Unlock" }).click();
    await page.getByText("Give a reason of at least 3 characters.").waitFor();
    await page.getByLabel("Reason for unlocking").fill("One grade arrived late");
    await page.getByRole("button", { name: "Unlock" }).click();
    await page.getByText("Allocation unlocked; the proposals are in review again.").waitFor();
    expect(await Proposal.count({ where: { id: ids, status: "in_review" } })).toBe(3);
    // exactly the two refusals asked for above (the move and the unlock without a reason)
    expect(errors.filter((e) => e.includes("status of 400 (Bad Request)"))).toHaveLength(2);
    expect(errors.filter((e) => !e.includes("status of 400 (Bad Request)"))).toEqual([]);
  });
});
