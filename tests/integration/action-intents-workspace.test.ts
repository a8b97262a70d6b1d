// Issue 9: every action of the workspace, the review desk, the sign-in and welcome pages reads its form
// through one intent union. A button the route does not have, and an id field that is not a row
// id (`abc`, `-1`, `1e3`), are a 400 whose body carries the message for the form or the field,
// never a 500 and never a change.
import { beforeAll, describe, expect, it } from "vitest";
import { CallReview, Observation, Proposal, ProposalMember, ReviewAssignment, Target, User } from "~/models/index.server";
import { instrumentOptions } from "~/lib/proposals/observations.server";
import { form, postForAnswer, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { goodTarget, pdfWithPages, readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;

// The texts the app answers with (app/lib/actions.server.ts, app/lib/forms.ts and the schemas), written out here.
const UNKNOWN_INTENT = "That button does nothing here; reload the page.";
const BAD_IDS = ["abc", "-1", "1e3"];

let pi: Person;
let reviewer: Person;
let proposalId: number;
let reviewedId: number;
let targetId: number;
let observationId: number;
let memberId: number;
let good: { instrumentId: number; filterId: number };
let callSemester: string;

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Intent Test PI" });
  reviewer = await newUser({ name: "Intent Test Reviewer", roles: ["reviewer"] });
  // not the PIs' institution, or the pair would be a conflict and the page a 404
  await User.update({ institution: "Intent Test Reviewing Observatory" }, { where: { id: reviewer.user.id } });
  const call = await testCall();
  callSemester = call.semesterCode;
  proposalId = (await readyProposal({ user: pi.user, callId: call.id, title: "Intent test programme" })).proposal.id;
  targetId = (await Target.findOne({ where: { proposalId } }))!.id;
  observationId = (await Observation.findOne({ where: { proposalId } }))!.id;
  memberId = (await ProposalMember.findOne({ where: { proposalId, role: "pi" } }))!.id;
  const [option] = await instrumentOptions({ callId: call.id });
  good = { instrumentId: option.instrumentId, filterId: option.filters[0].id };

  // a proposal of another PI in review, with the reviewer's committed assignment on it
  const other = await newUser({ name: "Intent Test Reviewed PI" });
  const reviewCall = await testCall();
  const reviewed = (await readyProposal({ user: other.user, callId: reviewCall.id, title: "Intent test programme under review" })).proposal;
  await Proposal.update({ status: "in_review", code: `001/${reviewCall.semesterCode.slice(2)}`, serial: 1, submittedAt: new Date() }, { where: { id: reviewed.id } });
  await reviewCall.update({ deadlineAt: new Date(Date.now() - 3_600_000) });
  await CallReview.create({ callId: reviewCall.id, reviewDeadlineAt: new Date(Date.now() + 10 * 86_400_000), perProposal: 1, startedAt: new Date(), committedAt: new Date() });
  await ReviewAssignment.create({ callId: reviewCall.id, proposalId: reviewed.id, reviewerId: reviewer.user.id, committedAt: new Date() });
  reviewedId = reviewed.id;
});

async function post(path: string, cookie: string, values: Record<string, string | number>) {
  const req = (await request()).post(path).type("form");
  return (cookie ? req.set("Cookie", cookie) : req).send(form(values));
}

const observationFields = () => ({
  targetId,
  ...good,
  mode: "snr",
  snrGoal: "50",
  exposureSeconds: "",
  framesPerEpoch: "2",
  epochsPerSemester: "1",
  baselineYears: "",
  requiredPmPrecisionMasPerYr: "",
  moonCategory: "dark",
  maxAirmass: "1.8",
  seeingArcsec: "1.2",
});

/** One intent of a route: the fields it is posted with, and the message each id field gets when it is no id. */
type IdCase = { intent: string; fields: () => Record<string, string | number>; ids: Record<string, string> };
type RouteCase = { name: string; path: () => string; cookie: () => string; cases: IdCase[] };

const routes: RouteCase[] = [
  { name: "/proposals/new", path: () => "/proposals/new", cookie: () => pi.cookie, cases: [{ intent: "create", fields: () => ({ title: "An intent test draft" }), ids: { callId: "Choose a call." } }] },
  {
    name: "/proposals/:id (summary)",
    path: () => `/proposals/${proposalId}?index`,
    cookie: () => pi.cookie,
    cases: [{ intent: "save", fields: () => ({ version: "1", title: "Intent test programme", abstract: "", scienceCategory: "" }), ids: {} }],
  },
  {
    name: "/proposals/:id/targets",
    path: () => `/proposals/${proposalId}/targets`,
    cookie: () => pi.cookie,
    cases: [
      { intent: "create", fields: () => ({ ...goodTarget, name: "Intent test target" }), ids: {} },
      { intent: "update", fields: () => ({ ...goodTarget, name: "Intent test target" }), ids: { targetId: "The target must be a positive whole number." } },
      { intent: "delete", fields: () => ({}), ids: { targetId: "The target must be a positive whole number." } },
      { intent: "import", fields: () => ({ csv: "" }), ids: {} },
    ],
  },
  {
    name: "/proposals/:id/observations",
    path: () => `/proposals/${proposalId}/observations`,
    cookie: () => pi.cookie,
    cases: [
      { intent: "create", fields: observationFields, ids: { targetId: "Choose a target.", instrumentId: "Choose an instrument.", filterId: "Choose a filter." } },
      {
        intent: "update",
        fields: () => ({ ...observationFields(), observationId }),
        ids: { observationId: "The observation must be a positive whole number.", targetId: "Choose a target.", instrumentId: "Choose an instrument.", filterId: "Choose a filter." },
      },
      { intent: "delete", fields: () => ({}), ids: { observationId: "The observation must be a positive whole number." } },
    ],
  },
  {
    name: "/proposals/:id/team",
    path: () => `/proposals/${proposalId}/team`,
    cookie: () => pi.cookie,
    cases: [
      { intent: "invite", fields: () => ({ email: "" }), ids: {} },
      { intent: "designate-reviewer", fields: () => ({ memberId }), ids: { memberId: "Choose a member." } },
      { intent: "remove", fields: () => ({ memberId }), ids: { memberId: "Choose a member." } },
      { intent: "hand-over", fields: () => ({ memberId }), ids: { memberId: "Choose a member." } },
    ],
  },
  {
    name: "/proposals/:id/charges",
    path: () => `/proposals/${proposalId}/charges`,
    cookie: () => pi.cookie,
    cases: [
      { intent: "declare-pages", fields: () => ({ pages: "" }), ids: {} },
      { intent: "pay", fields: () => ({}), ids: { chargeId: "The charge must be a positive whole number." } },
    ],
  },
  {
    name: "/proposals/:id/decision",
    path: () => `/proposals/${proposalId}/decision`,
    cookie: () => pi.cookie,
    cases: [{ intent: "rate", fields: () => ({ rating: "4" }), ids: { assignmentId: "Choose a comment to rate." } }],
  },
  {
    name: "/proposals/:id/epochs",
    path: () => `/proposals/${proposalId}/epochs`,
    cookie: () => pi.cookie,
    cases: [{ intent: "accept-replan", fields: () => ({ dates: "2027-03-01" }), ids: { observationId: "The observation must be a positive whole number." } }],
  },
  {
    name: "/proposals/:id/submit",
    path: () => `/proposals/${proposalId}/submit`,
    cookie: () => pi.cookie,
    cases: ["submit", "withdraw", "reopen", "delete"].map((intent) => ({ intent, fields: () => ({}), ids: {} })),
  },
  {
    name: "/review/:id",
    path: () => `/review/${reviewedId}`,
    cookie: () => reviewer.cookie,
    cases: ["draft", "submit", "reopen", "conflict"].map((intent) => ({ intent, fields: () => ({}), ids: {} })),
  },
  { name: "/review/settings", path: () => "/review/settings", cookie: () => reviewer.cookie, cases: [{ intent: "save", fields: () => ({}), ids: {} }] },
  { name: "/welcome", path: () => "/welcome", cookie: () => pi.cookie, cases: [{ intent: "save", fields: () => ({ name: "Intent Test PI", institution: "Test Institute" }), ids: {} }] },
  { name: "/sign-in", path: () => "/sign-in", cookie: () => "", cases: ["send", "verify", "restart"].map((intent) => ({ intent, fields: () => ({}), ids: {} })) },
];

describe("an intent the route does not have is a 400 naming the form", () => {
  for (const route of routes) {
    it(`${route.name}: a bogus intent and no intent at all`, async () => {
      const fields = route.cases[0].fields();
      for (const intent of ["bogus", "", "constructor", route.cases[0].intent.toUpperCase()]) {
        const res = await post(route.path(), route.cookie(), { ...fields, intent });
        expect(res.status, `intent=${intent}`).toBe(400);
        expect(res.text, `intent=${intent}`).toContain(UNKNOWN_INTENT);
      }
      const none = await post(route.path(), route.cookie(), fields);
      expect(none.status).toBe(400);
      expect(none.text).toContain(UNKNOWN_INTENT);
    });
  }

  it("/proposals/:id/science-case (a multipart upload): a bogus intent is a 400 and nothing is stored", async () => {
    const res = await (await request())
      .post(`/proposals/${proposalId}/science-case`)
      .set("Cookie", pi.cookie)
      .field("intent", "bogus")
      .attach("file", Buffer.from(await pdfWithPages(1)), { filename: "case.pdf", contentType: "application/pdf" });
    expect(res.status).toBe(400);
    expect(res.text).toContain(UNKNOWN_INTENT);
    expect(res.text).not.toContain("Uploaded case.pdf");
  });
});

describe("an id field that is no row id is a 400 with the field's message", () => {
  for (const route of routes) {
    for (const c of route.cases) {
      for (const [field, message] of Object.entries(c.ids)) {
        it(`${route.name} intent=${c.intent}: ${field} = ${BAD_IDS.join(", ")}`, async () => {
          const before = await Promise.all([Target.count({ where: { proposalId } }), Observation.count({ where: { proposalId } }), ProposalMember.count({ where: { proposalId } })]);
          for (const id of BAD_IDS) {
            const res = await post(route.path(), route.cookie(), { ...c.fields(), intent: c.intent, [field]: id });
            expect(res.status, `${field}=${id}`).toBe(400);
            expect(res.text, `${field}=${id}`).toContain(message);
            expect(res.text, `${field}=${id}`).not.toContain(UNKNOWN_INTENT);
          }
          const after = await Promise.all([Target.count({ where: { proposalId } }), Observation.count({ where: { proposalId } }), ProposalMember.count({ where: { proposalId } })]);
          expect(after).toEqual(before);
        });
      }
    }
  }
});

describe("the proposal JSON route parses its URL id", () => {
  it.each(["abc", "-1", "1e3", "0", "99999999999"])("GET /api/v1/proposals/%s is a 400 naming proposalId", async (id) => {
    const res = await (await request()).get(`/api/v1/proposals/${id}`).set("Cookie", pi.cookie);
    expect(res.status).toBe(400);
    expect(res.headers["content-type"]).toMatch(/application\/json/);
    expect(res.body.issues).toEqual([{ path: "proposalId", message: "must be a positive whole number" }]);
  });

  it("a well-formed id still answers the team's proposal", async () => {
    const res = await (await request()).get(`/api/v1/proposals/${proposalId}`).set("Cookie", pi.cookie);
    expect(res.status).toBe(200);
    expect(res.body.proposal.title).toBe("Intent test programme");
  });
});

describe("a refused save of the summary keeps every semester ticked", () => {
  it("two ticked semesters come back in the 400's values, the title's message with them", async () => {
    const version = (await Proposal.findByPk(proposalId))!.version;
    const year = Number(callSemester.slice(0, 4));
    const next = callSemester.endsWith("A") ? `${year}B` : `${year + 1}A`;
    const { status, answer } = await postForAnswer(`/proposals/${proposalId}?index`, pi.cookie, [
      ["intent", "save"],
      ["version", version],
      ["title", ""],
      ["abstract", "Kept through a refusal."],
      ["scienceCategory", ""],
      ["isMultiSemester", "on"],
      ["semestersRequested", callSemester],
      ["semestersRequested", next],
    ]);
    expect(status).toBe(400);
    const body = answer.data as { ok: boolean; errors: Record<string, string>; values: Record<string, unknown> };
    expect(body.ok).toBe(false);
    expect(Object.keys(body.errors)).toEqual(["title"]);
    expect(body.values.semestersRequested).toEqual([callSemester, next]);
    expect(body.values.abstract).toBe("Kept through a refusal.");
    expect(body.values.isMultiSemester).toBe("on");
    expect((await Proposal.findByPk(proposalId))!.version).toBe(version);
  });
});

describe("a refused save of a reviewer's categories keeps every box ticked", () => {
  it("a known and an unknown category both come back in the 400's values", async () => {
    const { status, answer } = await postForAnswer("/review/settings", reviewer.cookie, [
      ["intent", "save"],
      ["categories", "exoplanets"],
      ["categories", "not-a-category"],
    ]);
    expect(status).toBe(400);
    const body = answer.data as { ok: boolean; errors: Record<string, string>; values: Record<string, unknown> };
    expect(body.ok).toBe(false);
    expect(body.errors).toEqual({ "categories.1": "Choose categories from the list." });
    expect(body.values.categories).toEqual(["exoplanets", "not-a-category"]);
  });
});
