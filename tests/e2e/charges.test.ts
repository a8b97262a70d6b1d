// A PI pays a charge in Chromium: Pay on the workspace's Charges tab, the fake's hosted page with
// the test card, back to Nightshare where the return page waits for the signed webhook and shows
// the charge paid; the receipt arrives in the mail catcher with its PDF. The office then sees it
// paid in its table and waives another charge with a reason.
import { describe, expect, it } from "vitest";
import { Call, Charge, Proposal, ProposalMember, User } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { mailIds, waitForMail } from "../helpers/maildev";
import { newUser, sessionCookieFor } from "../helpers/session";
import { testCall } from "../integration/proposals-fixtures";

describe("paying a charge", () => {
  const suite = appInBrowser();

  it("goes from Pay to the hosted page and back to paid, with the receipt mailed", { timeout: 120_000 }, async () => {
    const call: Call = await testCall();
    await call.update({ currency: "eur", accessFeePerHourCents: 15_000 });
    const pi = await newUser({ name: "Browser Visiting PI" });
    await User.update({ isMemberInstitution: false, institution: "Far Valley Institute" }, { where: { id: pi.user.id } });
    const proposal = await Proposal.create({ callId: call.id, title: "Proper motions of the Thistlecombe field", abstract: "Invented.", scienceCategory: null, semestersRequested: [], createdById: pi.user.id, status: "accepted", code: `041/${call.semesterCode.slice(-3)}`, serial: 41 });
    await ProposalMember.create({ proposalId: proposal.id, userId: pi.user.id, email: pi.email, role: "pi", acceptedAt: new Date() });
    // 6.5 h × 150.00 EUR = 975.00 EUR (by hand)
    const fee = await Charge.create({ proposalId: proposal.id, callId: call.id, kind: "access_fee", semesterCode: call.semesterCode, hours: 6.5, pages: null, rateCents: 15_000, amountCents: 97_500, currency: "eur" });
    const other = await Charge.create({ proposalId: proposal.id, callId: call.id, kind: "page_charge", semesterCode: call.semesterCode, hours: null, pages: 7, rateCents: 8_000, amountCents: 56_000, currency: "eur" });
    const before = await mailIds();

    const context = await suite.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const [name, value] = (await sessionCookieFor(pi.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/proposals/${proposal.id}/charges`);
    const row = page.locator(`[data-charge="${fee.id}"]`);
    await row.getByText("EUR 975.00").waitFor();
    expect(await row.locator("[data-state]").textContent()).toBe("raised");
    await screenshot(page, "charges-01-due");

    // first the PI leaves the payment page: still unpaid, said plainly; then comes back to the same page
    await row.getByRole("button", { name: "Pay" }).click();
    await page.waitForURL(/\/pay\/cs_test_/);
    const firstPage = page.url();
    await page.getByRole("link", { name: "Cancel and go back" }).click();
    await page.getByText("You left the payment page without paying.").waitFor();
    expect(await row.locator("[data-state]").textContent()).toBe("awaiting payment");
    await screenshot(page, "charges-01b-left");
    await row.getByRole("button", { name: "Continue to payment" }).click();
    await page.waitForURL(/\/pay\/cs_test_/);
    expect(page.url()).toBe(firstPage);
    await page.getByText("975.00").first().waitFor();
    await page.getByLabel("Card number").fill("4242 4242 4242 4242");
    await page.getByLabel("Expiry (MM / YY)").fill("12 / 34");
    await page.getByLabel("CVC").fill("123");
    await screenshot(page, "charges-02-hosted-page");
    await page.getByRole("button", { name: /^Pay / }).click();

    await page.waitForURL(new RegExp(`/proposals/${proposal.id}/charges\\?checkout=return&session=cs_test_`));
    await page.getByText("was received; the receipt is on its way").waitFor({ timeout: 30_000 });
    await row.locator('[data-state="paid"]').waitFor();
    expect(await row.locator("[data-state]").textContent()).toBe("paid");
    expect(await row.getByRole("link", { name: "Receipt (PDF)" }).getAttribute("href")).toBe(`/proposals/${proposal.id}/charges/${fee.id}/receipt.pdf`);
    await screenshot(page, "charges-03-paid");

    const mail = await waitForMail(pi.email, /Nightshare receipt R\d{6}\/\w+: EUR 975\.00 paid/, 30_000, { exclude: before });
    expect(mail.attachments?.map((a) => a.contentType)).toEqual(["application/pdf"]);
    expect(mail.text).toContain("6.5 h allocated");

    // the office: the paid one in its table, the other waived with a reason
    const admin = await newUser({ roles: ["admin"], name: "Browser Office" });
    const office = await suite.browser.newContext({ viewport: { width: 1400, height: 900 } });
    const [an, av] = (await sessionCookieFor(admin.email)).split("=");
    await office.addCookies([{ name: an, value: av, url: suite.server.url }]);
    const desk = await office.newPage();
    const deskErrors = watchConsole(desk);
    await desk.goto(`${suite.server.url}/admin/charges`);
    await desk.getByText("paid (", { exact: false }).click();
    const paidRow = desk.getByRole("row").filter({ hasText: "EUR 975.00" });
    expect(await paidRow.locator("[data-state]").textContent()).toBe("paid");
    await desk.getByText("all (", { exact: false }).click();
    const otherRow = desk.getByRole("row").filter({ hasText: "EUR 560.00" }).filter({ hasText: proposal.code! });
    await otherRow.getByRole("button", { name: "Waive…" }).click();
    await otherRow.getByRole("button", { name: "Waive the charge" }).click();
    await otherRow.getByText("Give a reason of at least 3 characters.").waitFor();
    await otherRow.getByLabel(/Reason for waiving/).fill("Paper merged into the consortium's catalogue release");
    await otherRow.getByRole("button", { name: "Waive the charge" }).click();
    await desk.getByText(`Charge ${other.id} waived.`).waitFor();
    await screenshot(desk, "charges-04-office");
    await otherRow.locator('[data-state="waived"]').waitFor({ timeout: 5_000 });
    expect(await otherRow.locator("[data-state]").textContent()).toBe("waived");
    expect((await Charge.findByPk(other.id))?.waiveReason).toBe("Paper merged into the consortium's catalogue release");
    expect(errors).toEqual([]);
    expect(deskErrors).toEqual([]);
    await context.close();
    await office.close();
  });

  it("lets the PI declare the data-release paper's pages after the semester, with the error under the field", { timeout: 60_000 }, async () => {
    const call = await testCall();
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    await call.update({ semesterStart: "2026-02-01", semesterEnd: yesterday, currency: "eur", pageChargeCents: 8_000 });
    const pi = await newUser({ name: "Browser Member PI" });
    await User.update({ isMemberInstitution: true, institution: "Consortium Institute" }, { where: { id: pi.user.id } });
    const proposal = await Proposal.create({ callId: call.id, title: "A catalogue of the Moorvale field", abstract: "Invented.", scienceCategory: null, semestersRequested: [], createdById: pi.user.id, status: "accepted", code: `042/${call.semesterCode.slice(-3)}`, serial: 42 });
    await ProposalMember.create({ proposalId: proposal.id, userId: pi.user.id, email: pi.email, role: "pi", acceptedAt: new Date() });
    const context = await suite.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const [name, value] = (await sessionCookieFor(pi.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/proposals/${proposal.id}/charges`);
    await page.getByText("No charges.", { exact: false }).waitFor();
    await page.getByLabel("Pages").fill("2.5");
    await page.getByRole("button", { name: "Declare the pages" }).click();
    await page.locator("#pages-error").getByText("Give the number of pages as a whole number.").waitFor();
    expect(await page.getByLabel("Pages").inputValue()).toBe("2.5");
    await screenshot(page, "charges-05-pages-refused");
    await page.getByLabel("Pages").fill("12");
    // 12 pages × 80.00 EUR = 960.00 EUR (by hand)
    await page.getByText("Page charge: EUR 960.00").waitFor();
    await page.getByRole("button", { name: "Declare the pages" }).click();
    await page.getByText("Page charge raised for 12 pages.").waitFor();
    await screenshot(page, "charges-06a-pages-just-declared");
    const row = page.locator("[data-charge]");
    await row.first().waitFor({ timeout: 5_000 });
    expect(await row.count()).toBe(1);
    await row.getByText("EUR 960.00").waitFor();
    expect(await row.locator("[data-state]").textContent()).toBe("raised");
    await page.getByText("The data-release paper's 12 pages are declared").waitFor();
    expect(await page.getByLabel("Pages").count()).toBe(0);
    await screenshot(page, "charges-06-pages-declared");
    expect((await Charge.findOne({ where: { proposalId: proposal.id } }))?.amountCents).toBe(96_000);
    expect(errors).toEqual([]);
    await context.close();
  });

  it("keeps asking on the return page until the webhook has told us, without a reload", { timeout: 60_000 }, async () => {
    const call = await testCall();
    const pi = await newUser({ name: "Browser Waiting PI" });
    const proposal = await Proposal.create({ callId: call.id, title: "Motions in the Greyfold field", abstract: "Invented.", scienceCategory: null, semestersRequested: [], createdById: pi.user.id, status: "accepted", code: `043/${call.semesterCode.slice(-3)}`, serial: 43 });
    await ProposalMember.create({ proposalId: proposal.id, userId: pi.user.id, email: pi.email, role: "pi", acceptedAt: new Date() });
    // 2 h × 150.00 EUR = 300.00 EUR (by hand)
    const fee = await Charge.create({ proposalId: proposal.id, callId: call.id, kind: "access_fee", semesterCode: call.semesterCode, hours: 2, pages: null, rateCents: 15_000, amountCents: 30_000, currency: "eur" });
    const context = await suite.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const cookie = await sessionCookieFor(pi.email);
    const [name, value] = cookie.split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const opened = await fetch(`${suite.server.url}/api/v1/charges/${fee.id}/checkout`, { method: "POST", headers: { Cookie: cookie, "Content-Type": "application/json" }, body: "{}" });
    const { url } = (await opened.json()) as { url: string };
    const sessionId = /\/pay\/(cs_test_\w+)/.exec(url)![1];
    // the browser is back before the payment is confirmed (here: before it is even made)
    const page = await context.newPage();
    const errors = watchConsole(page);
    await page.goto(`${suite.server.url}/proposals/${proposal.id}/charges?checkout=return&session=${sessionId}`);
    await page.getByText("Waiting for the payment service to confirm the payment of EUR 300.00").waitFor();
    await screenshot(page, "charges-07-waiting");
    const paid = await fetch(url, { method: "POST", redirect: "manual", headers: { "Content-Type": "application/x-www-form-urlencoded" }, body: new URLSearchParams({ card_number: "4242 4242 4242 4242", card_expiry: "12 / 34", card_cvc: "123" }) });
    expect(paid.status).toBe(303);
    await page.getByText("EUR 300.00 was received").waitFor({ timeout: 20_000 });
    expect(await page.locator(`[data-charge="${fee.id}"] [data-state]`).textContent()).toBe("paid");
    expect(errors).toEqual([]);
    await context.close();
  });
});
