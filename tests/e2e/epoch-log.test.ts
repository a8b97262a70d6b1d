// The epoch log in Chromium: an observer records two epochs on the office's page (a refused one
// first: the message under its field, what was typed kept), and the PI's Epoch progress shows the
// precision so far tighten. Screenshots in tests/screenshots/epoch-log-*.png.
import { describe, expect, it } from "vitest";
import { owedBeforeCall, recordEpoch } from "~/lib/epochs/epochs.server";
import { getSessionUserFor } from "../helpers/epoch-user";
import { Call, Instrument, Observation, PlannedEpoch, Proposal, ProposalMember, Telescope } from "~/models/index.server";
import { screenshot, screenshotDir, watchConsole } from "../helpers/browser";
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { epochProgramme, testCall } from "../integration/proposals-fixtures";

describe("the epoch log", () => {
  const suite = appInBrowser();

  it("the office records two epochs and the PI sees the precision so far change", { timeout: 180_000 }, async () => {
    const observer = await newUser({ roles: ["observer"], name: "Browser Observer" });
    const pi = await newUser({ name: "Browser Epoch PI" });
    const call = await testCall();
    const made = await epochProgramme({ user: pi.user, callId: call.id, title: "Browser epoch programme" });
    const proposalId = made.proposal.id;
    await Proposal.update({ status: "accepted", code: `B01/${call.semesterCode.slice(2)}`, serial: 902, submittedAt: new Date() }, { where: { id: proposalId } });
    const obs = (await Observation.findOne({ where: { proposalId, baselineYears: 2 } }))!;
    const telescope = (await Telescope.findByPk((await Instrument.findByPk(obs.instrumentId))!.telescopeId))!;
    await PlannedEpoch.bulkCreate(["2027-03-10", "2027-05-20"].map((date) => ({ observationId: obs.id, date, semesterCode: call.semesterCode, status: "planned" as const, observedAt: null })));
    // three epochs already in the log (invented), so the fit is determined before the browser adds two
    const office = await getSessionUserFor(observer.email);
    for (const [observedAt, precisionMas] of [["2025-01-10T03:00Z", 3], ["2025-04-16T22:30Z", 2.5], ["2025-10-05T23:45Z", 4]] as const) {
      await recordEpoch({ user: office, proposalId, input: { observedAt, telescopeId: telescope.id, frames: 5, precisionMas }, source: "api" });
    }

    const piContext = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [pn, pv] = (await sessionCookieFor(pi.email)).split("=");
    await piContext.addCookies([{ name: pn, value: pv, url: suite.server.url }]);
    const piPage = await piContext.newPage();
    const piErrors = watchConsole(piPage);
    await piPage.goto(`${suite.server.url}/proposals/${proposalId}/epochs`);
    await piPage.getByRole("heading", { name: /Epoch progress/ }).waitFor();
    const pmOf = async () => Number.parseFloat((await piPage.getByTestId("reached-pmra").textContent()) ?? "NaN");
    const before = await pmOf();
    expect(before).toBeGreaterThan(0);
    expect(await piPage.getByTestId("epoch-counts").textContent()).toContain("3 executed, 0 lost, 2 still planned");
    // an accepted astrometry programme has the tab (drafts keep the seven parts: tests/e2e/workspace.test.ts)
    expect(await piPage.getByRole("navigation", { name: "Proposal sections" }).getByRole("link").allTextContents()).toEqual(["Summary", "Targets", "Observations", "Feasibility sheet", "Science case", "Team", "Epoch progress", "Change log", "Charges"]);
    await screenshot(piPage, "epoch-log-01-pi-before");

    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(observer.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/admin/epochs`);
    await page.getByRole("link", { name: `B01/${call.semesterCode.slice(2)}` }).click();
    await page.getByRole("heading", { name: "Record an epoch" }).waitFor();
    await page.locator('form[data-hydrated="yes"]').waitFor();

    // an executed epoch without a precision or an SNR: refused under the precision field, the time kept
    await page.getByLabel("Observed at (UTC)").fill("2026-01-12T02:20");
    await page.getByLabel("Frames").fill("5");
    await page.getByRole("button", { name: "Record the epoch" }).click();
    await expect.poll(() => page.locator("#e-precisionMas-error").textContent()).toContain("Positional precision is required for an executed epoch, unless SNR and FWHM are given");
    expect(await page.getByLabel("Observed at (UTC)").inputValue()).toBe("2026-01-12T02:20");
    await screenshot(page, "epoch-log-02-office-refused");

    await page.getByLabel("Positional precision (mas)").fill("2.8");
    await page.getByRole("button", { name: "Record the epoch" }).click();
    await expect.poll(() => page.getByRole("status").first().textContent()).toContain("Epoch recorded: 2.80 mas (given)");
    // the second from FWHM and SNR
    await page.locator('form[data-hydrated="yes"]').waitFor();
    await page.getByLabel("Observed at (UTC)").fill("2026-04-18T01:05");
    await page.getByLabel("Frames").fill("5");
    await page.getByLabel("Measured FWHM (″)").fill("1.1");
    await page.getByLabel("SNR per frame reached").fill("140");
    await page.getByRole("button", { name: "Record the epoch" }).click();
    await expect.poll(() => page.getByRole("status").first().textContent()).toMatch(/Epoch recorded: \d+\.\d\d mas \(derived\)/);
    await screenshot(page, "epoch-log-03-office-recorded");

    await piPage.reload();
    await piPage.getByRole("heading", { name: /Epoch progress/ }).waitFor();
    expect(await piPage.getByTestId("epoch-counts").textContent()).toContain("5 executed, 0 lost");
    const after = await pmOf();
    // two more epochs only add information: σ(μα*) falls
    expect(after).toBeLessThan(before);
    // the page shows what the API answers
    const api = await piPage.evaluate(async (id) => (await fetch(`/api/v1/proposals/${id}/epochs`)).json(), proposalId);
    expect(after).toBeCloseTo(api.reachedSoFar.properMotionPrecisionMasPerYr.ra, 3);
    expect(await piPage.locator('[aria-label="Epoch calendar"] [data-kind="executed"]').count()).toBe(5);
    await piPage.getByRole("heading", { name: "On the parallax-factor curve" }).scrollIntoViewIfNeeded();
    await piPage.locator(".recharts-surface").first().waitFor();
    await screenshot(piPage, "epoch-log-04-pi-after");
    expect(errors).toEqual([]);
    expect(piErrors).toEqual([]);
    await context.close();
    await piContext.close();
  });

  it("the next call's chair sees what earlier programmes still owe beside the commitments", { timeout: 120_000 }, async () => {
    const review = (await Call.findOne({ where: { semesterCode: demoCallPlan().review.semesterCode } }))!;
    const owed = await owedBeforeCall({ callId: review.id });
    expect(owed.length).toBeGreaterThan(0);
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor("chair@kestrel-ridge.example")).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    await page.goto(`${suite.server.url}/committee/${review.id}/board`);
    const table = page.getByRole("table", { name: "Owed epochs" });
    await table.waitFor();
    expect(await table.locator("tbody tr").count()).toBe(owed.length);
    expect(await page.getByTestId(`owed-${owed[0].proposalId}`).textContent()).toBe(owed[0].hoursOwed.toFixed(2));
    await table.scrollIntoViewIfNeeded();
    await page.screenshot({ path: `${screenshotDir}/epoch-log-05-board-owed.png` });
    await context.close();

    // that programme's PI sees the same lost epochs on Epoch progress (the demo's seeded log)
    const piMember = (await ProposalMember.findOne({ where: { proposalId: owed[0].proposalId, role: "pi" } }))!;
    const piContext = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [pn, pv] = (await sessionCookieFor(piMember.email)).split("=");
    await piContext.addCookies([{ name: pn, value: pv, url: suite.server.url }]);
    const piPage = await piContext.newPage();
    const errors = watchConsole(piPage);
    await piPage.goto(`${suite.server.url}/proposals/${owed[0].proposalId}/epochs`);
    expect(await piPage.getByTestId("epoch-counts").textContent()).toContain(`${owed[0].executedEpochs} executed, ${owed[0].lostEpochs} lost`);
    expect(await piPage.locator('[aria-label="Epoch calendar"] [data-kind="lost"]').count()).toBe(owed[0].lostEpochs);
    await piPage.locator(".recharts-surface").first().waitFor();
    await screenshot(piPage, "epoch-log-06-demo-pi");
    expect(errors).toEqual([]);
    await piContext.close();
  });

  it("the night log can be read from a file into the box, then imported with a report per row", { timeout: 120_000 }, async () => {
    const observer = await newUser({ roles: ["observer"], name: "Browser Night Log" });
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(observer.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/admin/epochs`);
    await page.getByRole("heading", { name: "Import a night log (CSV)" }).waitFor();
    await page.locator('html[data-hydrated="yes"]').waitFor();
    // an invented programme code that no proposal has: the row is refused and kept in the box
    const csv = "proposal,observed_at,telescope,frames\nZZ99/99Z,2026-01-12T02:20Z,Nowhere scope,5\n";
    expect(await page.locator("#night-log").inputValue()).toBe("");
    await page.locator("#night-log-file").setInputFiles({ name: "night.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
    await expect.poll(() => page.locator("#night-log").inputValue()).toBe(csv);
    expect(await page.getByText("Read night.csv; check it in the box, then import.").count()).toBe(1);
    await page.getByRole("button", { name: "Import the night log" }).click();
    await expect.poll(() => page.getByRole("status").first().textContent()).toContain("1 refused");
    expect(await page.locator("#night-log").inputValue()).toContain("ZZ99/99Z");
    await screenshot(page, "epoch-log-07-night-log-file");
    expect(errors).toEqual([]);
    await context.close();
  });
});
