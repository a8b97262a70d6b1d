// The feasibility sheet of the 500-field demo survey in Chromium: the page comes with the
// summaries and the first three cards open; a closed card fetches its details when it opens.
import { describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { Proposal } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { signInInBrowser } from "../helpers/sign-in-browser";

describe("feasibility sheet with 500 observations", () => {
  const suite = appInBrowser();

  it("opens a closed card and shows its details, as the open ones do", { timeout: 150_000 }, async () => {
    const survey = (await Proposal.findOne({ where: { title: "The Wren Survey: faint halo stars in 500 fields" } }))!;
    const sheet = await computeFeasibilitySheet({ proposalId: survey.id });
    const page = await suite.browser.newPage({ viewport: { width: 1400, height: 1000 } });
    const errors = watchConsole(page);
    await signInInBrowser(page, suite.server.url, "pi@kestrel-ridge.example");
    await page.goto(`${suite.server.url}/proposals/${survey.id}/feasibility`);
    await page.locator('html[data-hydrated="yes"]').waitFor();
    await page.locator(`details#obs-${sheet.observations[499].observationId}`).waitFor({ state: "attached" });
    expect(await page.locator("details").count()).toBe(500);
    expect(await page.locator("details[open]").count()).toBe(3);
    expect(await page.locator("details[open]").first().textContent()).toContain("Noise term");

    const o = sheet.observations[200];
    const card = page.locator(`details#obs-${o.observationId}`);
    expect(await card.textContent()).not.toContain("Exposure and signal-to-noise");
    await card.locator("summary").click();
    await card.getByText("Exposure and signal-to-noise, per frame").waitFor();
    const text = (await card.textContent())!;
    expect(text).toContain(`SNR ${o.exposure!.snr.toFixed(1)}`);
    expect(text).toContain(`${o.visibility.usableHours.toFixed(1)} h on ${o.visibility.usableNights} nights`);
    await card.getByText("Observable hours per night above the airmass limit").waitFor();
    await card.scrollIntoViewIfNeeded();
    await screenshot(page, "feasibility-cards-01-opened-card-201");
    expect(errors).toEqual([]);
  });
});
