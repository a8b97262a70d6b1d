// The PI's journey in Chromium: sign in with the code from the mail catcher, start a proposal,
// invite a Co-I, import targets from CSV, fill an observation while the live numbers update,
// upload a science case, submit, and find the receipt with its PDF in the mail catcher.
import { writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { testEnv } from "../helpers/env";
import { waitForMail } from "../helpers/maildev";
import { signInInBrowser } from "../helpers/sign-in-browser";
import { pdfWithPages } from "../integration/proposals-fixtures";
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";

describe("a PI's proposal, from sign-in to receipt", () => {
  const suite = appInBrowser();

  it("signs in, drafts, invites, imports, observes, uploads, submits and gets the receipt", { timeout: 180_000 }, async () => {
    const page = await suite.browser.newPage({ viewport: { width: 1400, height: 1000 } });
    const errors = watchConsole(page);
    const pi = "pi@kestrel-ridge.example";
    await signInInBrowser(page, suite.server.url, pi);

    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "My proposals" }).click();
    await page.getByRole("heading", { name: "My proposals" }).waitFor();
    await screenshot(page, "journey-01-my-proposals");

    const openCall = demoCallPlan().open.semesterCode;
    await page.goto(`${suite.server.url}/proposals/new?call=${openCall}`);
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.getByText("Give the proposal a title of at least 5 characters.").waitFor();
    await page.getByLabel("Title").fill("Tangential motions in the Brackfell cluster field");
    await page.getByLabel("Abstract").fill("We follow members of an invented open cluster over three years to separate them from field stars by their proper motions.");
    await page.getByText("21 / 250 words").waitFor();
    await screenshot(page, "journey-02-new-proposal");
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/proposals\/\d+$/);
    const base = page.url();

    await page.getByLabel("Science category").selectOption("clusters-astrometry");
    await page.getByRole("button", { name: "Save the summary" }).click();
    await page.getByText(/^Saved at/).waitFor();
    await screenshot(page, "journey-03-overview");

    await page.getByRole("link", { name: "Team", exact: true }).click();
    await page.getByLabel("E-mail address").fill("colleague@brackwater.example");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText("Invitation sent to colleague@brackwater.example.").waitFor();
    await page.getByRole("cell", { name: "colleague@brackwater.example" }).first().waitFor();
    await screenshot(page, "journey-04-team");
    await waitForMail("colleague@brackwater.example", /invited as Co-I/);

    await page.getByRole("link", { name: "Targets", exact: true }).click();
    await page.getByLabel("CSV text").fill(
      ["name,ra,dec,pmra,pmdec,magnitude,band", "Brackfell A,13:05:20.0,+22:10:00,-4.2,1.1,15.5,V", "Brackfell B,13:06:02.5,+22:14:30,,,16.8,V", "Brackfell C,13:07:00,+95:00:00,,,16,V"].join("\n"),
    );
    await page.getByRole("button", { name: "Import", exact: true }).click();
    await page.getByText("2 accepted and saved").waitFor();
    await page.getByText("must be in the range −90 ≤ Dec ≤ +90 degrees").waitFor();
    expect(await page.getByLabel("CSV text").inputValue()).toContain("Brackfell C");
    await screenshot(page, "journey-05-targets-import");
    // the refused row is fixed in the box and imported again
    await page.getByLabel("CSV text").fill("name,ra,dec,pmra,pmdec,magnitude,band\nBrackfell C,13:07:00,+25:00:00,,,16,V");
    await page.getByRole("button", { name: "Import", exact: true }).click();
    await page.getByText("1 accepted and saved").waitFor();
    await page.getByRole("cell", { name: "Brackfell C", exact: true }).first().waitFor();

    await page.getByRole("link", { name: "Observations", exact: true }).click();
    const exposure = page.getByTestId("live-exposure");
    await exposure.waitFor();
    const first = await exposure.textContent();
    await page.getByLabel("SNR goal per frame").fill("250");
    await page.waitForFunction((before) => document.querySelector('[data-testid="live-exposure"]')?.textContent !== before, first);
    const second = await exposure.textContent();
    expect(Number.parseFloat(second!)).toBeGreaterThan(Number.parseFloat(first!));
    await page.getByLabel("Frames per epoch").fill("3");
    await screenshot(page, "journey-06-observation-live");
    for (const name of ["Brackfell A", "Brackfell B", "Brackfell C"]) {
      await page.getByLabel("Target", { exact: true }).selectOption({ label: name });
      await page.getByRole("button", { name: "Add the observation" }).click();
      await page.getByRole("cell", { name, exact: true }).first().waitFor();
    }
    await screenshot(page, "journey-07-observations");

    await page.getByRole("link", { name: "Feasibility sheet", exact: true }).click();
    await page.waitForURL(/\/feasibility$/);
    await page.getByRole("heading", { name: `Feasibility sheet for ${openCall}` }).waitFor();
    await page.getByRole("heading", { name: "Requested time" }).waitFor();
    // one row per observation, showing back the coordinates typed into the CSV and a time > 0
    const sheetTable = page
      .getByRole("table")
      .filter({ has: page.getByRole("columnheader", { name: "Target", exact: true }) })
      .filter({ has: page.getByRole("columnheader", { name: "Requested", exact: true }) })
      .first();
    const sheetRows = sheetTable.getByRole("row").filter({ hasText: /Brackfell/ });
    expect(await sheetRows.count()).toBe(3);
    const typed: Record<string, [string, string]> = { "Brackfell A": ["13:05:20.0", "+22:10:00"], "Brackfell B": ["13:06:02.5", "+22:14:30"], "Brackfell C": ["13:07:00.0", "+25:00:00"] };
    for (const [name, [ra, dec]] of Object.entries(typed)) {
      const cells = await sheetRows.filter({ hasText: name }).first().getByRole("cell").allTextContents();
      expect(cells[1]).toBe(ra);
      expect(cells[2]).toBe(dec);
      expect(Number.parseFloat(cells[5])).toBeGreaterThan(0);
    }
    await screenshot(page, "journey-08-feasibility");

    await page.getByRole("link", { name: "Science case", exact: true }).click();
    const pdf = path.join(tmpdir(), `science-case-${Date.now()}.pdf`);
    writeFileSync(pdf, await pdfWithPages(3));
    await page.getByLabel("PDF file").setInputFiles(pdf);
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    await page.getByText(/3 pages/).first().waitFor();
    await screenshot(page, "journey-09-science-case");

    // the readiness strip above the tabs holds the send button
    await page.getByText("Ready to send").waitFor();
    await screenshot(page, "journey-10-checklist");
    await page.getByRole("button", { name: "Send the proposal" }).click();
    const sent = new RegExp(`Submitted as (\\d{3}/${openCall.slice(2)})`);
    await page.getByText(sent).first().waitFor();
    const code = (await page.getByText(sent).first().textContent())!.match(sent)![1];
    await screenshot(page, "journey-11-submitted");

    const receipt = await waitForMail(pi, new RegExp(`receipt: ${code.replace("/", "\\/")}`), 30_000);
    const attachment = receipt.attachments![0];
    expect(attachment.contentType).toBe("application/pdf");
    const file = await fetch(`${testEnv.maildevUrl}/api/email/${receipt.id}/attachment/${encodeURIComponent(attachment.generatedFileName ?? attachment.fileName)}`);
    expect(Buffer.from(await file.arrayBuffer()).subarray(0, 5).toString()).toBe("%PDF-");
    await waitForMail("colleague@brackwater.example", new RegExp(`receipt: ${code.replace("/", "\\/")}`), 30_000);
    // the app's own pages logged no error (the mail catcher's UI is not ours)
    expect(errors).toEqual([]);
    await page.goto(`${testEnv.maildevUrl}/#/email/${receipt.id}`);
    // the mail catcher shows the receipt (its PDF attachment is checked through the API above)
    await page.getByText(new RegExp(`receipt: ${code}`)).first().waitFor();
    await screenshot(page, "journey-12-receipt-in-maildev");

    await page.goto(`${base}/change-log`);
    await page.getByText(`Submitted the proposal as ${code}.`).waitFor();
    await screenshot(page, "journey-13-history");
    await page.close();
  });
});
