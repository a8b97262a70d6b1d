// The ranking board's uncertainty in Chromium: each rank with its 68 % interval, the probability
// of lying above the allocation line, the coin-flip band shaded and counted, the reproducibility
// estimate — and all of it changes when the office offers enough hours for every proposal.
import { describe, expect, it } from "vitest";
import { callBoard } from "~/lib/allocation/board.server";
import { Call, CallOffer, Proposal, ReviewAssignment } from "~/models/index.server";
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

describe("rank uncertainty on the ranking board", () => {
  const suite = appInBrowser();

  it("shows intervals, the probability above the line and the coin-flip band, and updates them", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Firmness Chair" });
    const reviewers = await Promise.all([0, 1, 2, 3].map((i) => newUser({ roles: ["reviewer"], name: `Firmness Reviewer ${i}` })));
    const call = await testCall();
    const ids: number[] = [];
    for (let i = 0; i < 8; i++) {
      const pi = await newUser({ name: `Firmness PI ${i}` });
      const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Firmness programme ${i}` });
      await Proposal.update({ status: "in_review", code: `0${10 + i}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
      ids.push(proposal.id);
    }
    // Invented grades (reviewer × programme): programme 0 is first for everyone, 5–7 last for
    // everyone, and the reviewers disagree about the order of 1–4.
    const merits = [
      [10, 8, 4, 7, 5, 3, 2, 1],
      [9, 4, 8, 5, 7, 2, 3, 1],
      [10, 7, 5, 8, 4, 2, 1, 3],
      [9, 5, 7, 4, 8, 3, 1, 2],
    ];
    for (const [r, row] of merits.entries()) for (const [c, overall] of row.entries()) {
      await ReviewAssignment.create({ callId: call.id, proposalId: ids[c], reviewerId: reviewers[r].user.id, status: "submitted", overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() });
    }
    // Every programme asks the same hours of one telescope's dark time: offer room for three of them.
    const before = await callBoard({ callId: call.id });
    const asked = before.proposals[0].requested.find((r) => r.semesterCode === call.semesterCode)!;
    expect(before.proposals.every((p) => p.requested.some((r) => r.telescopeId === asked.telescopeId && r.moonCategory === asked.moonCategory && Math.abs(r.hours - asked.hours) < 1e-9))).toBe(true);
    await CallOffer.update({ hoursOffered: asked.hours * 3.5 }, { where: { callId: call.id, telescopeId: asked.telescopeId, moonCategory: asked.moonCategory } });

    const context = await suite.browser.newContext({ viewport: { width: 1500, height: 1100 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByRole("heading", { name: "How firm is this ranking?" }).waitFor();
    const rankText = (i: number) => page.getByTestId(`rank-${ids[i]}`).textContent();
    const aboveText = (i: number) => page.getByTestId(`above-${ids[i]}`).textContent();

    // the unanimous first: always first, always above the line; the unanimous last: never above
    expect(await rankText(0)).toMatch(/^1 \(1–1\)/);
    expect(await aboveText(0)).toBe("100 %");
    for (const i of [5, 6, 7]) expect(await aboveText(i)).toBe("0 %");
    expect(await page.getByRole("img", { name: "68 % of draws rank it between 1 and 1" }).count()).toBe(1);

    // the disputed middle: wide intervals, and the coin-flip band counts exactly the shaded rows
    const [, low, high] = (await rankText(1))!.match(/\((\d+)–(\d+)\)/)!.map(Number);
    expect(high - low).toBeGreaterThanOrEqual(2);
    const shaded = page.locator("tbody tr.bg-amber-50");
    const badges = page.locator("tbody tr").filter({ hasText: "coin flip" });
    const bandCount = Number((await page.getByTestId("coin-flip").textContent())!.match(/Coin-flip band: (\d+)/)![1]);
    expect(bandCount).toBeGreaterThanOrEqual(2);
    expect(await shaded.count()).toBe(bandCount);
    expect(await badges.count()).toBe(bandCount);
    expect(await page.getByTestId("coin-flip").textContent()).toContain(`${(bandCount * asked.hours).toFixed(1)} h`);

    // the page's reproducibility figure is the API's
    const api = await page.request.get(`${suite.server.url}/api/v1/calls/${call.id}/reproducibility`);
    expect(api.status()).toBe(200);
    const body = await api.json();
    expect(body.draws).toBeGreaterThanOrEqual(1000);
    expect(body.expectedAgreement).toBeGreaterThan(0);
    expect(body.expectedAgreement).toBeLessThan(1);
    expect(await page.getByTestId("reproducibility").textContent()).toContain(`Reproducibility ${(body.expectedAgreement * 100).toFixed(0)} %`);
    await screenshot(page, "rank-uncertainty-01-band");

    // the office offers room for all eight: nothing is in doubt any more
    await CallOffer.update({ hoursOffered: asked.hours * 9 }, { where: { callId: call.id, telescopeId: asked.telescopeId, moonCategory: asked.moonCategory } });
    await page.reload();
    await page.getByRole("heading", { name: "How firm is this ranking?" }).waitFor();
    await expect.poll(() => page.getByTestId("coin-flip").textContent()).toMatch(/Coin-flip band: 0 proposals with 0\.0 h/);
    expect(await shaded.count()).toBe(0);
    for (const i of [0, 1, 5, 7]) expect(await aboveText(i)).toBe("100 %");
    expect(await page.getByTestId("reproducibility").textContent()).toContain("Reproducibility 100 %");
    await screenshot(page, "rank-uncertainty-02-room-for-all");
    expect(errors).toEqual([]);
  });

  it("on the demo call in review, every ranked proposal has its interval and the call its estimate", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Firmness Demo Chair" });
    const demoCall = (await Call.findOne({ where: { semesterCode: demoCallPlan().review.semesterCode } }))!;
    const graded = new Set((await ReviewAssignment.findAll({ where: { callId: demoCall.id, status: "submitted" }, attributes: ["proposalId"] })).map((a) => a.proposalId as number));
    expect(graded.size).toBeGreaterThan(3);
    const context = await suite.browser.newContext({ viewport: { width: 1500, height: 1100 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${demoCall.id}/board`);
    await page.getByRole("heading", { name: "How firm is this ranking?" }).waitFor();
    for (const id of graded) {
      expect(await page.getByTestId(`rank-${id}`).textContent()).toMatch(/^\d+ \(\d+–\d+\)/);
      expect(await page.getByTestId(`above-${id}`).textContent()).toMatch(/^\d+ %/);
    }
    const sentence = (await page.getByTestId("reproducibility").textContent())!;
    expect(sentence).toMatch(/^Reproducibility \d+ % ± \d+ %/);
    console.log(`demo call ${demoCall.semesterCode}: ${sentence}`);
    await page.getByRole("heading", { name: "How firm is this ranking?" }).scrollIntoViewIfNeeded();
    await screenshot(page, "rank-uncertainty-03-demo-call");
    expect(errors).toEqual([]);
  });
});
