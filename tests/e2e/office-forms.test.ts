// The office's forms in Chromium (react-hook-form with the actions' own zod schemas): a bad value
// is refused by its field before anything is sent, the typed text stays, and a good one saves.
import { describe, expect, it } from "vitest";
import { Call, CallOffer, Telescope } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { testCall } from "../integration/proposals-fixtures";

describe("the office's forms", () => {
  const suite = appInBrowser();

  it("checks the telescope and call forms in the browser and saves what is valid", { timeout: 120_000 }, async () => {
    const admin = await newUser({ roles: ["admin"], name: "Forms Browser Office" });
    const telescope = await Telescope.create({ name: `Forms browser ${Date.now()}`, siteName: "Elsewhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 });
    const call = await testCall();
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(admin.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    const posts: string[] = [];
    page.on("request", (r) => {
      if (r.method() === "POST") posts.push(r.url());
    });

    await page.goto(`${suite.server.url}/admin/telescopes/${telescope.id}`);
    const site = page.getByRole("form", { name: "Save the telescope" });
    await site.waitFor();
    await page.locator('html[data-hydrated="yes"]').waitFor({ state: "attached" });
    await site.getByLabel("Latitude").fill("91");
    await site.getByRole("button", { name: "Save the telescope" }).click();
    await site.getByText("Latitude must be from -90 to 90° (north positive).").waitFor();
    expect(posts).toEqual([]); // refused in the browser: nothing was sent
    expect(await site.getByLabel("Latitude").inputValue()).toBe("91");
    await expect.poll(() => site.getByLabel("Latitude").evaluate((el) => el === document.activeElement)).toBe(true);
    await screenshot(page, "office-forms-01-telescope-refused");
    await site.getByLabel("Latitude").fill("-12.5");
    await site.getByRole("button", { name: "Save the telescope" }).click();
    await page.getByText("Saved.").waitFor();
    expect((await Telescope.findByPk(telescope.id))!.latitudeDeg).toBe(-12.5);

    await page.goto(`${suite.server.url}/admin/calls/${call.id}`);
    const form = page.getByRole("form", { name: "Save the call" });
    await form.waitFor();
    await page.locator('html[data-hydrated="yes"]').waitFor({ state: "attached" });
    const [first] = await Telescope.findAll({ order: [["id", "ASC"]] });
    const cell = form.getByLabel(`Dark hours on ${first.name}`);
    await cell.fill("-5");
    const before = posts.length;
    await form.getByRole("button", { name: "Save the call" }).click();
    await form.getByText(/Hours offered must be from 0 to 5000/).waitFor();
    expect(posts.length).toBe(before);
    expect(await cell.inputValue()).toBe("-5");
    await cell.fill("123.5");
    await form.getByRole("button", { name: "Save the call" }).click();
    await page.waitForURL(/\/admin\/calls\?saved=/);
    const offer = await CallOffer.findOne({ where: { callId: call.id, telescopeId: first.id, moonCategory: "dark" } });
    expect(offer!.hoursOffered).toBe(123.5);
    expect((await Call.findByPk(call.id))!.semesterCode).toBe(call.semesterCode);
    expect(errors).toEqual([]);
    await context.close();
  });
});
