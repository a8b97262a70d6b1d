// Distributed review in Chromium: the office turns a call into a submitter-reviewed one (a refused
// value first, shown under its field); the PI names the team's reviewer on the Team tab; the PI
// rates a comment on the Decision tab; the chair's assignment matrix and ranking board of the
// demo's distributed call. Screenshots in tests/screenshots/distributed-*.png.
import { Op } from "sequelize";
import { describe, expect, it } from "vitest";
import { callBoard } from "~/lib/allocation/board.server";
import { anonymisedComments } from "~/lib/decisions/anonymise";
import { sequelize, Call, CallReview, DecisionLetter, Proposal, ProposalMember, ReviewAssignment, ReviewHelpfulness, User } from "~/models/index.server";
import { DISTRIBUTED_DEMO_TITLE, up as seedDistributedDemo } from "../../sequelize/seeders/20261202090600-demo-distributed";
import { screenshot, watchConsole } from "../helpers/browser";
import { appInBrowser } from "../helpers/browser-suite";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "../integration/proposals-fixtures";

const longComment = Array.from({ length: 55 }, (_, i) => `word${i}`).join(" ");

describe("distributed review in the browser", () => {
  const suite = appInBrowser();
  async function pageAs(email: string) {
    const context = await suite.browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const [name, value] = (await sessionCookieFor(email)).split("=");
    await context.addCookies([{ name, value, url: suite.server.url }]);
    const page = await context.newPage();
    return { context, page, errors: watchConsole(page) };
  }

  it("the office makes a call submitter-reviewed; a bad number is refused under its field", { timeout: 120_000 }, async () => {
    const admin = await newUser({ roles: ["admin"], name: "Browser Office" });
    const call = await testCall();
    const { context, page, errors } = await pageAs(admin.email);
    await page.goto(`${suite.server.url}/admin/calls/${call.id}`);
    const form = page.getByRole("form", { name: "Save the call" });
    await form.waitFor();
    await page.locator('html[data-hydrated="yes"]').waitFor({ state: "attached" });
    const perTeam = form.getByLabel("Reviews per team");
    expect(await perTeam.isVisible()).toBe(false);
    await form.getByLabel("Who reviews").selectOption("distributed");
    await perTeam.waitFor({ state: "visible" });
    await perTeam.fill("0");
    await form.getByRole("button", { name: "Save the call" }).click();
    await form.getByText("Reviews per submitting team must be from 1 to 30.").waitFor();
    expect(await perTeam.inputValue()).toBe("0");
    await screenshot(page, "distributed-01-call-form-refused");
    await perTeam.fill("6");
    await form.getByLabel(/Keep competitors apart/).check();
    await form.getByLabel("A team that does not deliver by the review deadline").selectOption("unranked");
    await form.getByRole("button", { name: "Save the call" }).click();
    await page.waitForURL(/\/admin\/calls\?saved=/);
    const saved = (await Call.findByPk(call.id))!;
    expect({ mode: saved.reviewMode, k: saved.reviewsPerSubmitter, apart: saved.separateCompetitors, policy: saved.unreviewedPolicy }).toEqual({ mode: "distributed", k: 6, apart: true, policy: "unranked" });
    expect(errors).toEqual([]);
    await context.close();
  });

  it("the PI names the team's reviewer on the Team tab", { timeout: 120_000 }, async () => {
    const pi = await newUser({ name: "Browser Distributed PI" });
    const coi = await newUser({ name: "Browser Distributed Co-I" });
    const call = await testCall();
    await call.update({ reviewMode: "distributed", reviewsPerSubmitter: 5 });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Browser distributed programme" });
    await ProposalMember.create({ proposalId: proposal.id, userId: coi.user.id, email: coi.email, role: "coi", acceptedAt: new Date() });
    const { context, page, errors } = await pageAs(pi.email);
    await page.goto(`${suite.server.url}/proposals/${proposal.id}/team`);
    await page.locator('html[data-hydrated="yes"]').waitFor({ state: "attached" });
    const shown = page.getByTestId("designated-reviewer");
    expect(await shown.textContent()).toContain("No reviewer chosen yet");
    await page.getByLabel("Who reviews for the team").selectOption({ label: "Browser Distributed Co-I (Co-I)" });
    await page.getByRole("button", { name: "Save the reviewer" }).click();
    await page.getByText(`${coi.email} will review for the team.`).waitFor();
    await expect.poll(() => shown.textContent()).toBe("Reviewer: Browser Distributed Co-I");
    await screenshot(page, "distributed-02-team-reviewer");
    expect((await Proposal.findByPk(proposal.id))!.designatedReviewerId).toBe(coi.user.id);
    expect(errors).toEqual([]);
    await context.close();
  });

  it("the PI rates a comment on the Decision tab", { timeout: 120_000 }, async () => {
    const pi = await newUser({ name: "Browser Rating PI" });
    const reviewer = await newUser({ name: "Browser Rated Reviewer" });
    const call = await testCall();
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: "Browser rated programme" });
    await Proposal.update({ status: "accepted", code: `901/${call.semesterCode.slice(2)}`, serial: 901, submittedAt: new Date() }, { where: { id: proposal.id } });
    const a = await ReviewAssignment.create({ callId: call.id, proposalId: proposal.id, reviewerId: reviewer.user.id, committedAt: new Date(), status: "submitted", overall: 7, commentToPi: longComment, submittedAt: new Date() });
    await DecisionLetter.create({
      proposalId: proposal.id, callId: call.id, batchId: null, outcome: "accepted", subject: "Decision", body: "Accepted.", chargeId: null, sentAt: new Date(), sentById: null,
      facts: { proposalId: proposal.id, code: "901", title: "t", semesterCode: call.semesterCode, callTitle: call.title, piName: "PI", outcome: "accepted", hours: [], tier: null, charge: null, comments: anonymisedComments(proposal.id, [{ id: a.id, commentToPi: longComment }]), date: "2027-01-01" },
    });
    const { context, page, errors } = await pageAs(pi.email);
    await page.goto(`${suite.server.url}/proposals/${proposal.id}/decision`);
    await page.locator('html[data-hydrated="yes"]').waitFor({ state: "attached" });
    const four = page.getByRole("form", { name: "How helpful was Reviewer 1?" }).getByRole("button", { name: "4" });
    expect(await four.getAttribute("aria-pressed")).toBe("false");
    await four.click();
    await page.getByRole("status").filter({ hasText: "Saved." }).waitFor();
    await expect.poll(() => four.getAttribute("aria-pressed")).toBe("true");
    await screenshot(page, "distributed-03-decision-rating");
    expect((await ReviewHelpfulness.findOne({ where: { assignmentId: a.id, raterId: pi.user.id } }))!.rating).toBe(4);
    expect(errors).toEqual([]);
    await context.close();
  });

  it("the chair reads the demo's distributed call: the matrix with helpfulness, the board with the team's reviews", { timeout: 120_000 }, async () => {
    const chair = await newUser({ roles: ["chair"], name: "Browser Distributed Chair" });
    await seedDistributedDemo({ context: sequelize }); // idempotent; puts the demo right after a migrations round trip
    const call = (await Call.findOne({ where: { reviewMode: "distributed", title: { [Op.like]: `${DISTRIBUTED_DEMO_TITLE}%` } } }))!;
    const { context, page, errors } = await pageAs(chair.email);
    await page.goto(`${suite.server.url}/committee/${call.id}/assignments`);
    await page.getByTestId("distributed-note").waitFor();
    expect(await page.getByTestId("distributed-note").textContent()).toContain("gets 4 proposals of the call");
    const first = (await Proposal.findOne({ where: { callId: call.id }, order: [["serial", "ASC"]] }))!;
    const designated = (await User.findByPk(first.designatedReviewerId!))!;
    expect(await page.locator(`[data-helpfulness="${designated.id}"]`).textContent()).toBe("no helpfulness ratings");
    await screenshot(page, "distributed-04-assignments");
    await page.goto(`${suite.server.url}/committee/${call.id}/board`);
    await page.getByRole("columnheader", { name: "Team's reviews" }).waitFor();
    expect(await page.getByTestId("review-duty").count()).toBe(10);
    await screenshot(page, "distributed-05-board");
    // after the review deadline under "not ranked", the late teams' proposals are listed last
    const review = (await CallReview.findOne({ where: { callId: call.id } }))!;
    const deadline = review.reviewDeadlineAt;
    await review.update({ reviewDeadlineAt: new Date(Date.now() - 60_000) });
    await call.update({ unreviewedPolicy: "unranked" });
    try {
      await page.goto(`${suite.server.url}/committee/${call.id}/board`);
      await page.getByRole("columnheader", { name: "Team's reviews" }).waitFor();
      const duties = await page.getByTestId("review-duty").allTextContents();
      const withheld = duties.map((t) => t.includes("not ranked"));
      expect(withheld.filter(Boolean).length).toBeGreaterThan(0);
      expect(withheld.filter(Boolean).length).toBeLessThan(10);
      expect(withheld.slice(withheld.indexOf(true)).every(Boolean)).toBe(true);
      // a withheld proposal has no rank and no chance above the allocation line either
      const withheldIds = (await callBoard({ callId: call.id })).proposals.filter((r) => r.rankWithheld).map((r) => r.proposalId);
      expect(withheldIds.length).toBe(withheld.filter(Boolean).length);
      for (const id of withheldIds) {
        expect(await page.getByTestId(`rank-${id}`).count()).toBe(0);
        expect(await page.getByTestId(`above-${id}`).count()).toBe(0);
      }
      await screenshot(page, "distributed-06-board-unranked");
    } finally {
      await review.update({ reviewDeadlineAt: deadline });
      await call.update({ unreviewedPolicy: "flag" });
    }
    expect(errors).toEqual([]);
    await context.close();
  });
});
