import type { Page } from "playwright-core";
import { codeFrom, mailIds, waitForMail } from "./maildev";

/** Signs in as a person would: address, then the code read from the mail catcher. */
export async function signInInBrowser(page: Page, baseUrl: string, email: string) {
  const older = await mailIds();
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail address").fill(email);
  await page.getByRole("button", { name: "Send me a code" }).click();
  await page.getByLabel("Code from the e-mail").waitFor();
  const mail = await waitForMail(email, /sign-in code/, 20_000, { exclude: older });
  await page.getByLabel("Code from the e-mail").fill(codeFrom(mail));
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}
