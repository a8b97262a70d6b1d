// The science case in Chromium: the review page frames /review/:id/files/:id?inline=1, which is
// sandboxed (CSP `sandbox`, `frame-ancestors 'self'`), and Chromium's PDF viewer still shows the
// PDF there, with its pages; the team's inline link (sandboxed, framed by no one) shows on its own
// and not in a frame.
import { mkdirSync } from "node:fs";
import path from "node:path";
import type { Frame, Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { CallReview, Proposal, ReviewAssignment, ReviewPanelMember, StoredFile, User } from "~/models/index.server";
import { screenshotDir } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

/** The frame of Chromium's PDF viewer inside the page, if it is there. */
const pdfViewerOf = (page: Page): Frame | null => page.frames().find((f) => f.url().startsWith("chrome-extension://") && f.url().endsWith("/index.html")) ?? null;

/** The viewer's frame, once Chromium has opened it (expect.poll fails the test after 15 s). */
async function pdfViewer(page: Page): Promise<Frame> {
  await expect.poll(() => pdfViewerOf(page) !== null, { timeout: 15_000, message: "Chromium's PDF viewer opened" }).toBe(true);
  return pdfViewerOf(page)!;
}

describe("the science case framed in the review page", () => {
  const suite = appInBrowser();

  it("Chromium's PDF viewer shows the sandboxed inline PDF in the review page, page count and all", { timeout: 120_000 }, async () => {
    const reviewer = await newUser({ roles: ["reviewer"], name: "Frame Reviewer" });
    const pi = await newUser({ name: "Frame PI" });
    // two institutions: the same one would be a conflict
    await User.update({ institution: "Larkspur Vale College" }, { where: { id: reviewer.user.id } });
    await User.update({ institution: "Cindermoss Institute" }, { where: { id: pi.user.id } });
    const call = await testCall();
    // readyProposal stores a two-page science case
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Framed case of ${call.semesterCode}` });
    await Proposal.update({ status: "in_review", code: `001/${call.semesterCode.slice(2)}`, serial: 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
    await CallReview.create({ callId: call.id, reviewDeadlineAt: new Date(Date.now() + 86_400_000), perProposal: 1, startedAt: new Date(), committedAt: new Date() });
    await ReviewPanelMember.create({ callId: call.id, reviewerId: reviewer.user.id });
    await ReviewAssignment.create({ callId: call.id, proposalId: proposal.id, reviewerId: reviewer.user.id, committedAt: new Date() });

    const context = await suite.browser.newContext({ viewport: { width: 1300, height: 1000 } });
    const [name, value] = (await sessionCookieFor(reviewer.email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    const fileAnswers: Promise<string>[] = [];
    page.on("response", (r) => {
      if (/\/review\/\d+\/files\/\d+\?inline=1$/.test(r.url()) && r.request().isNavigationRequest()) fileAnswers.push(r.allHeaders().then((h) => `${h["x-frame-options"]} | ${h["content-security-policy"]}`));
    });
    await page.goto(`${suite.server.url}/review/${proposal.id}`);
    await page.getByRole("heading", { name: "Science case" }).waitFor();
    const viewer = await pdfViewer(page);
    // what the reviewer sees in the viewer's toolbar and sidebar: page 1 of the case's 2
    await expect.poll(() => viewer!.getByRole("textbox", { name: "Page number" }).inputValue()).toBe("1");
    await expect.poll(() => viewer!.getByText("/ 2", { exact: true }).count()).toBe(1);
    await expect.poll(() => viewer!.getByRole("tab", { name: "Thumbnail for page 2" }).count()).toBe(1);
    mkdirSync(screenshotDir, { recursive: true });
    await page.locator('iframe[title="Science case"]').scrollIntoViewIfNeeded();
    await page.locator('iframe[title="Science case"]').screenshot({ path: path.join(screenshotDir, "science-case-frame-01-viewer.png") });
    // the frame's answer from our server (the viewer's inner document, a second navigation to the
    // same address, is served by Chromium from that answer, without headers): sandboxed, framed by
    // our pages only
    expect(fileAnswers.length).toBeGreaterThan(0);
    expect(await fileAnswers[0]).toBe("SAMEORIGIN | sandbox; default-src 'none'; img-src data:; style-src 'unsafe-inline'; frame-ancestors 'self'");

    // The PI opens the team's inline link (sandboxed too, framed by no one): the viewer shows it
    // on its own; the same answer in a frame of our page stays without the viewer, so the checks
    // above do tell a shown PDF from a blocked one.
    const fileId = (await StoredFile.findOne({ where: { proposalId: proposal.id } }))!.id;
    const piContext = await suite.browser.newContext({ viewport: { width: 1300, height: 1000 } });
    const [piName, piValue] = (await sessionCookieFor(pi.email)).split("=");
    await piContext.addCookies([{ name: piName, value: piValue, url: suite.server.url }]);
    const piPage = await piContext.newPage();
    await piPage.goto(`${suite.server.url}/proposals/${proposal.id}/files/${fileId}?inline=1`);
    const own = await pdfViewer(piPage);
    await expect.poll(() => own!.getByText("/ 2", { exact: true }).count()).toBe(1);
    await piPage.goto(`${suite.server.url}/proposals/${proposal.id}/science-case`);
    await piPage.getByRole("heading", { name: "Current version" }).waitFor();
    await piPage.evaluate((src) => {
      const frame = document.createElement("iframe");
      frame.src = src;
      document.body.append(frame);
    }, `/proposals/${proposal.id}/files/${fileId}?inline=1`);
    // Chromium shows its "refused to connect" page in the frame (chrome-error://), not the viewer
    await expect.poll(() => piPage.frames().some((f) => f.url().startsWith("chrome-error://")), { timeout: 15_000 }).toBe(true);
    expect(pdfViewerOf(piPage)).toBeNull();
    await piContext.close();
    await context.close();
  });
});
