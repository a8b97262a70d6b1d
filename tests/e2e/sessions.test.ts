import { describe, expect, it } from "vitest";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { codeFrom, waitForMail } from "../helpers/maildev";
import { request } from "../helpers/app";
import { newUser, sessionCookieFor } from "../helpers/session";

describe("sessions in the browser", () => {
  const suite = appInBrowser();

  it("takes the code typed in lower case, and the admin signs a person out everywhere", async () => {
    const target = await newUser({ name: "Signed In Twice" });
    const second = await sessionCookieFor(target.email);
    const live = async (cookie: string) => (await (await request()).get("/api/v1/proposals").set("Cookie", cookie)).status;
    expect(await live(target.cookie)).toBe(200);

    const page = await suite.browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/sign-in`);
    await page.getByLabel("E-mail address").fill("admin@kestrel-ridge.example");
    await page.getByRole("button", { name: "Send me a code" }).click();
    await page.getByLabel("Code from the e-mail").waitFor();
    // The file starts with an empty mail catcher (appInBrowser), so this is the code just sent.
    const mail = await waitForMail("admin@kestrel-ridge.example", /sign-in code/);
    await page.getByText("upper or lower case both work").waitFor();
    await screenshot(page, "sign-in-code-step");
    await page.getByLabel("Code from the e-mail").fill(codeFrom(mail).toLowerCase());
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));

    await page.goto(`${suite.server.url}/admin/users`);
    await page.getByLabel("Find").fill(target.email);
    const row = page.getByRole("row").filter({ hasText: target.email });
    await row.getByText("2 sessions").waitFor();
    page.once("dialog", (dialog) => void dialog.accept());
    await row.getByRole("button", { name: `Sign ${target.email} out everywhere` }).click();
    await row.getByRole("status").filter({ hasText: "Signed out (2 ended)" }).waitFor();
    expect(await row.getByText("0 sessions").count()).toBe(1);
    await screenshot(page, "admin-sign-out-everywhere");
    expect(await live(target.cookie)).toBe(401);
    expect(await live(second)).toBe(401);
    expect(errors).toEqual([]);
    await page.close();
  });
});
