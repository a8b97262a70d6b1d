// The office's expected clear nights in Chromium: each month's bar follows what is typed, a bad
// value is refused by its month before anything is sent, and a save shows the values back.
import { describe, expect, it } from "vitest";
import { Telescope, TelescopeClearFraction } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";

describe("expected clear nights per month", () => {
  const suite = appInBrowser();

  it("draws the typed percentages, refuses a bad one by its month and saves", { timeout: 120_000 }, async () => {
    const admin = await newUser({ roles: ["admin"], name: "Weather Browser Office" });
    const telescope = await Telescope.create({ name: `Weather browser ${Date.now()}`, siteName: "Elsewhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 });
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 900 } });
    const [name, value] = (await sessionCookieFor(admin.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/admin/telescopes/${telescope.id}#clear-nights`);
    await page.getByRole("heading", { name: "Expected clear nights per month" }).waitFor();
    const bar = (month: number) => page.getByTestId(`clear-bar-${month}`);
    expect(await bar(1).count()).toBe(0); // not set yet
    const january = page.getByLabel("January clear nights (%)");
    await january.fill("80");
    await expect.poll(() => bar(1).evaluate((el) => (el as HTMLElement).style.height)).toBe("80%");
    await january.fill("40");
    await expect.poll(() => bar(1).evaluate((el) => (el as HTMLElement).style.height)).toBe("40%");
    await page.getByLabel("February clear nights (%)").fill("140");
    await page.getByRole("button", { name: "Save the clear nights" }).click();
    await page.getByText("February: from 0 to 100 %.").waitFor();
    expect(await TelescopeClearFraction.count({ where: { telescopeId: telescope.id } })).toBe(0);
    expect(await page.getByLabel("February clear nights (%)").inputValue()).toBe("140");
    await page.getByLabel("February clear nights (%)").fill("45");
    await page.getByRole("button", { name: "Save the clear nights" }).click();
    await page.getByText(/The expected clear nights were saved/).waitFor();
    expect((await TelescopeClearFraction.findAll({ where: { telescopeId: telescope.id }, order: [["month", "ASC"]] })).map((r) => r.clearFraction)).toEqual([0.4, 0.45]);
    expect(await page.getByLabel("January clear nights (%)").inputValue()).toBe("40");
    await page.getByRole("heading", { name: "Expected clear nights per month" }).scrollIntoViewIfNeeded();
    await screenshot(page, "office-clear-nights");
    expect(errors).toEqual([]);
    await context.close();
  });
});
