// The review half of the cycle through HTTP on the test MariaDB: starting the review, the conflict
// rules one by one, the suggestion and the assignment API, committing (mails), the reviewer's
// access, the grade's validation and deadline, declared conflicts, reminders and the audit log.
import { beforeAll, describe, expect, it } from "vitest";
import { sendDueReminders } from "~/lib/review/reminders.server";
import { AuditEntry, CallReview, OutgoingMail, Proposal, ProposalMember, ReviewAssignment, StoredFile, User } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;

const longComment = Array.from({ length: 55 }, (_, i) => `word${i}`).join(" ");
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

let chair: Person;
let pis: Person[];
let rTeam: Person, rInst: Person, rRival: Person, rFree: Person, rFree2: Person, outsider: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let p: Proposal[];
let withdrawnId: number;

async function setInstitution(person: Person, institution: string) {
  await User.update({ institution }, { where: { id: person.user.id } });
}

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Test Chair" });
  pis = [];
  for (let i = 0; i < 4; i++) {
    const pi = await newUser({ name: `Review PI ${i}` });
    await setInstitution(pi, `PI Institute ${i}`);
    pis.push(pi);
  }
  [rTeam, rInst, rRival, rFree, rFree2] = await Promise.all(["Team", "Inst", "Rival", "Free", "Free2"].map((n) => newUser({ roles: ["reviewer"], name: `Reviewer ${n}` })));
  outsider = await newUser({ roles: ["reviewer"], name: "Reviewer Outside" });
  await setInstitution(rTeam, "Team Reviewer College");
  await setInstitution(rInst, "  the PI-Institute 1 ");
  await setInstitution(rRival, "Rival Observatory");
  await setInstitution(rFree, "Free University");
  await setInstitution(rFree2, "Other Free University");
  await setInstitution(outsider, "Outside Institute");
  call = await testCall();
  p = [];
  for (const [i, pi] of pis.entries()) {
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Review test programme ${i} of ${call.semesterCode}` });
    await Proposal.update({ status: "submitted", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    p.push((await Proposal.findByPk(proposal.id))!);
  }
  // proposal 3 is in another category; the rival reviewer leads proposal 2 (same category as 0 and 1)
  await Proposal.update({ scienceCategory: "galaxies" }, { where: { id: p[3].id } });
  await ProposalMember.create({ proposalId: p[0].id, userId: rTeam.user.id, email: rTeam.email, role: "coi", acceptedAt: new Date() });
  await ProposalMember.create({ proposalId: p[2].id, userId: rRival.user.id, email: rRival.email, role: "coi", acceptedAt: new Date() });
  const { proposal: w } = await readyProposal({ user: pis[0].user, callId: call.id, title: `Withdrawn programme of ${call.semesterCode}` });
  await Proposal.update({ status: "withdrawn" }, { where: { id: w.id } });
  withdrawnId = w.id;
  await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
});

describe("starting the review", () => {
  it("the chair puts the submitted proposals in review (withdrawn stays out), audited with the count", async () => {
    const res = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(form({ intent: "start" }));
    expect(res.status).toBe(200);
    expect(res.text).toContain("4 proposals moved to in review.");
    expect((await Proposal.findAll({ where: { callId: call.id, status: "in_review" } })).length).toBe(4);
    expect((await Proposal.findByPk(withdrawnId))!.status).toBe("withdrawn");
    const audit = await AuditEntry.findOne({ where: { action: "review.started", entityId: call.id } });
    expect(audit?.details).toMatchObject({ moved: 4 });
  });

  it("a reviewer (not chair) gets 403 on the committee pages and API", async () => {
    expect((await (await request()).get(`/committee/${call.id}`).set("Cookie", rFree.cookie)).status).toBe(403);
    expect((await (await request()).get(`/api/v1/calls/${call.id}/review`).set("Cookie", rFree.cookie)).status).toBe(403);
  });

  it("the setup refuses a review deadline before the call's deadline, keeping what was typed", async () => {
    const res = await (await request())
      .post(`/committee/${call.id}`)
      .set("Cookie", chair.cookie)
      .type("form")
      .send(`intent=setup&reviewDeadline=2001-01-01T10:00&perProposal=2&panel=${rTeam.user.id}`);
    expect(res.status).toBe(400);
    expect(res.text).toContain("The review deadline must come after the call");
    expect(res.text).toContain('value="2001-01-01T10:00"');
  });

  it("the chair sets deadline, k and panel", async () => {
    const panel = [rTeam, rInst, rRival, rFree, rFree2].map((r) => `panel=${r.user.id}`).join("&");
    const future = new Date(Date.now() + 20 * 86_400_000).toISOString().slice(0, 16);
    const res = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(`intent=setup&reviewDeadline=${future}&perProposal=2&${panel}`);
    expect(res.status).toBe(200);
    const review = await CallReview.findOne({ where: { callId: call.id } });
    expect(review?.perProposal).toBe(2);
    expect(review?.reviewDeadlineAt).not.toBeNull();
  });
});

describe("conflicts, one rule at a time (GET /api/v1/calls/:callId/review)", () => {
  let state: { conflicts: { proposalId: number; reviewerId: number; reason: string }[]; panel: { reviewerId: number; categories: string[] }[]; proposals: { proposalId: number }[] };
  const reasonFor = (proposal: Proposal, person: Person) => state.conflicts.find((c) => c.proposalId === proposal.id && c.reviewerId === person.user.id)?.reason;
  beforeAll(async () => {
    const res = await (await request()).get(`/api/v1/calls/${call.id}/review`).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    state = res.body;
  });
  it("lists the panel and the proposals in review only", () => {
    expect(state.panel.map((r) => r.reviewerId).sort()).toEqual([rTeam, rInst, rRival, rFree, rFree2].map((r) => r.user.id).sort());
    expect(state.proposals.map((x) => x.proposalId).sort()).toEqual(p.map((x) => x.id).sort());
  });
  it("team member", () => expect(reasonFor(p[0], rTeam)).toBe("is on the proposal's team"));
  it("same institution after normalising", () => expect(reasonFor(p[1], rInst)).toBe("same institution as a team member (PI Institute 1)"));
  it("competitor in the same call and category, not in another category", () => {
    expect(reasonFor(p[0], rRival)).toMatch(/competing proposal in the same call and category/);
    expect(reasonFor(p[1], rRival)).toMatch(/003\//);
    expect(reasonFor(p[3], rRival)).toBeUndefined();
  });
  it("no conflict for a reviewer with none", () => {
    for (const x of p) expect(reasonFor(x, rFree)).toBeUndefined();
  });
});

describe("suggestion and assignment", () => {
  it("POST suggest gives k clean reviewers per proposal, loads within one, and changes nothing", async () => {
    const before = await ReviewAssignment.count({ where: { callId: call.id } });
    const res = await (await request()).post(`/api/v1/calls/${call.id}/review/suggest`).set(json(chair.cookie)).send({ perProposal: 2 });
    expect(res.status).toBe(200);
    expect(res.body.impossible).toEqual([]);
    expect(res.body.assignments).toHaveLength(8);
    const conflicted = new Set([`${p[0].id}:${rTeam.user.id}`, `${p[1].id}:${rInst.user.id}`, `${p[0].id}:${rRival.user.id}`, `${p[1].id}:${rRival.user.id}`, `${p[2].id}:${rRival.user.id}`]);
    for (const a of res.body.assignments) expect(conflicted.has(`${a.proposalId}:${a.reviewerId}`)).toBe(false);
    const counts = res.body.loads.map((l: { count: number }) => l.count);
    expect(Math.max(...counts) - Math.min(...counts)).toBeLessThanOrEqual(1);
    expect(await ReviewAssignment.count({ where: { callId: call.id } })).toBe(before);
  });

  it("says which proposals are impossible and why when k is too large", async () => {
    const res = await (await request()).post(`/api/v1/calls/${call.id}/review/suggest`).set(json(chair.cookie)).send({ perProposal: 5 });
    expect(res.status).toBe(200);
    const ids = res.body.impossible.map((x: { proposalId: number }) => x.proposalId).sort();
    expect(ids).toEqual([p[0].id, p[1].id, p[2].id].sort());
    expect(res.body.impossible.find((x: { proposalId: number }) => x.proposalId === p[0].id).reason).toBe("only 3 of the panel's 5 reviewers are free of conflicts with it (5 needed)");
  });

  it("a bad perProposal is a 400 naming the field", async () => {
    const res = await (await request()).post(`/api/v1/calls/${call.id}/review/suggest`).set(json(chair.cookie)).send({ perProposal: "three" });
    expect(res.status).toBe(400);
    expect(res.body.issues[0].path).toBe("perProposal");
  });

  it("PUT with a conflicted pair is refused with the pair and the reason, and changes nothing (no audit row)", async () => {
    const auditsBefore = await AuditEntry.count({ where: { entityType: "call", entityId: call.id } });
    const res = await (await request())
      .put(`/api/v1/calls/${call.id}/review/assignments`)
      .set(json(chair.cookie))
      .send({ assignments: [{ proposalId: p[3].id, reviewerId: rFree.user.id }, { proposalId: p[1].id, reviewerId: rInst.user.id }] });
    expect(res.status).toBe(400);
    expect(res.body.error).toContain("002/");
    expect(res.body.error).toContain("Reviewer Inst");
    expect(res.body.error).toContain("same institution as a team member");
    expect(res.body.issues[0].path).toBe("assignments.1");
    expect(await ReviewAssignment.count({ where: { callId: call.id } })).toBe(0);
    expect(await AuditEntry.count({ where: { entityType: "call", entityId: call.id } })).toBe(auditsBefore);
  });

  it("PUT with the suggestion and commit: saved, audited, each reviewer mailed their list and the deadline", async () => {
    const suggestion = (await (await request()).post(`/api/v1/calls/${call.id}/review/suggest`).set(json(chair.cookie)).send({ perProposal: 2 })).body;
    const res = await (await request()).put(`/api/v1/calls/${call.id}/review/assignments`).set(json(chair.cookie)).send({ assignments: suggestion.assignments, commit: true });
    expect(res.status).toBe(200);
    expect(res.body.pairs).toBe(8);
    const rows = await ReviewAssignment.findAll({ where: { callId: call.id } });
    expect(rows).toHaveLength(8);
    expect(rows.every((r) => r.committedAt !== null)).toBe(true);
    const reviewersWithWork = [...new Set(rows.map((r) => r.reviewerId))];
    for (const id of reviewersWithWork) {
      const user = (await User.findByPk(id))!;
      const mail = await OutgoingMail.findOne({ where: { toAddress: user.email }, order: [["id", "DESC"]] });
      expect(mail?.subject).toMatch(new RegExp(`to review for ${call.semesterCode}`));
      expect(mail?.textBody).toContain("UTC");
    }
    expect(res.body.mailed).toBe(reviewersWithWork.length);
    expect(await AuditEntry.findOne({ where: { action: "review.assignments_committed", entityId: call.id } })).not.toBeNull();
  });
});

describe("reviewer access: only assigned, non-conflicted proposals", () => {
  let mine: ReviewAssignment;
  let notMine: Proposal;
  let fileId: number;
  let reviewer: Person;
  beforeAll(async () => {
    reviewer = rFree;
    mine = (await ReviewAssignment.findOne({ where: { callId: call.id, reviewerId: rFree.user.id } }))!;
    const myIds = (await ReviewAssignment.findAll({ where: { reviewerId: rFree.user.id } })).map((a) => a.proposalId);
    notMine = p.find((x) => !myIds.includes(x.id))!;
    expect(notMine).toBeDefined();
    fileId = (await StoredFile.findOne({ where: { proposalId: mine.proposalId } }))!.id;
  });

  it("every page, download and API route answers the assigned reviewer", async () => {
    for (const path of [`/review/${mine.proposalId}`, `/review/${mine.proposalId}/pdf`, `/review/${mine.proposalId}/files/${fileId}`, `/api/v1/proposals/${mine.proposalId}`]) {
      const res = await (await request()).get(path).set("Cookie", reviewer.cookie);
      expect(res.status, path).toBe(200);
    }
    const page = await (await request()).get(`/review/${mine.proposalId}`).set("Cookie", reviewer.cookie);
    expect(page.text).toContain("Feasibility sheet");
    expect(page.text).toContain("Science case");
    const api = await (await request()).get(`/api/v1/proposals/${mine.proposalId}`).set("Cookie", reviewer.cookie);
    expect(api.body.readOnly).toBe(true);
    expect(api.body.proposal.team[0]).toHaveProperty("institution");
    // the inline science case may be framed by our own review page, and by nothing else
    const inline = await (await request()).get(`/review/${mine.proposalId}/files/${fileId}?inline=1`).set("Cookie", reviewer.cookie);
    expect(inline.headers["x-frame-options"]).toBe("SAMEORIGIN");
    expect(inline.headers["content-security-policy"]).toContain("frame-ancestors 'self'");
    const attached = await (await request()).get(`/review/${mine.proposalId}/files/${fileId}`).set("Cookie", reviewer.cookie);
    expect(attached.headers["x-frame-options"]).toBe("DENY");
    expect(page.headers["content-security-policy"]).toContain("frame-ancestors 'none'");
    const desk = await (await request()).get("/api/v1/review/assignments").set("Cookie", reviewer.cookie);
    expect(desk.body.assignments.map((a: { proposalId: number }) => a.proposalId)).toContain(mine.proposalId);
  });

  it("the committee's file is sandboxed: inline, frameable by our own pages only; as a download, by none; another type likewise", async () => {
    const csp = (res: { headers: Record<string, string> }) => new Map((res.headers["content-security-policy"] ?? "").split(";").map((d) => d.trim().split(/\s+/)).filter((d) => d[0]).map(([name, ...values]) => [name, values.join(" ")]));
    const get = async (path: string) => (await request()).get(path).set("Cookie", reviewer.cookie);
    const policy = (res: { headers: Record<string, string> }) => {
      const d = csp(res);
      return { sandbox: d.get("sandbox"), defaultSrc: d.get("default-src"), scriptSrc: d.get("script-src"), frameAncestors: d.get("frame-ancestors"), frameOptions: res.headers["x-frame-options"], nosniff: res.headers["x-content-type-options"] };
    };
    const inline = await get(`/review/${mine.proposalId}/files/${fileId}?inline=1`);
    expect(inline.status).toBe(200);
    expect([inline.headers["content-type"], inline.headers["content-disposition"].split(";")[0]]).toEqual(["application/pdf", "inline"]);
    // "sandbox" with no token: no scripts, forms or popups, and an origin of its own
    expect(policy(inline)).toEqual({ sandbox: "", defaultSrc: "'none'", scriptSrc: undefined, frameAncestors: "'self'", frameOptions: "SAMEORIGIN", nosniff: "nosniff" });

    const attached = await get(`/review/${mine.proposalId}/files/${fileId}`);
    expect(attached.status).toBe(200);
    expect(attached.headers["content-disposition"]).toMatch(/^attachment;/);
    expect(policy(attached)).toEqual({ sandbox: "", defaultSrc: "'none'", scriptSrc: undefined, frameAncestors: "'none'", frameOptions: "DENY", nosniff: "nosniff" });

    // a stored file of another type (none is stored today), asked for inline: sandboxed all the same
    const body = Buffer.from("<script>alert(document.cookie)</script>");
    const html = await StoredFile.create({ proposalId: mine.proposalId, kind: "other", filename: "page.html", contentType: "text/html", sizeBytes: body.length, sha256: "0".repeat(64), pageCount: null, data: body, uploadedById: null });
    try {
      const other = await get(`/review/${mine.proposalId}/files/${html.id}?inline=1`);
      expect(other.status).toBe(200);
      expect(other.headers["content-type"]).toMatch(/^text\/html/);
      expect(policy(other)).toEqual({ sandbox: "", defaultSrc: "'none'", scriptSrc: undefined, frameAncestors: "'self'", frameOptions: "SAMEORIGIN", nosniff: "nosniff" });
    } finally {
      await html.destroy();
    }
  });

  it("another proposal, another's file, and anything for an unassigned reviewer: 404", async () => {
    const otherFile = (await StoredFile.findOne({ where: { proposalId: notMine.id } }))!.id;
    const cases: [Person, string][] = [
      [reviewer, `/review/${notMine.id}`],
      [reviewer, `/review/${notMine.id}/pdf`],
      [reviewer, `/review/${notMine.id}/files/${otherFile}`],
      [reviewer, `/review/${mine.proposalId}/files/${otherFile}`],
      [reviewer, `/api/v1/proposals/${notMine.id}`],
      [outsider, `/review/${mine.proposalId}`],
      [outsider, `/review/${mine.proposalId}/pdf`],
      [outsider, `/review/${mine.proposalId}/files/${fileId}`],
      [outsider, `/api/v1/proposals/${mine.proposalId}`],
    ];
    for (const [who, path] of cases) {
      const res = await (await request()).get(path).set("Cookie", who.cookie);
      expect(res.status, path).toBe(404);
    }
    const put = await (await request()).put(`/api/v1/review/assignments/${mine.id}`).set(json(outsider.cookie)).send({ science: 5, feasibility: 5, legacy: 5, overall: 5, commentToPi: longComment, submit: true });
    expect(put.status).toBe(404);
    const post = await (await request()).post(`/review/${mine.proposalId}`).set("Cookie", outsider.cookie).type("form").send(form({ intent: "draft", science: "5" }));
    expect(post.status).toBe(404);
    const conflict = await (await request()).post(`/api/v1/review/assignments/${mine.id}/conflict`).set(json(outsider.cookie)).send({ reason: "trying to meddle" });
    expect(conflict.status).toBe(404);
  });

  it("the chair reads the proposal and the committee comments; the PI's page of another call is not a reviewer's", async () => {
    const res = await (await request()).get(`/review/${mine.proposalId}`).set("Cookie", chair.cookie);
    expect(res.status).toBe(200);
    expect(res.text).toContain("Reviews");
    const team = await (await request()).get(`/proposals/${mine.proposalId}`).set("Cookie", reviewer.cookie);
    expect(team.status).toBe(404);
  });
});

describe("the grade", () => {
  let a: ReviewAssignment;
  let reviewer: Person;
  const put = async (body: Record<string, unknown>) => (await request()).put(`/api/v1/review/assignments/${a.id}`).set(json(reviewer.cookie)).send(body);
  beforeAll(async () => {
    reviewer = rFree2;
    a = (await ReviewAssignment.findOne({ where: { callId: call.id, reviewerId: rFree2.user.id } }))!;
  });
  it("refuses a merit outside 1–10, not a half point, and a short comment on submit, naming the field", async () => {
    const good = { science: 7, feasibility: 6.5, legacy: 5, overall: 7, commentToPi: longComment, submit: true };
    for (const [body, path] of [
      [{ ...good, science: 11 }, "science"],
      [{ ...good, feasibility: 0.5 }, "feasibility"],
      [{ ...good, legacy: 7.3 }, "legacy"],
      [{ ...good, overall: null }, "overall"],
      [{ ...good, commentToPi: "Too short to be useful." }, "commentToPi"],
    ] as const) {
      const res = await put(body);
      expect(res.status, path).toBe(400);
      expect(res.body.issues.map((i: { path: string }) => i.path)).toContain(path);
    }
    expect((await ReviewAssignment.findByPk(a.id))!.status).toBe("assigned");
  });
  it("a draft may be incomplete; a submission is saved and audited; reopen works before the deadline", async () => {
    const draft = await put({ science: 8, commentToPi: "first thoughts", submit: false });
    expect(draft.status).toBe(200);
    expect((await ReviewAssignment.findByPk(a.id))!.status).toBe("draft");
    const res = await put({ science: 8, feasibility: 6.5, legacy: 5, overall: 7.5, commentToPi: longComment, commentToCommittee: "only for you", submit: true });
    expect(res.status).toBe(200);
    const saved = (await ReviewAssignment.findByPk(a.id))!;
    expect(saved.status).toBe("submitted");
    expect(saved.overall).toBe(7.5);
    expect(await AuditEntry.findOne({ where: { action: "review.submitted", entityId: a.id } })).not.toBeNull();
    const reviews = await (await request()).get(`/api/v1/calls/${call.id}/reviews`).set("Cookie", chair.cookie);
    expect(reviews.body.reviews).toContainEqual(expect.objectContaining({ assignmentId: a.id, proposalId: a.proposalId, reviewerId: rFree2.user.id, overall: 7.5, feasibility: 6.5 }));
  });
  it("the form page refuses a short comment and keeps what was typed", async () => {
    const res = await (await request())
      .post(`/review/${a.proposalId}`)
      .set("Cookie", reviewer.cookie)
      .type("form")
      .send(form({ intent: "reopen" }));
    expect(res.status).toBe(200);
    const bad = await (await request())
      .post(`/review/${a.proposalId}`)
      .set("Cookie", reviewer.cookie)
      .type("form")
      .send(form({ intent: "submit", science: "8", feasibility: "6", legacy: "5", overall: "7", commentToPi: "A distinctive but short remark" }));
    expect(bad.status).toBe(400);
    expect(bad.text).toContain("needs at least 50 words; it has 5");
    expect(bad.text).toContain("A distinctive but short remark");
  });
  it("after the review deadline nothing changes (400) until the chair reopens it (audited)", async () => {
    await CallReview.update({ reviewDeadlineAt: new Date(Date.now() - 60_000) }, { where: { callId: call.id } });
    const late = await put({ science: 9, feasibility: 6.5, legacy: 5, overall: 7.5, commentToPi: longComment, submit: true });
    expect(late.status).toBe(400);
    expect(late.body.error).toMatch(/review deadline passed/);
    const reopen = await (await request()).post(`/committee/${call.id}`).set("Cookie", chair.cookie).type("form").send(form({ intent: "reopen", assignmentId: a.id }));
    expect(reopen.status).toBe(200);
    expect(await AuditEntry.findOne({ where: { action: "review.reopened_by_chair", entityId: a.id } })).not.toBeNull();
    const again = await put({ science: 9, feasibility: 6.5, legacy: 5, overall: 8, commentToPi: longComment, submit: true });
    expect(again.status).toBe(200);
    await CallReview.update({ reviewDeadlineAt: new Date(Date.now() + 20 * 86_400_000) }, { where: { callId: call.id } });
  });
});

describe("declared conflicts, reminders", () => {
  it("a declared conflict releases the assignment, tells the chair, and the reviewer loses access", async () => {
    const a = (await ReviewAssignment.findOne({ where: { callId: call.id, reviewerId: rFree.user.id, status: "assigned" } }))!;
    const bad = await (await request()).post(`/api/v1/review/assignments/${a.id}/conflict`).set(json(rFree.cookie)).send({ reason: "" });
    expect(bad.status).toBe(400);
    expect(bad.body.issues[0].path).toBe("reason");
    const res = await (await request()).post(`/api/v1/review/assignments/${a.id}/conflict`).set(json(rFree.cookie)).send({ reason: "I supervised the PI's thesis" });
    expect(res.status).toBe(200);
    expect((await ReviewAssignment.findByPk(a.id))!.status).toBe("conflict");
    const mail = await OutgoingMail.findOne({ where: { toAddress: chair.email }, order: [["id", "DESC"]] });
    expect(mail?.textBody).toContain("I supervised the PI's thesis");
    expect((await (await request()).get(`/review/${a.proposalId}`).set("Cookie", rFree.cookie)).status).toBe(404);
    const state = (await (await request()).get(`/api/v1/calls/${call.id}/review`).set("Cookie", chair.cookie)).body;
    expect(state.conflicts).toContainEqual({ proposalId: a.proposalId, reviewerId: rFree.user.id, reason: "declared by the reviewer: I supervised the PI's thesis" });
    const again = await (await request()).put(`/api/v1/calls/${call.id}/review/assignments`).set(json(chair.cookie)).send({ assignments: [{ proposalId: a.proposalId, reviewerId: rFree.user.id }] });
    expect(again.status).toBe(400);
    expect(again.body.error).toContain("I supervised the PI's thesis");
  });

  it("automatic reminders go out 3 days before the deadline, once per reviewer with reviews outstanding", async () => {
    await CallReview.update({ reviewDeadlineAt: new Date(Date.now() + 2 * 86_400_000) }, { where: { callId: call.id } });
    const outstanding = await ReviewAssignment.findAll({ where: { callId: call.id, status: ["assigned", "draft"] } });
    const expected = [...new Set(outstanding.map((a) => a.reviewerId))];
    const emails = (await User.findAll({ where: { id: expected } })).map((u) => u.email);
    const before = await Promise.all(emails.map((e) => OutgoingMail.count({ where: { toAddress: e } })));
    await sendDueReminders();
    await sendDueReminders();
    await Promise.all([sendDueReminders(), sendDueReminders()]);
    const after = await Promise.all(emails.map((e) => OutgoingMail.count({ where: { toAddress: e } })));
    expect(after.map((n, i) => n - before[i])).toEqual(emails.map(() => 1));
    expect(await AuditEntry.count({ where: { action: "review.reminder_sent", entityId: expected } })).toBe(expected.length);
  });
});
