// The review in Chromium: the chair asks for the suggestion, accepts it and commits it; a reviewer
// signs in with the mailed code, reads the feasibility sheet and the science case, declares a
// conflict on one proposal and submits a grade for the other.
import { describe, expect, it } from "vitest";
import { CallReview, Proposal, ReviewAssignment, ReviewPanelMember, User } from "~/models/index.server";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { waitForMail } from "../helpers/maildev";
import { newUser, sessionCookieFor } from "../helpers/session";
import { signInInBrowser } from "../helpers/sign-in-browser";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

const comment = "The programme asks a clear question about the motions of faint members and the sample is matched to it. The feasibility sheet shows enough usable hours and the exposures reach the required signal to noise. A sentence on the data release and on earlier results of the team would make the case stronger for readers outside the field.";

describe("the review, from suggestion to a submitted grade", () => {
  const suite = appInBrowser();

  it("chair commits the suggestion; a reviewer reads, declares a conflict and grades", { timeout: 180_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Browser Chair" });
    const reviewers = [await newUser({ roles: ["reviewer"], name: "Browser Reviewer A" }), await newUser({ roles: ["reviewer"], name: "Browser Reviewer B" })];
    await User.update({ institution: "Alder Hollow University" }, { where: { id: reviewers[0].user.id } });
    await User.update({ institution: "Brisk Fen College" }, { where: { id: reviewers[1].user.id } });
    const call = await testCall();
    const titles: string[] = [];
    for (let i = 0; i < 2; i++) {
      const pi = await newUser({ name: `Browser PI ${i}` });
      await User.update({ institution: `Browser PI Institute ${i}` }, { where: { id: pi.user.id } });
      const title = `Browser review programme ${i} of ${call.semesterCode}`;
      const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title });
      await Proposal.update({ status: "in_review", code: `00${i + 1}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
      titles.push(title);
    }
    await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
    await CallReview.create({ callId: call.id, reviewDeadlineAt: new Date(Date.now() + 10 * 86_400_000), perProposal: 2, startedAt: new Date() });
    for (const r of reviewers) await ReviewPanelMember.create({ callId: call.id, reviewerId: r.user.id });

    // the chair (signed in by cookie; the reviewer below signs in by code)
    const chairContext = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(chair.email)).split("=");
    await chairContext.addCookies([{ name, value, url: suite.server.url }]);
    const page = await chairContext.newPage();
    const chairErrors = watchConsole(page);
    await page.goto(`${suite.server.url}/committee/${call.id}/assignments`);
    await page.getByRole("heading", { name: `Assignments for ${call.semesterCode}` }).waitFor();
    await expect.poll(() => page.getByText(/^0 pairs/).count()).toBe(1);
    await page.getByRole("button", { name: "Suggest reviewers" }).click();
    await page.getByText("Every proposal gets 2 reviewers.").waitFor();
    await page.getByRole("button", { name: "Accept the suggestion" }).click();
    await page.getByText(/^4 pairs · loads 2–2/).waitFor();
    await screenshot(page, "review-01-suggestion-accepted");
    await page.getByRole("button", { name: "Commit and e-mail the reviewers" }).click();
    await page.getByText("Committed: 4 pairs; 2 reviewers e-mailed their list.").waitFor();
    await screenshot(page, "review-02-committed");
    expect(await ReviewAssignment.count({ where: { callId: call.id } })).toBe(4);
    expect(chairErrors).toEqual([]);
    await waitForMail(reviewers[0].email, /to review for/);

    // the reviewer
    const reviewerContext = await suite.browser.newContext({ viewport: { width: 1300, height: 1000 } });
    const rp = await reviewerContext.newPage();
    // Chromium's built-in PDF viewer (the science case's frame) logs its own errors; only the app's count
    const reviewerErrors: string[] = [];
    rp.on("console", (m) => {
      if (m.type() === "error" && m.location().url.startsWith(suite.server.url)) reviewerErrors.push(`${m.text()} @ ${m.location().url}`);
    });
    rp.on("pageerror", (e) => reviewerErrors.push(e.message));
    await signInInBrowser(rp, suite.server.url, reviewers[0].email);
    await rp.goto(`${suite.server.url}/review`);
    await rp.getByRole("heading", { name: "Review desk" }).waitFor();
    const table = rp.getByRole("table");
    await expect.poll(() => table.getByRole("row").count()).toBe(3);
    await expect.poll(() => table.getByRole("cell", { name: "to read", exact: true }).count()).toBe(2);
    await screenshot(rp, "review-03-desk");

    await table.getByRole("link", { name: `001/${call.semesterCode.slice(2)}` }).click();
    await rp.getByRole("heading", { name: "Feasibility sheet" }).waitFor();
    await rp.getByRole("heading", { name: "Science case" }).waitFor();
    expect(await rp.locator('iframe[title="Science case"]').getAttribute("src")).toMatch(/\/review\/\d+\/files\/\d+\?inline=1/);
    await expect.poll(() => rp.getByRole("region", { name: "Feasibility sheet" }).getByText("Hollowmere Field 1").count()).toBeGreaterThan(0);
    await screenshot(rp, "review-04-reading");
    await rp.getByLabel("Reason").fill("The PI was my doctoral student until last year");
    await rp.getByRole("button", { name: "Declare the conflict" }).click();
    await rp.waitForURL(/\/review\?conflict=1/);
    await expect.poll(() => table.getByRole("cell", { name: "conflict declared", exact: true }).count()).toBe(1);

    await table.getByRole("link", { name: `002/${call.semesterCode.slice(2)}` }).click();
    await rp.getByRole("heading", { name: "Your grade" }).waitFor();
    await rp.getByLabel("Science (1–10)").selectOption("8.5");
    await rp.getByLabel("Feasibility (1–10)").selectOption("7");
    await rp.getByLabel("Legacy value (1–10)").selectOption("6.5");
    await rp.getByLabel("Overall merit (1–10)").selectOption("8");
    await rp.getByLabel("Comment to the PI").fill("Too short.");
    await rp.getByRole("button", { name: "Submit the review" }).click();
    await rp.getByText(/needs at least 50 words; it has 2/).waitFor();
    await rp.getByLabel("Comment to the PI").fill(comment);
    await rp.getByLabel("Comment to the committee (optional)").fill("Among the better ones in my set.");
    await rp.getByRole("button", { name: "Submit the review" }).click();
    await rp.getByText("Your review is submitted.").waitFor();
    await screenshot(rp, "review-05-submitted");
    const saved = await ReviewAssignment.findOne({ where: { callId: call.id, reviewerId: reviewers[0].user.id, status: "submitted" } });
    expect(saved?.overall).toBe(8);
    expect(saved?.science).toBe(8.5);
    expect(reviewerErrors).toEqual([]);
    await chairContext.close();
    await reviewerContext.close();
  });
});
