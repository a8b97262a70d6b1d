// What the security headers do in a real browser: the app runs under its CSP, cannot be framed,
// and a form posted from another site is refused.
import { describe, expect, it } from "vitest";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";

describe("security headers in Chromium", () => {
  const suite = appInBrowser();

  it("the app hydrates under its CSP, and a script without the nonce does not run", async () => {
    const page = await suite.browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/sign-in`);
    // Client-side validation needs the hydrated app: its message appears without a round trip.
    await page.getByLabel("E-mail address").fill("someone@nowhere");
    await page.getByRole("button", { name: "Send me a code" }).click();
    await page.getByText("Enter a valid e-mail address").waitFor();
    expect(errors).toEqual([]);
    // An injected inline script without the nonce is blocked by the policy.
    await page.evaluate(() => {
      const s = document.createElement("script");
      s.textContent = "document.body.dataset.injected = 'ran'";
      document.body.appendChild(s);
    });
    expect(await page.evaluate(() => document.body.dataset.injected ?? "blocked")).toBe("blocked");
    expect(errors.some((e) => /Content Security Policy/.test(e))).toBe(true);
    await page.close();
  });

  it("refuses to be framed by another page", async () => {
    const page = await suite.browser.newPage();
    await page.setContent(`<h1>Another site</h1><iframe id="f" src="${suite.server.url}/sign-in" width="600" height="300"></iframe>`);
    const frame = await (await page.waitForSelector("#f")).contentFrame();
    await frame!.waitForLoadState("load");
    // Chromium puts its own error page in a frame the policy refuses.
    expect(frame!.url()).toMatch(/^chrome-error:/);
    expect(await frame!.getByLabel("E-mail address").count()).toBe(0);
    await screenshot(page, "framing-refused");
    await page.close();
  });

  it("shows a refusal when another site posts the sign-in form", async () => {
    const page = await suite.browser.newPage();
    await page.setContent(
      `<form method="post" action="${suite.server.url}/sign-in"><input name="intent" value="send"><input name="email" value="admin@kestrel-ridge.example"><button>Go</button></form>`,
    );
    await page.getByRole("button", { name: "Go" }).click();
    await page.getByText("This request came from another site").waitFor();
    expect(page.url()).toBe(`${suite.server.url}/sign-in`);
    await screenshot(page, "cross-site-form-refused");
    await page.close();
  });

  it("shows the 413 page, inside the app's layout, when a form sends more than the limit", async () => {
    const page = await suite.browser.newPage();
    await page.goto(`${suite.server.url}/sign-in`);
    // A plain same-origin form post (a document request) carrying 2 MB.
    await page.evaluate(() => {
      const f = document.createElement("form");
      f.method = "post";
      f.action = "/sign-in";
      const t = document.createElement("textarea");
      t.name = "email";
      t.value = "x".repeat(2 * 1024 * 1024);
      f.append(t);
      document.body.append(f);
      f.submit();
    });
    await page.getByRole("heading", { name: "Too much at once" }).waitFor();
    expect(await page.getByText("Error 413").count()).toBe(1);
    expect(await page.getByRole("link", { name: "Back to the start page" }).count()).toBe(1);
    await screenshot(page, "body-too-large");
    await page.close();
  });
});
