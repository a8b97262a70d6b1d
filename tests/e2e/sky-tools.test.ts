// Sky tools in Chromium: each tool recomputes live through the JSON API. For every change the test
// asks the API itself for the same inputs and checks that the number on screen changed to that
// answer; a bad input shows its message under the field; moving an epoch shows the API's
// movedPrecision. Also: the feasibility sheet fits a 390 px wide phone screen.
import path from "node:path";
import { Op } from "sequelize";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { Observation, ProposalMember, Telescope } from "~/models/index.server";
import { screenshotDir, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { sessionCookieFor } from "../helpers/session";

// The page shows numbers with en-GB grouping and a fixed number of decimals.
const shown = (x: number, digits: number) => x.toLocaleString("en-GB", { minimumFractionDigits: digits, maximumFractionDigits: digits });

async function api(base: string, path: string, body?: unknown) {
  const res = await fetch(`${base}${path}`, body === undefined ? {} : { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
  expect(res.status, `${path} answers 200`).toBe(200);
  return (await res.json()) as Record<string, any>;
}

/** Waits until the element's text is exactly `text` (fails with the last text seen). */
async function waitForText(page: Page, selector: string, text: string) {
  const locator = page.locator(selector).first();
  let seen: string | null = null;
  for (let i = 0; i < 150; i++) {
    seen = (await locator.count()) ? ((await locator.textContent()) ?? "").trim() : null;
    if (seen === text) return;
    await page.waitForTimeout(100);
  }
  throw new Error(`${selector} never read "${text}"; it reads "${seen}"`);
}

const statusOf = (page: Page, id: string) => page.getByTestId(id).getAttribute("data-status");

/** The value of a summary tile (dt/dd) inside a tool's section. */
const tile = (section: string, label: string) => `section[aria-labelledby="${section}"] dl > div:has(> dt:text-is("${label}")) > dd`;

describe("Sky tools", () => {
  const suite = appInBrowser();

  async function openTools() {
    const page = await suite.browser.newPage({ viewport: { width: 1400, height: 1000 } });
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/sky-tools`);
    // hydrated: the charts are drawn only in the browser, after hydration
    await page.locator('section[aria-labelledby="vis-title"] .recharts-surface').first().waitFor({ timeout: 20_000 });
    await page.locator('section[aria-labelledby="ep-title"] .recharts-surface').first().waitFor({ timeout: 20_000 });
    return { page, errors };
  }

  it("starts at the observatory's telescopes, keeps a custom site, and recomputes visibility to the API's answer", { timeout: 120_000 }, async () => {
    const { page, errors } = await openTools();
    const telescopes = await Telescope.findAll({ order: [["name", "ASC"]] });
    expect(telescopes.length).toBeGreaterThan(0);
    const picker = page.locator("#vis-telescope");
    expect(await picker.inputValue()).toBe(String(telescopes[0].id));
    const options = await picker.locator("option").allTextContents();
    expect(options).toEqual([...telescopes.map((t) => `${t.name} · ${t.siteName}`), "Custom site (coordinates below)"]);
    expect(await page.locator("#vis-lat").inputValue()).toBe(String(telescopes[0].latitudeDeg));
    expect(await statusOf(page, "vis-status")).toBe("current");

    const query = { telescope: String(telescopes[0].id), ra: "05:36:48", dec: "+18:30:00", from: "2027-08-01", nights: "183", night: "2027-11-15" };
    const before = await page.locator(tile("vis-title", "Observable hours")).textContent();
    const atDefault = await api(suite.server.url, `/api/v1/visibility?${new URLSearchParams({ ...query, maxAirmass: "1.6" })}`);
    expect(before).toBe(shown(atDefault.summary.observableHours, 1));

    await page.locator("#vis-maxAirmass").fill("1.2");
    const tighter = await api(suite.server.url, `/api/v1/visibility?${new URLSearchParams({ ...query, maxAirmass: "1.2" })}`);
    expect(shown(tighter.summary.observableHours, 1)).not.toBe(before);
    await waitForText(page, tile("vis-title", "Observable hours"), shown(tighter.summary.observableHours, 1));
    expect(await page.locator(tile("vis-title", "in dark time")).textContent()).toBe(shown(tighter.summary.byMoonCategory.dark, 1));
    expect(await statusOf(page, "vis-status")).toBe("current");
    expect(await page.getByTestId("vis-status").textContent()).toBe("Up to date");

    // a custom site: free coordinates, sent as lat/lon
    await picker.selectOption("custom");
    await page.locator("#vis-lat").fill("44.05");
    await page.locator("#vis-lon").fill("10.6");
    await page.locator("#vis-timeZone").fill("Europe/Rome");
    await page.locator("#vis-elevation").fill("1200");
    const custom = { ra: query.ra, dec: query.dec, from: query.from, nights: query.nights, night: query.night, lat: "44.05", lon: "10.6", elevation: "1200", timeZone: "Europe/Rome", maxAirmass: "1.2" };
    const south = await api(suite.server.url, `/api/v1/visibility?${new URLSearchParams(custom)}`);
    expect(south.site.latitudeDeg).toBe(44.05);
    await waitForText(page, tile("vis-title", "Observable hours"), shown(south.summary.observableHours, 1));
    expect(await page.locator(tile("vis-title", "Observable hours")).textContent()).not.toBe(shown(tighter.summary.observableHours, 1));
    await page.locator('section[aria-labelledby="vis-title"]').screenshot({ path: path.join(screenshotDir, "sky-tools-01-visibility-custom-site.png") });

    // a refusal: in words, under its field; the last good numbers stay
    await page.locator("#vis-maxAirmass").fill("12");
    await page.locator("#vis-maxAirmass-error").waitFor({ timeout: 15_000 });
    expect(await page.locator("#vis-maxAirmass-error").textContent()).toBe("Max air mass must be at most 10");
    expect(await page.locator("#vis-maxAirmass").getAttribute("aria-invalid")).toBe("true");
    expect(await statusOf(page, "vis-status")).toBe("refused");
    expect(await page.locator(tile("vis-title", "Observable hours")).textContent()).toBe(shown(south.summary.observableHours, 1));
    await page.locator("#vis-dec").fill("+95");
    await waitForText(page, "#vis-dec-error", "Dec must be in the range −90 ≤ Dec ≤ +90 degrees");
    await page.locator('section[aria-labelledby="vis-title"]').screenshot({ path: path.join(screenshotDir, "sky-tools-02-visibility-refused.png") });
    expect(errors.filter((e) => !e.includes("status of 400 (Bad Request)"))).toEqual([]); // the 400s are the refusals asked for above
  });

  it("recomputes the exposure to the API's answer, and says why it cannot", { timeout: 120_000 }, async () => {
    const { page, errors } = await openTools();
    const telescopeId = await page.locator("#exp-telescopeId").inputValue();
    const body = {
      telescopeId, band: "V", magnitude: "20.5", snr: "50", airmass: "1.2", seeingArcsec: "1.1", moonCategory: "dark",
      instrument: { throughput: "0.55", pixelScaleArcsec: "0.35", readNoiseE: "4", darkEPerPixelPerS: "0.001", fullWellE: "90000" },
    };
    const atDefault = await api(suite.server.url, "/api/v1/exposure", body);
    expect(await page.getByTestId("exp-exposure").textContent()).toBe(`${shown(atDefault.exposureSeconds, 1)} s`);

    await page.locator("#exp-magnitude").fill("19");
    const brighter = await api(suite.server.url, "/api/v1/exposure", { ...body, magnitude: "19" });
    expect(brighter.exposureSeconds).toBeLessThan(atDefault.exposureSeconds);
    await waitForText(page, '[data-testid="exp-exposure"]', `${shown(brighter.exposureSeconds, 1)} s`);
    expect(await statusOf(page, "exp-status")).toBe("current");

    await page.locator("#exp-airmass").fill("0.5");
    await waitForText(page, "#exp-airmass-error", "Air mass must be at least 1");
    expect(await statusOf(page, "exp-status")).toBe("refused");
    expect(await page.getByTestId("exp-exposure").textContent()).toBe(`${shown(brighter.exposureSeconds, 1)} s`);
    await page.locator("#exp-airmass").fill("1.2");
    await page.locator('[data-testid="exp-status"][data-status="current"]').waitFor({ timeout: 15_000 });
    expect(await page.locator("#exp-airmass-error").count()).toBe(0);
    await page.locator('section[aria-labelledby="exp-title"]').screenshot({ path: path.join(screenshotDir, "sky-tools-03-exposure.png") });
    expect(errors.filter((e) => !e.includes("status of 400 (Bad Request)"))).toEqual([]); // the 400s are the refusals asked for above
  });

  it("recomputes the epoch plan to the API's answer, and a moved epoch to its movedPrecision", { timeout: 180_000 }, async () => {
    const { page, errors } = await openTools();
    const telescopeId = await page.locator("#ep-telescopeId").inputValue();
    const body = {
      telescopeId, target: { ra: "05:36:48", dec: "+18:30:00" }, firstDate: "2027-08-01", baselineYears: "3",
      requiredTangentialVelocityKmS: "5", distancePc: "1500", perEpochPrecisionMas: "2", maxAirmass: "1.6", secondsPerEpoch: "1500",
    };
    const parallax = tile("ep-title", "σ(ϖ)");
    const before = await page.locator(parallax).textContent();
    await page.locator("#ep-perEpochPrecisionMas").fill("2");
    const finer = await api(suite.server.url, "/api/v1/epoch-plan", body);
    expect(`${shown(finer.precision.parallaxPrecisionMas, 3)} mas`).not.toBe(before);
    await waitForText(page, parallax, `${shown(finer.precision.parallaxPrecisionMas, 3)} mas`);
    expect(await statusOf(page, "ep-status")).toBe("current");

    // move the second epoch by about two months
    const dates = (finer.epochs as { date: string }[]).map((e) => e.date);
    const moved = dates.slice();
    const d = new Date(`${dates[1]}T00:00:00Z`);
    d.setUTCDate(d.getUTCDate() + 61);
    moved[1] = d.toISOString().slice(0, 10);
    await page.getByLabel("Epoch 2 date").fill(moved[1]);
    const answer = await api(suite.server.url, "/api/v1/epoch-plan", { ...body, movedEpochs: moved });
    const m = answer.movedPrecision;
    const text = `σ(μα*) ${shown(m.properMotionPrecisionMasPerYr.ra, 3)}, σ(μδ) ${shown(m.properMotionPrecisionMasPerYr.dec, 3)} mas/yr, σ(ϖ) ${shown(m.parallaxPrecisionMas, 3)} mas`;
    await page.getByTestId("ep-moved").waitFor({ timeout: 15_000 });
    await page.waitForFunction((t) => document.querySelector('[data-testid="ep-moved"]')?.textContent?.includes(t), text, { timeout: 15_000 });
    expect(shown(m.parallaxPrecisionMas, 3)).not.toBe(shown(finer.precision.parallaxPrecisionMas, 3));
    expect(await statusOf(page, "ep-status")).toBe("current");

    // a month that does not exist: the refusal under that epoch's field
    await page.getByLabel("Epoch 3 date").fill("2028-13-01");
    await waitForText(page, "#ep-moved-2-error", "Epoch 3 must be a date or an ISO time");
    expect(await statusOf(page, "ep-status")).toBe("refused");
    await page.locator('section[aria-labelledby="ep-title"]').screenshot({ path: path.join(screenshotDir, "sky-tools-04-epochs.png") });
    expect(errors.filter((e) => !e.includes("status of 400 (Bad Request)"))).toEqual([]); // the 400s are the refusals asked for above
  });

  it("the Sky tools and the feasibility sheet fit a 390 px wide screen", { timeout: 120_000 }, async () => {
    const email = "pi@kestrel-ridge.example";
    const memberships = await ProposalMember.findAll({ where: { email } });
    let proposalId = 0;
    let most = 0;
    for (const m of memberships) {
      // the demo PI's astrometric proposal with the most observations (the 500-field survey has no epochs)
      const n = await Observation.count({ where: { proposalId: m.proposalId, baselineYears: { [Op.ne]: null } } });
      if (n > most) [proposalId, most] = [m.proposalId, n];
    }
    expect(most).toBeGreaterThan(0);
    const context = await suite.browser.newContext({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 1 });
    const [name, value] = (await sessionCookieFor(email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    await page.goto(`${suite.server.url}/proposals/${proposalId}/feasibility`);
    await page.getByRole("heading", { name: /Feasibility sheet for/ }).waitFor();
    await page.locator(".recharts-surface").first().waitFor({ timeout: 20_000 });
    const widths = await page.evaluate(() => ({ page: document.documentElement.scrollWidth, body: document.body.scrollWidth, view: window.innerWidth }));
    // what a phone shows: the top of the sheet, and an observation's epochs table and chart
    await page.screenshot({ path: path.join(screenshotDir, "sky-tools-05-feasibility-390px-top.png") });
    await page.getByRole("heading", { name: /Astrometric epochs/ }).first().scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(screenshotDir, "sky-tools-06-feasibility-390px-epochs.png") });

    await page.goto(`${suite.server.url}/sky-tools`);
    await page.locator('section[aria-labelledby="ep-title"] .recharts-surface').first().waitFor({ timeout: 20_000 });
    const tools = await page.evaluate(() => ({ page: document.documentElement.scrollWidth, view: window.innerWidth }));
    await page.screenshot({ path: path.join(screenshotDir, "sky-tools-07-sky-tools-390px.png") });
    expect(tools.page).toBeLessThanOrEqual(tools.view);
    expect(widths.page).toBeLessThanOrEqual(widths.view);
    expect(widths.body).toBeLessThanOrEqual(widths.view);
    await context.close();
  });
});
