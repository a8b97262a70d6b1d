// Issue 9, "one way to write a route's action": every action of the office's and the committee's
// pages answers a button it does not know, and each id field given as `abc`, `-1` or `1e3`, with a
// 400 whose body names the field (or the form, for the button) — never a 500, and nothing changed.
import { beforeAll, describe, expect, it } from "vitest";
import { UNKNOWN_INTENT } from "~/lib/actions.server";
import { astrometryProgrammes } from "~/lib/epochs/epochs.server";
import { AuditEntry, Instrument, Telescope } from "~/models/index.server";
import { form, postForAnswer, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { testCall } from "./proposals-fixtures";

const MALFORMED = ["abc", "-1", "1e3"];

type Who = "admin" | "chair";
/** One action: where it is, who may post there, and per intent the id fields with the message each one's refusal carries. */
interface ActionCase {
  path: () => string;
  who: Who;
  ids: { intent: string; field: string; message: string; extra?: Record<string, string> }[];
}

const cookies: Record<Who, string> = { admin: "", chair: "" };
const at = { telescope: 0, instrument: 0, call: 0, programme: 0 };

beforeAll(async () => {
  await ensureDatabase();
  cookies.admin = (await newUser({ name: "Intent Test Admin", roles: ["admin"] })).cookie;
  cookies.chair = (await newUser({ name: "Intent Test Chair", roles: ["chair"] })).cookie;
  at.telescope = (await Telescope.findOne({ order: [["id", "ASC"]] }))!.id;
  at.instrument = (await Instrument.findOne({ order: [["id", "ASC"]] }))!.id;
  at.call = (await testCall()).id;
  const programmes = await astrometryProgrammes();
  if (!programmes.length) throw new Error("The demo data has no accepted astrometric programme for the epoch log's page");
  at.programme = programmes[0].proposalId;
});

const formCases: ActionCase[] = [
  { path: () => "/admin/telescopes", who: "admin", ids: [] },
  { path: () => `/admin/telescopes/${at.telescope}`, who: "admin", ids: [] },
  {
    path: () => `/admin/instruments/${at.instrument}`,
    who: "admin",
    ids: [
      { intent: "updateFilter", field: "filterId", message: "The filter id must be a positive whole number.", extra: { band: "V" } },
      { intent: "deleteFilter", field: "filterId", message: "The filter id must be a positive whole number." },
    ],
  },
  { path: () => "/admin/calls/new", who: "admin", ids: [] },
  { path: () => `/admin/calls/${at.call}`, who: "admin", ids: [] },
  {
    path: () => `/admin/calls/${at.call}/decisions`,
    who: "admin",
    ids: [{ intent: "resend", field: "proposalId", message: "The proposal must be a positive whole number.", extra: { reason: "sent again in a test" } }],
  },
  { path: () => "/admin/charges", who: "admin", ids: [{ intent: "waive", field: "chargeId", message: "The charge must be a positive whole number.", extra: { reason: "waived in a test" } }] },
  {
    path: () => "/admin/users",
    who: "admin",
    ids: [
      { intent: "grant", field: "userId", message: "Choose a user.", extra: { role: "reviewer" } },
      { intent: "revoke", field: "userId", message: "Choose a user.", extra: { role: "reviewer" } },
      { intent: "sign-out-everywhere", field: "userId", message: "Choose a user." },
    ],
  },
  { path: () => "/admin/epochs", who: "admin", ids: [] },
  {
    path: () => `/admin/epochs/${at.programme}`,
    who: "admin",
    ids: [
      { intent: "record", field: "observationId", message: "observationId must be the id of one of the programme", extra: { observedAt: "2026-11-03T02:41", telescopeId: "1", frames: "5", precisionMas: "2" } },
      { intent: "record", field: "telescopeId", message: "telescopeId must be the id of a telescope.", extra: { observedAt: "2026-11-03T02:41", frames: "5", precisionMas: "2" } },
    ],
  },
  {
    path: () => `/committee/${at.call}`,
    who: "chair",
    ids: [
      { intent: "remind", field: "reviewerId", message: "Choose a reviewer from the list." },
      { intent: "reassign", field: "assignmentId", message: "The assignment must be a positive whole number; reload the page.", extra: { reviewerId: "1" } },
      { intent: "reassign", field: "reviewerId", message: "Choose a reviewer from the list.", extra: { assignmentId: "1" } },
      { intent: "reopen", field: "assignmentId", message: "The assignment must be a positive whole number; reload the page." },
    ],
  },
  {
    path: () => `/committee/${at.call}/board`,
    who: "chair",
    ids: [{ intent: "move", field: "proposalId", message: "The proposal must be a positive whole number.", extra: { chairRank: "1", reason: "moved in a test" } }],
  },
];

async function postForm(path: string, who: Who, values: Record<string, string>) {
  return (await request()).post(path).set("Cookie", cookies[who]).type("form").send(form(values));
}

async function postJson(path: string, who: Who, body: unknown) {
  return (await request()).post(path).set("Cookie", cookies[who]).set("Content-Type", "application/json").send(JSON.stringify(body));
}

describe("form actions refuse a bogus intent and malformed ids with a 400 naming the form or the field", () => {
  for (const c of formCases) {
    it(`POST ${c.path().replace(/\/\d+/g, "/:id")}`, async () => {
      const audits = await AuditEntry.count();
      const bogus = await postForm(c.path(), c.who, { intent: "explode" });
      expect(bogus.status, `${c.path()} intent=explode`).toBe(400);
      expect(bogus.text).toContain(UNKNOWN_INTENT);
      const none = await postForm(c.path(), c.who, { note: "no intent at all" });
      expect(none.status, `${c.path()} without an intent`).toBe(400);
      expect(none.text).toContain(UNKNOWN_INTENT);
      for (const id of c.ids) {
        for (const value of MALFORMED) {
          const res = await postForm(c.path(), c.who, { ...id.extra, intent: id.intent, [id.field]: value });
          expect(res.status, `${c.path()} intent=${id.intent} ${id.field}=${value}`).toBe(400);
          expect(res.text, `${c.path()} intent=${id.intent} ${id.field}=${value}`).toContain(id.message);
        }
      }
      expect(await AuditEntry.count()).toBe(audits);
    });
  }
});

describe("JSON actions refuse a bogus intent and malformed ids with a 400 naming the field", () => {
  it("POST /committee/:callId/allocation (the sheet's rows as JSON)", async () => {
    const path = `/committee/${at.call}/allocation`;
    const bogus = await postJson(path, "chair", { intent: "explode", rows: [] });
    expect(bogus.status).toBe(400);
    expect(bogus.text).toContain(UNKNOWN_INTENT);
    for (const value of MALFORMED) {
      const res = await postJson(path, "chair", { intent: "save", rows: [{ proposalId: value, tier: "", waitlisted: false, cells: [] }] });
      expect(res.status, `proposalId=${value}`).toBe(400);
      expect(res.text).toContain("The proposal id must be a positive whole number.");
    }
  });

  it("POST /api/v1/admin/users answers JSON naming the field", async () => {
    const bogus = await postJson("/api/v1/admin/users", "admin", { intent: "explode", userId: 1 });
    expect(bogus.status).toBe(400);
    expect(bogus.type).toMatch(/json/);
    expect(bogus.body.issues.map((i: { path: string }) => i.path)).toEqual(["intent"]);
    for (const intent of ["grant", "revoke", "sign-out-everywhere"]) {
      for (const value of MALFORMED) {
        const res = await postJson("/api/v1/admin/users", "admin", { intent, userId: value, role: "reviewer" });
        expect(res.status, `${intent} userId=${value}`).toBe(400);
        expect(res.type).toMatch(/json/);
        expect(res.body.issues, `${intent} userId=${value}`).toEqual([{ path: "userId", message: "Choose a user." }]);
      }
    }
    const notJson = await (await request()).post("/api/v1/admin/users").set("Cookie", cookies.admin).set("Content-Type", "application/json").send("{not json");
    expect(notJson.status).toBe(400);
    expect(notJson.body.issues[0].path).toBe("(body)");
  });
});

describe("a refused review setup keeps the panel the chair ticked", () => {
  it("two ticked reviewers come back in the 400's values, and the page without script shows both boxes ticked", async () => {
    const call = (await testCall()).id;
    const first = (await newUser({ name: "Intent Test Panel One", roles: ["reviewer"] })).user.id;
    const second = (await newUser({ name: "Intent Test Panel Two", roles: ["reviewer"] })).user.id;
    const fields: [string, string | number][] = [
      ["intent", "setup"],
      ["reviewDeadline", "next Tuesday"],
      ["perProposal", "2"],
      ["panel", first],
      ["panel", second],
    ];
    const { status, answer } = await postForAnswer(`/committee/${call}`, cookies.chair, fields);
    expect(status).toBe(400);
    const body = answer.data as { ok: boolean; intent: string; errors: Record<string, string>; values: Record<string, unknown> };
    expect(body.ok).toBe(false);
    expect(body.intent).toBe("setup");
    expect(body.errors.reviewDeadline).toBe("Enter the review deadline as date and time.");
    expect(body.values.panel).toEqual([String(first), String(second)]);

    const page = await (await request()).post(`/committee/${call}`).set("Cookie", cookies.chair).type("form").send(new URLSearchParams(fields.map(([k, v]) => [k, String(v)])).toString());
    expect(page.status).toBe(400);
    for (const id of [first, second]) expect(page.text).toContain(`<input type="checkbox" name="panel" checked="" value="${id}"/>`);
  });
});
