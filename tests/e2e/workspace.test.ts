// The workspace in Chromium: the tabs in their order with the readiness strip on every one; an
// existing account invited as Co-I shown by name at once; a draft deleted after confirmation;
// a ready draft sent from the strip, which then shows its state instead of the checklist, and
// withdrawn from it. Signed in with a session cookie (sign-in itself has its own browser test).
import { describe, expect, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { OutgoingMail, Proposal, User } from "~/models/index.server";
import { createProposal } from "~/lib/proposals/proposals.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

async function signedIn(context: BrowserContext, baseUrl: string, cookie: string) {
  const [name, value] = [cookie.slice(0, cookie.indexOf("=")), cookie.slice(cookie.indexOf("=") + 1)];
  await context.addCookies([{ name, value, url: baseUrl }]);
}
const strip = (page: Page) => page.getByRole("region", { name: "Readiness" });

describe("the proposal workspace", () => {
  const suite = appInBrowser();

  it("shows the tabs in order with the readiness strip on each, names an invited account at once, and deletes a draft after confirmation", { timeout: 120_000 }, async () => {
    const pi = await newUser({ name: "Browser PI" });
    const call = await testCall();
    const draft = await createProposal({ user: pi.user, callId: call.id, title: "Browser draft with missing parts", abstract: "" });
    const colleague = await User.create({ email: `ysolde-${Date.now()}@test.example`, name: "Ysolde Marrack-Pine", institution: "Hestlow Observatory", lastSignInAt: null });
    const context = await suite.browser.newContext({ viewport: { width: 1300, height: 900 } });
    await signedIn(context, suite.server.url, pi.cookie);
    const page = await context.newPage();
    const errors = watchConsole(page);

    await page.goto(`${suite.server.url}/proposals/${draft.id}`);
    const tabs = await page.getByRole("navigation", { name: "Proposal sections" }).getByRole("link").allTextContents();
    expect(tabs).toEqual(["Summary", "Targets", "Observations", "Feasibility sheet", "Science case", "Team", "Change log"]);
    await expect.poll(() => strip(page).textContent()).toContain("still missing before it can be sent");
    expect(await strip(page).getByRole("button", { name: "Send the proposal" }).isDisabled()).toBe(true);
    await screenshot(page, "workspace-01-summary-strip");

    // the strip stays on every tab
    for (const tab of ["Targets", "Feasibility sheet", "Change log", "Team"]) {
      await page.getByRole("link", { name: tab, exact: true }).click();
      await page.waitForURL(new RegExp(`/proposals/${draft.id}(/|$)`));
      await expect.poll(() => strip(page).textContent()).toContain("No target yet.");
    }

    // an existing account invited as Co-I shows its name and institution at once
    await page.getByLabel("E-mail address").fill(colleague.email);
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText(`Invitation sent to Ysolde Marrack-Pine (Hestlow Observatory) at ${colleague.email}.`).waitFor();
    const row = page.getByRole("row").filter({ hasText: colleague.email });
    await expect.poll(() => row.textContent()).toContain("Ysolde Marrack-Pine");
    expect(await row.textContent()).toContain("Hestlow Observatory");
    expect(await row.textContent()).not.toContain("—");
    await screenshot(page, "workspace-02-team-existing-account");

    // deleting asks first: dismissed, nothing happens; accepted, the draft is gone
    page.once("dialog", (d) => void d.dismiss());
    await strip(page).getByRole("button", { name: "Delete draft" }).click();
    await page.waitForTimeout(300);
    expect(await Proposal.findByPk(draft.id)).not.toBeNull();
    page.once("dialog", (d) => {
      expect(d.message()).toContain('Delete the draft "Browser draft with missing parts"');
      void d.accept();
    });
    await strip(page).getByRole("button", { name: "Delete draft" }).click();
    await page.waitForURL(/\/proposals\?deleted=/);
    await page.getByText("The draft “Browser draft with missing parts” was deleted.").waitFor();
    expect(await Proposal.findByPk(draft.id)).toBeNull();
    expect(await page.getByRole("link", { name: "Browser draft with missing parts" }).count()).toBe(0);
    await screenshot(page, "workspace-03-deleted");
    expect(errors).toEqual([]);
    await context.close();
  });

  it("sends a ready draft from the strip, which then shows the state instead of the checklist, and withdraws it", { timeout: 120_000 }, async () => {
    const pi = await newUser({ name: "Browser PI two" });
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Browser programme ready to send" });
    const context = await suite.browser.newContext({ viewport: { width: 1300, height: 900 } });
    await signedIn(context, suite.server.url, pi.cookie);
    const page = await context.newPage();
    const errors = watchConsole(page);

    await page.goto(`${suite.server.url}/proposals/${proposal.id}/science-case`);
    await expect.poll(() => strip(page).textContent()).toContain("Ready to send");
    expect(await strip(page).textContent()).toContain("Summary complete");
    await screenshot(page, "workspace-04-ready");
    await strip(page).getByRole("button", { name: "Send the proposal" }).click();
    const sent = `${"001"}/${call.semesterCode.slice(2)}`;
    await strip(page).getByText(`Sent as ${sent}`).waitFor();
    expect(await strip(page).textContent()).not.toContain("Summary complete");
    expect(await strip(page).getByRole("button", { name: "Send the proposal" }).count()).toBe(0);
    expect(await page.getByText(sent).first().isVisible()).toBe(true);
    await screenshot(page, "workspace-05-sent");

    page.once("dialog", (d) => void d.accept());
    await strip(page).getByRole("button", { name: "Withdraw" }).click();
    await strip(page).getByText("the team has been told by e-mail").waitFor();
    await strip(page).getByRole("button", { name: "Reopen as a draft" }).waitFor();
    expect((await Proposal.findByPk(proposal.id))!.status).toBe("withdrawn");
    expect(await OutgoingMail.count({ where: { toAddress: pi.email, subject: `Nightshare: ${sent} "Browser programme ready to send" was withdrawn` } })).toBe(1);
    await screenshot(page, "workspace-06-withdrawn");
    expect(errors).toEqual([]);
    await context.close();
  });
});
