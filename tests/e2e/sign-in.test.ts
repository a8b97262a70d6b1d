import { describe, expect, it } from "vitest";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { signInInBrowser } from "../helpers/sign-in-browser";

describe("signing in with Chromium", () => {
  const suite = appInBrowser();

  it("shows the home page to a visitor", async () => {
    const page = await suite.browser.newPage();
    const errors = watchConsole(page);
    await page.goto(suite.server.url);
    const heading = page.getByRole("heading", { level: 1 });
    await heading.waitFor();
    expect(await heading.textContent()).toBe("Telescope time, proposed and shared fairly");
    await page.getByRole("link", { name: "Sign in", exact: true }).waitFor();
    expect(await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Office" }).count()).toBe(0);
    await screenshot(page, "home-visitor");
    expect(errors).toEqual([]);
    await page.close();
  });

  it("refuses a malformed address at the field, keeping it", async () => {
    const page = await suite.browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/sign-in`);
    await page.getByLabel("E-mail address").fill("someone@nowhere");
    await page.getByRole("button", { name: "Send me a code" }).click();
    await page.getByText("Enter a valid e-mail address").waitFor();
    expect(await page.getByLabel("E-mail address").inputValue()).toBe("someone@nowhere");
    await screenshot(page, "sign-in-error");
    expect(errors).toEqual([]);
    await page.close();
  });

  it("signs in the demo admin with the code from the mail catcher and manages roles", async () => {
    const page = await suite.browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/sign-in`);
    await screenshot(page, "sign-in");
    await signInInBrowser(page, suite.server.url, "admin@kestrel-ridge.example");
    await screenshot(page, "home-admin");
    const nav = page.getByRole("navigation", { name: "Main" });
    await nav.getByRole("link", { name: "Office", exact: true }).waitFor();
    expect(await nav.getByRole("link", { name: "Committee" }).count()).toBe(0);

    await page.goto(`${suite.server.url}/admin/users`);
    await page.getByRole("heading", { name: "People and roles" }).waitFor();
    await page.getByLabel("Find").fill("pi4@");
    const grant = page.getByRole("button", { name: "Grant reviewer for pi4@kestrel-ridge.example" });
    await grant.click();
    await page.getByRole("button", { name: "Revoke reviewer for pi4@kestrel-ridge.example" }).waitFor();
    await page.getByLabel("Find").fill("");
    await screenshot(page, "admin-users");
    await page.getByRole("button", { name: "Revoke reviewer for pi4@kestrel-ridge.example" }).click();
    await page.getByRole("button", { name: "Grant reviewer for pi4@kestrel-ridge.example" }).waitFor();
    expect(errors).toEqual([]);
    await page.close();
  });

  it("signs in the demo reviewer and shows only the review area", async () => {
    const page = await suite.browser.newPage();
    const errors = watchConsole(page);
    await signInInBrowser(page, suite.server.url, "reviewer@kestrel-ridge.example");
    const nav = page.getByRole("navigation", { name: "Main" });
    await nav.getByRole("link", { name: "Review", exact: true }).waitFor();
    expect(await nav.getByRole("link", { name: "Office" }).count()).toBe(0);
    const response = await page.goto(`${suite.server.url}/admin/users`);
    expect(response?.status()).toBe(403);
    await page.getByText("Not for your account").waitFor();
    await screenshot(page, "forbidden");
    expect(errors.filter((e) => !e.includes("403"))).toEqual([]);
    await page.close();
  });
});
