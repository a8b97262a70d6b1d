// Decisions in Chromium: the office checks a template (an unknown placeholder is named at the
// field), sends a locked call's decisions and watches the progress reach 100 %; the PI then reads
// the decision with the anonymised comments and finds the letter to download.
import { describe, expect, it } from "vitest";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { sessionCookieFor } from "../helpers/session";
import { decidedCall, REVIEWERS } from "../integration/decisions-fixtures";

describe("sending decisions", () => {
  const suite = appInBrowser();

  it("the office sends a call's decisions and the PI reads theirs", { timeout: 180_000 }, async () => {
    const f = await decidedCall();
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const asUser = async (email: string) => {
      await context.clearCookies();
      const [name, value] = (await sessionCookieFor(email)).split("=");
      await context.addCookies([{ name, value, url: suite.server.url }]);
    };
    await asUser(f.admin.email);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/admin/calls/${f.call.id}/decisions`);
    await page.getByRole("heading", { name: `Decisions · ${f.call.semesterCode}` }).waitFor();
    const rows = page.getByRole("table", { name: "Decisions" }).locator("tbody tr[data-proposal]");
    await expect.poll(() => rows.count()).toBe(3);
    await expect.poll(() => rows.locator("td:nth-child(3)").allTextContents()).toEqual(["Accepted", "Waitlisted", "Declined"]);
    await expect.poll(() => page.getByTestId("letter-state").allTextContents()).toEqual(["not sent", "not sent", "not sent"]);

    // the accepted template: an unknown placeholder is named under the field, what was typed stays
    const accepted = page.getByRole("form", { name: "Accepted letter template" });
    const body = accepted.getByLabel("Letter");
    await body.fill("Dear [[pi_name]], your reviewer was [[reviewer_name]].");
    await accepted.getByText("Unknown placeholder [[reviewer_name]]").waitFor();
    expect(await body.inputValue()).toBe("Dear [[pi_name]], your reviewer was [[reviewer_name]].");
    await screenshot(page, "decisions-01-template-refused");
    await body.fill("Dear [[pi_name]],\n\n[[code]] is accepted in the [[tier]] tier.\n\n[[hours]]\n\nCharges: [[charges]]\n\n[[comments]]");
    await accepted.getByText(`Preview for 001/${f.call.semesterCode.slice(2)}`).waitFor();
    await accepted.getByText("is accepted in the queue tier.").waitFor();
    await accepted.getByRole("button", { name: "Save the template" }).click();
    await accepted.getByText("The accepted template is saved").waitFor();

    // the letter preview
    await rows.first().getByRole("button", { name: "Letter" }).click();
    await page.getByText(`001/${f.call.semesterCode.slice(2)} is accepted in the queue tier.`).first().waitFor();

    await page.getByRole("button", { name: "Send all 3 letters" }).click();
    await page.getByText("3 letters queued (4 e-mails to PIs and Co-Is).").waitFor();
    await expect.poll(() => page.getByTestId("batch-percent").textContent(), { timeout: 60_000 }).toBe("100 %");
    expect(await page.getByRole("progressbar").getAttribute("aria-valuenow")).toBe("100");
    await expect.poll(() => page.getByTestId("batch-counts").textContent()).toBe("Queued 0Sent 4Failed 0Retrying 0");
    await expect.poll(() => page.getByTestId("letter-state").allTextContents(), { timeout: 20_000 }).toEqual(["sent to 2", "sent to 1", "sent to 1"]);
    expect(await page.getByRole("button", { name: "All letters sent" }).isDisabled()).toBe(true);
    await screenshot(page, "decisions-02-sent");

    // the PI
    await asUser(f.proposals[0].pi.email);
    await page.goto(`${suite.server.url}/proposals/${f.proposals[0].proposal.id}/decision`);
    await expect.poll(() => page.getByTestId("decision-outcome").textContent()).toBe("Accepted");
    const hours = page.getByRole("table", { name: "Allocated hours" }).locator("tbody tr");
    await expect.poll(() => hours.locator("td").allTextContents()).toEqual([f.telescope.name, "dark", f.call.semesterCode, "10.5"]);
    for (const c of f.proposals[0].comments) await page.getByText(c).first().waitFor();
    const text = await page.locator("main").textContent();
    for (const r of REVIEWERS) {
      expect(text).not.toContain(r.name);
      expect(text).not.toContain(r.institution);
    }
    expect(await page.getByRole("link", { name: "Download the letter (PDF)" }).getAttribute("href")).toBe(`/proposals/${f.proposals[0].proposal.id}/decision-letter.pdf`);
    await screenshot(page, "decisions-03-pi-reads");
    expect(errors).toEqual([]);
    await context.close();
  });
});
