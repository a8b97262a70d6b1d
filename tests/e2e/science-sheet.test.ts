// An astronomer's view of the science: magnitudes per band on the targets tab, and the
// feasibility sheet's moon-time rule, epochs per semester and epoch windows on a demo proposal.
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import { describe, expect, it } from "vitest";
import { Proposal, Target } from "~/models/index.server";
import { magnitudesOf } from "~/models/Target";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { signInInBrowser } from "../helpers/sign-in-browser";

describe("science on screen", () => {
  const suite = appInBrowser();

  it("keeps a target's magnitudes in several bands, and the sheet states the moon-time rule and the epoch windows", { timeout: 150_000 }, async () => {
    const page = await suite.browser.newPage({ viewport: { width: 1400, height: 1000 } });
    const errors = watchConsole(page);
    await signInInBrowser(page, suite.server.url, "pi@kestrel-ridge.example");

    await page.goto(`${suite.server.url}/proposals/new?call=${demoCallPlan().open.semesterCode}`);
    await page.getByLabel("Title").fill("Two bands for one field star");
    await page.getByLabel("Abstract").fill("A draft to check that a target keeps its magnitudes in two bands.");
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/proposals\/\d+$/);
    const proposalId = Number(/\/proposals\/(\d+)$/.exec(page.url())![1]);
    await page.goto(`${suite.server.url}/proposals/${proposalId}/targets`);
    await page.getByLabel("Name").fill("Wrenfold Field 3");
    await page.getByLabel("RA (ICRS, J2000)").fill("11:20:00");
    await page.getByLabel("Dec (ICRS, J2000)").fill("+24:00:00");
    await page.getByLabel("V", { exact: true }).fill("16.4");
    await page.getByLabel("R", { exact: true }).fill("15.9");
    await page.getByRole("button", { name: "Add the target" }).click();
    const row = page.getByRole("row", { name: /Wrenfold Field 3/ });
    await row.waitFor();
    expect(await row.textContent()).toContain("V 16.40 · R 15.90");
    await screenshot(page, "science-01-target-magnitudes");
    const saved = (await Target.findOne({ where: { proposalId, name: "Wrenfold Field 3" } }))!;
    expect(magnitudesOf(saved)).toEqual({ V: 16.4, R: 15.9 });

    // A demo astrometry proposal on which this PI is a Co-I: 2 epochs per semester over 1.5 years.
    const demo = (await Proposal.findOne({ where: { title: "A parallax ladder for the Ossel Cluster" } }))!;
    await page.goto(`${suite.server.url}/proposals/${demo.id}/feasibility`);
    await page.getByText("Moon time is split at moonrise and moonset").first().waitFor();
    expect(await page.getByText("dark while the Moon's centre is below the horizon").count()).toBeGreaterThan(0);
    // the sheet's only observation: its card opens by itself
    await page.getByRole("columnheader", { name: "Usable nights" }).waitFor();
    const details = page.locator("details", { hasText: "Ossel Cluster core" });
    expect(await details.textContent()).toMatch(/Asked: 2 epochs per semester; each epoch may be taken within ±7 nights/);
    expect(await details.textContent()).toMatch(/\d+ in ±7/);
    expect(await details.textContent()).not.toMatch(/-0\.000/);
    await screenshot(page, "science-02-sheet-epochs");
    expect(errors).toEqual([]);
  });
});
