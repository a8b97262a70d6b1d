// Dual-anonymous review (a call option) through HTTP on the test MariaDB: every page, API answer
// and PDF a reviewer of such a call reaches is searched for the team's names, institutions and
// e-mails (and the same pages of a named call do show them, so the search can fail); conflicts are
// still found from the hidden team; the chair sees the teams only after every grade is in, by an
// audited reveal; the PI is warned, with page numbers, where the science case names the team.
import { PDFDocument, StandardFonts } from "pdf-lib";
import { beforeAll, describe, expect, it } from "vitest";
import { storeScienceCase } from "~/lib/proposals/science-case.server";
import { AuditEntry, Call, CallReview, Proposal, ProposalMember, ReviewAssignment, ReviewPanelMember, User } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { pdfText } from "./decisions-fixtures";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
const longComment = Array.from({ length: 55 }, (_, i) => `word${i}`).join(" ");
const json = (cookie: string) => ({ Cookie: cookie, "Content-Type": "application/json" });

async function get(url: string, cookie: string) {
  return (await request()).get(url).set("Cookie", cookie);
}

async function binary(url: string, cookie: string) {
  return (await request()).get(url).set("Cookie", cookie).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on("data", (c: Buffer) => chunks.push(c));
    r.on("end", () => cb(null, Buffer.concat(chunks)));
  });
}

/** A science case whose document information names its writer (word processors do). */
async function caseWithAuthor(author: string, pageTexts: string[] = ["Science case, page 1", "Science case, page 2"]) {
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  for (const text of pageTexts) {
    const page = doc.addPage([595, 842]);
    text.split("\n").forEach((line, i) => page.drawText(line, { x: 72, y: 770 - i * 18, size: 12, font }));
  }
  doc.setAuthor(author);
  return doc.save();
}

type Setup = { call: Call; proposal: Proposal; pi: Person; coi: Person; invited: string; fileId: number; secrets: string[] };

let chair: Person;
let reviewer: Person;
let rColleague: Person;
let anon: Setup;
let named: Setup;
let assignmentId: number;

/** A call in review (deadline passed, assignment committed) with one proposal and its team. */
async function callInReview(visibility: "named" | "dual_anonymous", tag: string): Promise<Setup> {
  const call = await testCall();
  await call.update({ teamVisibility: visibility });
  const pi = await newUser({ name: `Orla Venmarch ${tag}` });
  await User.update({ institution: `Brindlewood Institute ${tag}` }, { where: { id: pi.user.id } });
  const coi = await newUser({ name: `Tamsin Quellory ${tag}` });
  await User.update({ institution: `Saltmere College ${tag}` }, { where: { id: coi.user.id } });
  const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Anonymity test programme ${tag}` });
  await ProposalMember.create({ proposalId: proposal.id, userId: coi.user.id, email: coi.email, role: "coi", acceptedAt: new Date() });
  const invited = `invited-${tag.toLowerCase()}-${Date.now()}@test.example`;
  await ProposalMember.create({ proposalId: proposal.id, userId: null, email: invited, role: "coi", acceptedAt: null });
  const stored = await storeScienceCase({ proposalId: proposal.id, user: pi.user, file: { name: `venmarch-${tag}-case.pdf`, type: "application/pdf", bytes: await caseWithAuthor(`Orla Venmarch ${tag}`) } });
  await Proposal.update({ status: "in_review", code: `001/${call.semesterCode.slice(2)}`, serial: 1, submittedAt: new Date() }, { where: { id: proposal.id } });
  await call.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
  await CallReview.create({ callId: call.id, reviewDeadlineAt: new Date(Date.now() + 10 * 86_400_000), perProposal: 1, startedAt: new Date(), committedAt: new Date() });
  for (const r of [reviewer, rColleague]) await ReviewPanelMember.create({ callId: call.id, reviewerId: r.user.id });
  const fileId = stored.id;
  return {
    call,
    proposal: (await Proposal.findByPk(proposal.id))!,
    pi,
    coi,
    invited,
    fileId,
    secrets: [`Orla Venmarch ${tag}`, `Venmarch`, `Brindlewood Institute ${tag}`, `Tamsin Quellory ${tag}`, `Quellory`, `Saltmere College ${tag}`, pi.email, coi.email, invited, `venmarch-${tag}`],
  };
}

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "Anonymity Chair" });
  reviewer = await newUser({ roles: ["reviewer"], name: "Anonymity Reviewer" });
  await User.update({ institution: "Farhollow Observatory" }, { where: { id: reviewer.user.id } });
  rColleague = await newUser({ roles: ["reviewer"], name: "Colleague Reviewer" });
  anon = await callInReview("dual_anonymous", "Anon");
  named = await callInReview("named", "Named");
  // the colleague works where the anonymous proposal's Co-I works (spelt otherwise; the rule
  // normalises names): a conflict found from the hidden team. Reviewers' own institutions are
  // shown to the chair, so the spelling keeps the search for the Co-I's one meaningful.
  await User.update({ institution: "The Saltmere-College, Anon" }, { where: { id: rColleague.user.id } });
  for (const s of [anon, named]) {
    const a = await ReviewAssignment.create({ callId: s.call.id, proposalId: s.proposal.id, reviewerId: reviewer.user.id, committedAt: new Date() });
    if (s === anon) assignmentId = a.id;
  }
});

/** A page's text as read: React's text separators gone, the apostrophe unescaped. */
const plain = (html: string) => html.replace(/<!-- -->/g, "").replace(/&#x27;/g, "'").replace(/&quot;/g, '"');

const absent = (text: string, secrets: string[], where: string) => {
  for (const s of secrets) expect(text.toLowerCase(), `${where} shows "${s}"`).not.toContain(s.toLowerCase());
};

/** Everything the reviewer reaches for the proposal: pages, API answers, the proposal PDF (as text) and the file. */
async function reviewerView(s: Setup, who: Person) {
  const texts: [string, string][] = [];
  for (const url of ["/review", `/review/${s.proposal.id}`, `/api/v1/proposals/${s.proposal.id}`, "/api/v1/review/assignments"]) {
    const res = await get(url, who.cookie);
    expect(res.status, url).toBe(200);
    texts.push([url, res.text]);
  }
  const pdf = await binary(`/review/${s.proposal.id}/pdf`, who.cookie);
  expect(pdf.status).toBe(200);
  texts.push(["proposal PDF", await pdfText(new Uint8Array(pdf.body as Buffer))]);
  const file = await binary(`/review/${s.proposal.id}/files/${s.fileId}`, who.cookie);
  expect(file.status).toBe(200);
  const author = (await PDFDocument.load(new Uint8Array(file.body as Buffer), { updateMetadata: false })).getAuthor() ?? "";
  texts.push(["science case: file name and author", `${file.headers["content-disposition"]} ${author}`]);
  return texts;
}

describe("a reviewer of a dual-anonymous call", () => {
  it("finds no name, institution or e-mail of the team on any page, API answer, PDF or file", async () => {
    const view = await reviewerView(anon, reviewer);
    for (const [where, text] of view) absent(text, anon.secrets, where);
    const page = view.find(([w]) => w === `/review/${anon.proposal.id}`)![1];
    expect(page).toContain("Dual-anonymous review: the team");
    expect(page).toContain(anon.proposal.title); // the proposal itself is there
    expect(page).not.toContain("createdById"); // nor the id of the PI's account
    const api = JSON.parse(view.find(([w]) => w.startsWith("/api/v1/proposals"))![1]);
    expect(api.proposal.team).toEqual([]);
    expect(api.proposal.teamHidden).toBe(true);
    expect(api.scienceCase.filename).toBe("science-case.pdf");
    expect(view.find(([w]) => w === "proposal PDF")![1]).toContain("the team is not shown");
  });

  it("while the same reviewer sees the team of a named call on the same pages (the search above can fail)", async () => {
    const view = await reviewerView(named, reviewer);
    const all = view.map(([, t]) => t).join("\n");
    for (const s of ["Orla Venmarch Named", "Brindlewood Institute Named", "Tamsin Quellory Named", "Saltmere College Named"]) expect(all).toContain(s);
    expect(view.find(([w]) => w === "proposal PDF")![1]).toContain("Brindlewood Institute Named");
    expect(view.find(([w]) => w.startsWith("science case"))![1]).toContain("Orla Venmarch Named");
  });

  it("conflicts are still found from the hidden team: the colleague of a Co-I cannot reach the proposal, and the chair sees why without the institution", async () => {
    await ReviewAssignment.create({ callId: anon.call.id, proposalId: anon.proposal.id, reviewerId: rColleague.user.id, committedAt: new Date() });
    for (const url of [`/review/${anon.proposal.id}`, `/review/${anon.proposal.id}/pdf`, `/api/v1/proposals/${anon.proposal.id}`]) expect((await get(url, rColleague.cookie)).status, url).toBe(404);
    const state = await get(`/api/v1/calls/${anon.call.id}/review`, chair.cookie);
    const conflict = state.body.conflicts.find((c: { reviewerId: number }) => c.reviewerId === rColleague.user.id);
    expect(conflict).toMatchObject({ proposalId: anon.proposal.id, reason: "shares an institution with a team member" });
    absent(JSON.stringify(state.body), anon.secrets, "GET /api/v1/calls/:callId/review");
    await ReviewAssignment.destroy({ where: { callId: anon.call.id, reviewerId: rColleague.user.id } });
  });
});

describe("the chair of a dual-anonymous call", () => {
  const chairUrls = (s: Setup) => [
    `/committee/${s.call.id}`,
    `/committee/${s.call.id}/assignments`,
    `/committee/${s.call.id}/board`,
    `/committee/${s.call.id}/ranked-list.csv`,
    `/api/v1/calls/${s.call.id}/review`,
    `/api/v1/calls/${s.call.id}/board`,
    `/api/v1/calls/${s.call.id}/review/teams`,
    `/review/${s.proposal.id}`,
    `/api/v1/proposals/${s.proposal.id}`,
  ];

  it("sees no team on the committee pages, exports, API or PDF before the reveal", async () => {
    for (const url of chairUrls(anon)) {
      const res = await get(url, chair.cookie);
      expect(res.status, url).toBe(200);
      absent(res.text, anon.secrets, url);
    }
    const pdf = await binary(`/review/${anon.proposal.id}/pdf`, chair.cookie);
    absent(await pdfText(new Uint8Array(pdf.body as Buffer)), anon.secrets, "chair's proposal PDF");
    const board = await get(`/committee/${anon.call.id}/board`, chair.cookie);
    expect(board.text).toContain("PI institutions are hidden until you reveal the teams");
    const csv = await get(`/committee/${anon.call.id}/ranked-list.csv`, chair.cookie);
    expect(csv.text.split("\n")[1]).toContain(",hidden,");
  });

  it("of a named call sees the PI's institution on the same pages", async () => {
    const texts = await Promise.all(chairUrls(named).map(async (url) => (await get(url, chair.cookie)).text));
    expect(texts[0]).toContain("Brindlewood Institute Named"); // progress per proposal
    expect(texts[2]).toContain("Brindlewood Institute Named"); // the board
    expect(texts[3]).toContain("Brindlewood Institute Named"); // the CSV
  });

  it("cannot reveal the teams before every grade is in: 409 with the reason, nothing stored, no audit row", async () => {
    const api = await (await request()).post(`/api/v1/calls/${anon.call.id}/review/teams`).set(json(chair.cookie)).send({});
    expect(api.status).toBe(409);
    expect(api.body.error).toMatch(/1 of 1 grades are not in yet/);
    const page = await (await request()).post(`/committee/${anon.call.id}`).set("Cookie", chair.cookie).type("form").send(form({ intent: "reveal" }));
    expect(page.status).toBe(409);
    expect(page.text).toContain("grades are not in yet");
    expect((await CallReview.findOne({ where: { callId: anon.call.id } }))!.teamsRevealedAt).toBeNull();
    expect(await AuditEntry.count({ where: { action: "review.teams_revealed", entityId: anon.call.id } })).toBe(0);
    const named409 = await (await request()).post(`/api/v1/calls/${named.call.id}/review/teams`).set(json(chair.cookie)).send({});
    expect(named409.status).toBe(409);
    expect(named409.body.error).toMatch(/not dual-anonymous/);
  });

  it("reveals them once the grade is submitted (audited); the reviewer still sees no team", async () => {
    const grade = await (await request()).put(`/api/v1/review/assignments/${assignmentId}`).set(json(reviewer.cookie)).send({ science: 8, feasibility: 7, legacy: 6, overall: 7.5, commentToPi: longComment, submit: true });
    expect(grade.status).toBe(200);
    const state = await get(`/api/v1/calls/${anon.call.id}/review/teams`, chair.cookie);
    expect(state.body).toMatchObject({ dualAnonymous: true, revealedAt: null, submitted: 1, expected: 1, canReveal: true });
    const res = await (await request()).post(`/api/v1/calls/${anon.call.id}/review/teams`).set(json(chair.cookie)).send({});
    expect(res.status).toBe(200);
    expect(res.body.already).toBe(false);
    const audit = await AuditEntry.findOne({ where: { action: "review.teams_revealed", entityId: anon.call.id } });
    expect(audit?.actorId).toBe(chair.user.id);
    expect((await CallReview.findOne({ where: { callId: anon.call.id } }))!.teamsRevealedAt).not.toBeNull();
    // now the chair's pages carry the team
    expect((await get(`/committee/${anon.call.id}/board`, chair.cookie)).text).toContain("Brindlewood Institute Anon");
    expect((await get(`/committee/${anon.call.id}`, chair.cookie)).text).toContain("Revealed to the chair on");
    const chairRead = await get(`/api/v1/proposals/${anon.proposal.id}`, chair.cookie);
    expect(chairRead.body.proposal.team.map((m: { name: string }) => m.name)).toContain("Orla Venmarch Anon");
    // reviewers never
    for (const [where, text] of await reviewerView(anon, reviewer)) absent(text, anon.secrets, `after the reveal: ${where}`);
    // a second reveal changes nothing and writes no second row
    const again = await (await request()).post(`/api/v1/calls/${anon.call.id}/review/teams`).set(json(chair.cookie)).send({});
    expect(again.body.already).toBe(true);
    expect(await AuditEntry.count({ where: { action: "review.teams_revealed", entityId: anon.call.id } })).toBe(1);
  });
});

describe("the PI's warnings before the deadline (dual-anonymous calls only)", () => {
  let pi: Person;
  const pages = [
    "Science goals\nWe measure the proper motions of an invented cluster field.",
    "Earlier results\nAs shown in our previous work (Pellingrove et al. 2025), the field is rich.",
    "Team resources\nReductions run at the Hollin Vale Observatory pipeline.",
  ];
  async function draftIn(visibility: "named" | "dual_anonymous") {
    const call = await testCall();
    await call.update({ teamVisibility: visibility });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Warning test programme ${visibility}` });
    await storeScienceCase({ proposalId: proposal.id, user: pi.user, file: { name: "case.pdf", type: "application/pdf", bytes: await caseWithAuthor("", pages) } });
    return { call, proposal };
  }
  beforeAll(async () => {
    pi = await newUser({ name: "Ivo Pellingrove" });
    await User.update({ institution: "Hollin Vale Observatory" }, { where: { id: pi.user.id } });
  });

  it("lists the name, the institution and the phrase with their page numbers, on the science-case tab and the readiness strip; the proposal can still be sent", async () => {
    const { proposal } = await draftIn("dual_anonymous");
    const tab = await get(`/proposals/${proposal.id}/science-case`, pi.cookie);
    expect(tab.status).toBe(200);
    const text = plain(tab.text);
    const list = text.slice(text.indexOf('data-testid="anonymity-warnings"'));
    expect(list).toMatch(/<strong>Page 2<\/strong>: a team member's name, “Pellingrove”/);
    expect(list).toMatch(/<strong>Page 2<\/strong>: a phrase about the team's own work, “our previous work”/);
    expect(list).toMatch(/<strong>Page 3<\/strong>: a team institution, “Hollin Vale Observatory”/);
    expect(list).not.toContain("<strong>Page 1</strong>");
    const strip = plain((await get(`/proposals/${proposal.id}`, pi.cookie)).text);
    expect(strip).toContain('data-testid="anonymity-summary"');
    expect(strip).toContain("may name the team on pages 2, 3 (3 findings)");
    const sent = await (await request()).post(`/proposals/${proposal.id}/submit`).set("Cookie", pi.cookie).type("form").send(form({ intent: "submit" }));
    expect(sent.status).toBe(200);
    expect((await Proposal.findByPk(proposal.id))!.status).toBe("submitted");
  });

  it("says nothing for a named call, nor after the deadline", async () => {
    const { proposal } = await draftIn("named");
    expect((await get(`/proposals/${proposal.id}/science-case`, pi.cookie)).text).not.toContain("Anonymity check");
    expect((await get(`/proposals/${proposal.id}`, pi.cookie)).text).not.toContain("anonymity-summary");
    const late = await draftIn("dual_anonymous");
    expect((await get(`/proposals/${late.proposal.id}/science-case`, pi.cookie)).text).toContain("Anonymity check");
    await late.call.update({ deadlineAt: new Date(Date.now() - 60_000) });
    expect((await get(`/proposals/${late.proposal.id}/science-case`, pi.cookie)).text).not.toContain("Anonymity check");
  });
});
