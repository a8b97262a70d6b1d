// The bad-input corpus (issue 7, items 8 and 9): hostile values in every field of every API route
// and form action, wrong content types, malformed and oversized bodies. Each answer is a 4xx,
// never a 5xx; JSON 400s name the fields; the server is alive afterwards.
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stripe } from "~/lib/payments/payments.server";
import { createProposal } from "~/lib/proposals/proposals.server";
import { Call, Filter, Instrument, Proposal, ProposalMember, Target, Telescope, User } from "~/models/index.server";
import { testApp } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";
import { goodTarget, testCall } from "../integration/proposals-fixtures";

let server: Server;
let base = "";
let tried = 0;

/** One request, counted; `cookie` signs it in; the Origin is the app's (as a browser's form post). */
async function send(path: string, init: { method?: string; body?: BodyInit | null; type?: string; cookie?: string; headers?: Record<string, string> } = {}) {
  tried += 1;
  const headers: Record<string, string> = { Origin: base, ...(init.headers ?? {}) };
  if (init.type) headers["Content-Type"] = init.type;
  if (init.cookie) headers.Cookie = init.cookie;
  try {
    const res = await fetch(`${base}${path}`, {
      method: init.method ?? "POST",
      body: init.body ?? undefined,
      headers,
      redirect: "manual",
      // a ReadableStream body goes out chunked, without Content-Length
      ...(init.body instanceof ReadableStream ? { duplex: "half" } : {}),
    } as RequestInit);
    const text = await res.text();
    return { status: res.status, type: res.headers.get("content-type") ?? "", text };
  } catch (error) {
    // the server dropped the connection instead of answering: status 0 fails every check below
    const cause = (error as { cause?: { code?: string } }).cause;
    return { status: 0, type: "", text: `no answer (${cause?.code ?? String(error)})` };
  }
}

type Answer = Awaited<ReturnType<typeof send>>;
const show = (a: Answer) => `${a.status} ${a.type} ${a.text.slice(0, 200)}`;

// Soft: every input of a test is tried, and each refusal that went wrong is listed.
function expect4xx(a: Answer, where: string) {
  expect.soft(a.status >= 400 && a.status < 500, `${where}: wanted a 4xx, got ${show(a)}`).toBe(true);
}

function expectNo5xx(a: Answer, where: string) {
  expect.soft(a.status > 0 && a.status < 500, `${where}: wanted no 5xx, got ${show(a)}`).toBe(true);
}

/** A JSON API's 400: `{ error, issues: [{ path, message }] }`, with at least one issue. */
function expectApiIssues(a: Answer, where: string) {
  let body: { error?: unknown; issues?: { path?: unknown; message?: unknown }[] } = {};
  try {
    body = JSON.parse(a.text);
  } catch {
    // not JSON: the checks below fail with the text
  }
  const issues = Array.isArray(body.issues) ? body.issues : [];
  const shaped = /application\/json/.test(a.type) && typeof body.error === "string" && issues.length > 0 && issues.every((i) => typeof i.path === "string" && typeof i.message === "string");
  expect.soft(shaped, `${where}: wanted { error, issues: [{ path, message }] }, got ${show(a)}`).toBe(true);
}

async function expectAlive() {
  const res = await fetch(`${base}/healthz`);
  expect(res.status).toBe(200);
  expect(((await res.json()) as { status: string }).status).toBe("ok");
}

const LONG = "x".repeat(100_000);
const HUGE_ARRAY_LENGTH = 100_000;
function nested(depth: number): unknown {
  let v: unknown = { leaf: 1 };
  for (let i = 0; i < depth; i++) v = { a: v };
  return v;
}

/** The hostile values. `raw` is written into JSON text as is (not valid JSON, or a number JSON.parse turns into Infinity). */
const values: { label: string; json?: unknown; raw?: string; form?: string | string[] }[] = [
  { label: "100 kB string", json: LONG, form: LONG },
  { label: "NaN", json: "NaN", raw: "NaN", form: "NaN" },
  { label: "Infinity", json: "Infinity", raw: "Infinity", form: "Infinity" },
  { label: "-1", json: -1, form: "-1" },
  { label: "1e309", raw: "1e309", form: "1e309" },
  { label: "not a number", json: "abc", form: "abc" },
  { label: `${HUGE_ARRAY_LENGTH}-element array`, json: Array.from({ length: HUGE_ARRAY_LENGTH }, () => 1), form: Array.from({ length: HUGE_ARRAY_LENGTH }, () => "-1") }, // never a real id
  { label: "nested object", json: nested(1000) },
];

function jsonWith(body: Record<string, unknown>, field: string, v: (typeof values)[number]) {
  const marker = "\u0000RAW\u0000";
  const copy = { ...body, [field]: v.raw !== undefined ? marker : v.json };
  return JSON.stringify(copy).replace(JSON.stringify(marker), v.raw ?? "");
}

/** 2 MB of valid JSON, 5 MB of form fields. */
const twoMbJson = () => JSON.stringify({ filler: "y".repeat(2 * 1024 * 1024) });
const fiveMbForm = () => `intent=x&filler=${"y".repeat(5 * 1024 * 1024)}`;
function chunked(text: string) {
  const bytes = new TextEncoder().encode(text);
  const size = 64 * 1024;
  let offset = 0;
  return new ReadableStream<Uint8Array>({
    pull(controller) {
      if (offset >= bytes.length) return controller.close();
      controller.enqueue(bytes.subarray(offset, offset + size));
      offset += size;
    },
  });
}
const brokenMultipart = { type: "multipart/form-data; boundary=----nightshare", body: "------nightshare\r\nContent-Disposition: form-data; name=\"intent\"\r\n\r\nx\r\n------nightsh" };

// ---------------------------------------------------------------------------------------------

type JsonRoute = { path: string; body: () => Record<string, unknown>; cookie?: () => Promise<string>; negativeOk?: string[]; sign?: boolean; method?: "PUT"; emptyBodyValid?: boolean };
let admin = "";
let chair = "";
/** A call of its own with nothing on its board (the chair's routes are tried against it). */
let boardCallId = 0;
let targetUserId = 0;

const jsonRoutes: JsonRoute[] = [
  {
    path: "/api/v1/exposure",
    negativeOk: ["magnitude"], // a star brighter than 0 mag is a star
    body: () => ({
      band: "V",
      magnitude: 19,
      snr: 30,
      airmass: 1.2,
      seeingArcsec: 1.1,
      moonCategory: "grey",
      telescope: { apertureM: 2.4, centralObstruction: 0.3 },
      instrument: { throughput: 0.55, pixelScaleArcsec: 0.35, readNoiseE: 4, darkEPerPixelPerS: 0.001, fullWellE: 90000 },
    }),
  },
  {
    path: "/api/v1/astrometry",
    negativeOk: ["decDeg"],
    body: () => ({ raDeg: 84.2, decDeg: 18.5, epochs: ["2027-09-15", "2028-03-01", "2028-09-15"], positionalPrecisionMas: 3 }),
  },
  {
    path: "/api/v1/epoch-plan",
    body: () => ({
      site: { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" },
      target: { ra: "05:36:48", dec: "+18:30:00" },
      firstDate: "2027-08-01",
      baselineYears: 2,
      epochs: 6,
      perEpochPrecisionMas: 4,
      maxAirmass: 1.6,
      secondsPerEpoch: 1200,
    }),
  },
  { path: "/api/v1/admin/users", cookie: async () => admin, body: () => ({ intent: "grant", userId: targetUserId, role: "reviewer" }) },
  // the ranking board and the allocation (issue 12); the call's board is empty, so no good body changes anything
  { get path() { return `/api/v1/calls/${boardCallId}/board/rank`; }, cookie: async () => chair, body: () => ({ proposalId: ids.proposal, chairRank: 1, reason: "hostile input" }) },
  {
    get path() { return `/api/v1/calls/${boardCallId}/allocation`; },
    method: "PUT",
    cookie: async () => chair,
    body: () => ({ rows: [{ proposalId: ids.proposal, telescopeId: ids.telescope, moonCategory: "dark", semesterCode: "2027A", hours: 5 }], tiers: [{ proposalId: ids.proposal, tier: "queue" }] }),
  },
  { get path() { return `/api/v1/calls/${boardCallId}/allocation/unlock`; }, cookie: async () => chair, body: () => ({ reason: "hostile input" }) },
  // an empty JSON body is a valid check (the defaults): that case is left out here (a check would be queued)
  { get path() { return `/api/v1/calls/${boardCallId}/semester-check`; }, cookie: async () => chair, emptyBodyValid: true, body: () => ({ realisations: 1, seed: 7 }) },
  {
    path: "/api/v1/payments/webhook",
    sign: true,
    body: () => ({ id: `evt_bad_${Date.now()}`, object: "event", type: "checkout.session.completed", created: Math.floor(Date.now() / 1000), livemode: false, data: { object: { id: "cs_test_bad", object: "checkout.session", payment_status: "paid" } } }),
  },
];

function signed(payload: string) {
  return { "Stripe-Signature": stripe.webhooks.generateTestHeaderString({ payload, secret: process.env.STRIPE_WEBHOOK_SECRET! }) };
}

// ---------------------------------------------------------------------------------------------

type Kind = "id" | "number" | "text";
type FormRoute = { path: () => string; who: "anonymous" | "owner" | "admin" | "fresh" | "chair"; intents: (string | undefined)[]; fields: Record<string, Kind>; multipart?: boolean };

const ids = { proposal: 0, target: 0, telescope: 0, instrument: 0, call: 0, filter: 0, filters: 0, weatherTelescope: 0 };
let owner = "";

const officeTelescope: Record<string, Kind> = { name: "text", siteName: "text", latitudeDeg: "number", longitudeDeg: "number", elevationM: "number", timeZone: "text", apertureM: "number", centralObstruction: "number" };
const officeInstrument: Record<string, Kind> = { name: "text", pixelScaleArcsec: "number", readNoiseE: "number", darkEPerPixelPerS: "number", gainEPerAdu: "number", fullWellE: "number", readoutSeconds: "number", acquisitionSeconds: "number", astrometricFloorMas: "number", throughput: "number" };
const officeFilter: Record<string, Kind> = { band: "text", zeroPointPhotons: "number", extinctionMagPerAirmass: "number", skyDarkMag: "number", skyGreyMag: "number", skyBrightMag: "number", filterId: "id" };
const officeCall: Record<string, Kind> = { semesterCode: "text", title: "text", opensAt: "text", deadlineAt: "text", semesterStart: "text", semesterEnd: "text", pageLimit: "number", currency: "text", accessFee: "number", pageCharge: "number" };

const formRoutes: FormRoute[] = [
  { path: () => "/sign-in", who: "anonymous", intents: ["send", "verify", "bogus"], fields: { email: "text", code: "text", redirectTo: "text", intent: "text" } },
  { path: () => "/welcome", who: "fresh", intents: ["save", "bogus"], fields: { name: "text", institution: "text" } },
  { path: () => "/proposals/new", who: "owner", intents: ["create", "bogus"], fields: { callId: "id", title: "text", abstract: "text" } },
  {
    path: () => `/proposals/${ids.proposal}?index`,
    who: "owner",
    intents: ["save", "bogus"],
    fields: { version: "id", title: "text", abstract: "text", scienceCategory: "text", isMultiSemester: "text", semestersRequested: "text", isTargetOfOpportunity: "text" },
  },
  { path: () => `/proposals/${ids.proposal}/team`, who: "owner", intents: ["invite", "remove", "hand-over", "bogus"], fields: { email: "text", memberId: "id", intent: "text" } },
  { path: () => `/proposals/${ids.proposal}/targets`, who: "owner", intents: ["import"], fields: { csv: "text" } },
  {
    path: () => `/proposals/${ids.proposal}/targets`,
    who: "owner",
    intents: ["create", "update", "delete"],
    fields: { name: "text", ra: "number", dec: "number", pmra: "number", pmdec: "number", magnitude: "number", band: "text", notes: "text", targetId: "id" },
  },
  {
    path: () => `/proposals/${ids.proposal}/observations`,
    who: "owner",
    intents: ["create", "update", "delete"],
    fields: {
      observationId: "id",
      targetId: "id",
      instrumentId: "id",
      filterId: "id",
      mode: "text",
      snrGoal: "number",
      exposureSeconds: "number",
      framesPerEpoch: "number",
      epochsPerSemester: "number",
      baselineYears: "number",
      requiredPmPrecisionMasPerYr: "number",
      moonCategory: "text",
      maxAirmass: "number",
      seeingArcsec: "number",
    },
  },
  { path: () => `/proposals/${ids.proposal}/science-case`, who: "owner", intents: ["upload", "bogus"], fields: { file: "text" }, multipart: true },
  { path: () => `/proposals/${ids.proposal}/submit`, who: "owner", intents: [undefined], fields: { intent: "text" } },
  { path: () => `/proposals/${ids.proposal}/charges`, who: "owner", intents: ["declare-pages", "pay", "bogus"], fields: { pages: "number", chargeId: "id", intent: "text" } },
  { path: () => "/admin/users", who: "admin", intents: ["grant", "revoke"], fields: { userId: "id", role: "text", intent: "text" } },
  { path: () => "/admin/telescopes", who: "admin", intents: ["create"], fields: officeTelescope },
  // never "delete": that would remove the seeded telescope, instrument or call
  { path: () => `/admin/telescopes/${ids.telescope}`, who: "admin", intents: ["update", "bogus"], fields: officeTelescope },
  { path: () => `/admin/telescopes/${ids.telescope}`, who: "admin", intents: ["createInstrument"], fields: officeInstrument },
  { path: () => `/admin/instruments/${ids.instrument}`, who: "admin", intents: ["update"], fields: officeInstrument },
  { path: () => `/admin/instruments/${ids.instrument}`, who: "admin", intents: ["createFilter", "updateFilter", "deleteFilter"], fields: officeFilter },
  // the expected clear nights on a telescope of its own (a valid body replaces all twelve months)
  { path: () => `/admin/telescopes/${ids.weatherTelescope}`, who: "admin", intents: ["clearFractions"], fields: Object.fromEntries(Array.from({ length: 12 }, (_, i) => [`m${i + 1}`, "number" as Kind])) },
  // the ranking board's form (never "fill" or "lock": they change the call's state by design)
  { path: () => `/committee/${boardCallId}/board`, who: "chair", intents: ["move", "unlock", "bogus"], fields: { proposalId: "id", chairRank: "number", reason: "text", intent: "text" } },
  { path: () => "/admin/calls/new", who: "admin", intents: ["create", "bogus"], fields: officeCall },
  { path: () => `/admin/calls/${ids.call}`, who: "admin", intents: ["update", "bogus"], fields: officeCall },
  // one hostile field at a time: a template never has both its subject and body, so nothing is saved
  { path: () => `/admin/calls/${ids.call}/decisions`, who: "admin", intents: ["send-all", "resend", "save-template", "bogus"], fields: { proposalId: "id", reason: "text", outcome: "text", subject: "text", body: "text", intent: "text" } },
  { path: () => "/admin/charges", who: "admin", intents: ["waive", "bogus"], fields: { chargeId: "id", reason: "text", intent: "text" } },
];

async function cookieFor(who: FormRoute["who"]) {
  if (who === "anonymous") return "";
  if (who === "admin") return admin;
  if (who === "chair") return chair;
  if (who === "owner") return owner;
  return (await newUser()).cookie;
}

function formBody(intent: string | undefined, field: string, value: string | string[]) {
  const p = new URLSearchParams();
  if (intent !== undefined && field !== "intent") p.append("intent", intent);
  for (const v of Array.isArray(value) ? value : [value]) p.append(field, v);
  return p.toString();
}

function multipartBody(intent: string | undefined, field: string, value: string | string[]) {
  const f = new FormData();
  if (intent !== undefined && field !== "intent") f.append("intent", intent);
  for (const v of Array.isArray(value) ? value : [value]) f.append(field, v);
  return f;
}

/** Which hostile values must be refused (4xx) in a field of this kind; the rest must only not crash. */
function mustRefuse(kind: Kind, label: string) {
  if (label === "100 kB string") return true; // longer than every column
  if (kind === "id") return true;
  if (kind === "number") return ["NaN", "Infinity", "1e309", "not a number", "100 kB string"].includes(label);
  return false;
}

// ---------------------------------------------------------------------------------------------

beforeAll(async () => {
  await ensureDatabase();
  const app = await testApp();
  server = createServer(app);
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  admin = await sessionCookieFor("admin@kestrel-ridge.example");
  chair = await sessionCookieFor("chair@kestrel-ridge.example");
  boardCallId = (await testCall()).id;
  targetUserId = (await newUser()).user.id;
  // a draft of a fresh PI, with a target and a call open now, so that nothing seeded is touched
  const pi = await newUser({ name: "Bad Input PI" });
  owner = pi.cookie;
  const call = await Call.findOne({ where: { semesterCode: demoCallPlan().open.semesterCode } });
  const proposal = await createProposal({ user: { id: pi.user.id, email: pi.email, roles: [] } as never, callId: call!.id, title: "A proposal for hostile input", abstract: "" });
  ids.proposal = proposal.id;
  const target = await Target.create({ proposalId: proposal.id, name: goodTarget.name, raDeg: 196.33, decDeg: 22.17, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 15.5, band: "V", notes: null } as never);
  ids.target = target.id;
  ids.telescope = (await Telescope.findOne({ order: [["id", "ASC"]] }))!.id;
  ids.weatherTelescope = (await Telescope.create({ name: `Bad input weather ${Date.now()}`, siteName: "Nowhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 })).id;
  ids.instrument = (await Instrument.findOne({ order: [["id", "ASC"]] }))!.id;
  ids.filter = (await Filter.findOne({ where: { instrumentId: ids.instrument } }))?.id ?? 0;
  ids.filters = await Filter.count();
  ids.call = call!.id;
  expect(await ProposalMember.count({ where: { proposalId: proposal.id } })).toBe(1);
});

afterAll(async () => {
  // testCall() offers every telescope: the weather one must not outlive this file
  if (ids.weatherTelescope) await Telescope.destroy({ where: { id: ids.weatherTelescope } });
  console.log(`security bad-input corpus: ${tried} hostile requests sent`);
  await new Promise<void>((resolve) => server?.close(() => resolve()));
});

describe("JSON API routes refuse hostile fields with a 400 naming them", () => {
  for (const route of jsonRoutes) {
    it(`${route.method ?? "POST"} ${route.path.replace(/\/calls\/\d+/, "/calls/:callId")}: every field × every hostile value`, { timeout: 300_000 }, async () => {
      const cookie = route.cookie ? await route.cookie() : "";
      const body = route.body();
      const fields = route.sign ? ["id", "data", "created"] : Object.keys(body);
      for (const field of fields) {
        for (const v of values) {
          const text = jsonWith(body, field, v);
          const where = `${route.path} ${field} = ${v.label}`;
          const a = await send(route.path, { method: route.method, body: text, type: "application/json", cookie, headers: route.sign ? signed(text) : {} });
          if (v.label === "-1" && route.negativeOk?.includes(field)) expectNo5xx(a, where);
          else {
            expect4xx(a, where);
            if (a.status === 400) expectApiIssues(a, where);
          }
        }
      }
      await expectAlive();
    });

    it(`${route.method ?? "POST"} ${route.path.replace(/\/calls\/\d+/, "/calls/:callId")}: wrong content types, malformed and oversized bodies`, { timeout: 120_000 }, async () => {
      const cookie = route.cookie ? await route.cookie() : "";
      const good = JSON.stringify(route.body());
      const cases: { label: string; body: BodyInit; type?: string; status?: number }[] = [
        { label: "malformed JSON", body: '{"band": "V", ', type: "application/json" },
        { label: "JSON null", body: "null", type: "application/json" },
        { label: "JSON array", body: "[1,2,3]", type: "application/json" },
        { label: "empty body", body: "", type: "application/json" },
        { label: "text/plain", body: good, type: "text/plain" },
        { label: "form-encoded", body: "band=V&magnitude=19", type: "application/x-www-form-urlencoded" },
        { label: "multipart", body: brokenMultipart.body, type: brokenMultipart.type },
        { label: "2 MB JSON", body: twoMbJson(), type: "application/json", status: 413 },
        { label: "2 MB JSON, chunked without Content-Length", body: chunked(twoMbJson()), type: "application/json", status: 413 },
      ];
      for (const c of cases) {
        if (c.label === "empty body" && route.emptyBodyValid) continue;
        const where = `${route.path} ${c.label}`;
        const a = await send(route.path, { method: route.method, body: c.body, type: c.type, cookie, headers: route.sign && typeof c.body === "string" ? signed(c.body) : {} });
        expect4xx(a, where);
        if (c.status) expect.soft(a.status, `${where}: ${show(a)}`).toBe(c.status);
        if (a.status === 400) expectApiIssues(a, where);
        if (c.status === 413 && a.status === 413) expect.soft(a.type, `${where}: the 413 is JSON`).toMatch(/application\/json/);
      }
      await expectAlive();
    });
  }

  it("GET /api/v1/visibility refuses hostile query values with a 400 naming them", { timeout: 120_000 }, async () => {
    const good: Record<string, string> = { lat: "31.3", lon: "-108.7", elevation: "2100", timeZone: "America/Denver", ra: "05:36:48", dec: "+18:30:00", from: "2027-03-01", nights: "3" };
    for (const field of Object.keys(good)) {
      for (const v of ["NaN", "Infinity", "1e309", "abc", "x".repeat(5000)]) {
        const q = new URLSearchParams({ ...good, [field]: v });
        const a = await send(`/api/v1/visibility?${q}`, { method: "GET" });
        expect4xx(a, `visibility ${field}=${v.slice(0, 12)}`);
        if (a.status === 400) expectApiIssues(a, `visibility ${field}=${v.slice(0, 12)}`);
      }
    }
    await expectAlive();
  });
});

describe("ids in URLs", () => {
  const badIds = ["NaN", "Infinity", "-1", "0", "1e309", "abc", "1.5", "9".repeat(400)];
  it("every parameterised route answers 400 or 404 to a malformed id, GET and POST", { timeout: 300_000 }, async () => {
    const pi = await sessionCookieFor("pi@kestrel-ridge.example");
    const paths = (id: string) => [
      [`/api/v1/proposals/${id}`, pi],
      [`/proposals/${id}`, pi],
      [`/proposals/${id}/team`, pi],
      [`/proposals/${id}/targets`, pi],
      [`/proposals/${id}/observations`, pi],
      [`/proposals/${id}/feasibility`, pi],
      [`/proposals/${id}/science-case`, pi],
      [`/proposals/${id}/change-log`, pi],
      [`/proposals/${id}/epochs`, pi],
      [`/api/v1/proposals/${id}/epochs`, admin],
      [`/admin/epochs/${id}`, admin],
      [`/proposals/${id}/charges`, pi],
      [`/proposals/${id}/charges/${id}/receipt.pdf`, pi],
      [`/api/v1/proposals/${id}/charges`, pi],
      [`/api/v1/proposals/${id}/feasibility?observationId=1`, pi],
      [`/proposals/${id}/submit`, pi],
      [`/proposals/${id}/pdf`, pi],
      [`/proposals/${id}/files/${id}`, pi],
      [`/admin/telescopes/${id}`, admin],
      [`/admin/instruments/${id}`, admin],
      [`/admin/calls/${id}`, admin],
      [`/api/v1/calls/${id}/board`, chair],
      [`/api/v1/calls/${id}/reproducibility`, chair],
      [`/api/v1/calls/${id}/ra-pressure?telescopeId=${ids.telescope}`, chair],
      [`/api/v1/calls/${boardCallId}/ra-pressure?telescopeId=${id}`, chair],
      [`/api/v1/semester-checks/${id}`, chair],
      [`/committee/${id}/board`, chair],
      [`/committee/${id}/allocation`, chair],
      [`/committee/${id}/ranked-list.csv`, chair],
      [`/committee/${id}/allocation.csv`, chair],
      [`/committee/${boardCallId}/proposals/${id}/epochs.ics`, chair],
    ];
    for (const id of badIds) {
      for (const [path, cookie] of paths(encodeURIComponent(id))) {
        const got = await send(path, { method: "GET", cookie });
        expect.soft([400, 404], `GET ${path}: ${show(got)}`).toContain(got.status);
        const posted = await send(path, { body: "intent=update", type: "application/x-www-form-urlencoded", cookie });
        expect4xx(posted, `POST ${path}`);
      }
    }
    await expectAlive();
  });
});

describe("form actions refuse hostile fields and bodies with a 4xx", () => {
  for (const route of formRoutes) {
    it(`POST ${route.path().replace(/\d+/g, ":id")} (${route.intents.map((i) => i ?? "—").join(", ")}): every field × hostile value`, { timeout: 600_000 }, async () => {
      const path = route.path();
      const cookie = await cookieFor(route.who);
      // the 100 000-element array is heavy to build and parse: once per intent, in its first id field (else its first field)
      const fields = Object.entries(route.fields);
      const arrayField = (fields.find(([, kind]) => kind === "id") ?? fields[0])[0];
      // every field under the first intent; under the others, the ids and the intent (what differs between intents)
      for (const [n, intent] of route.intents.entries()) {
        for (const [field, kind] of fields) {
          if (n > 0 && kind !== "id" && field !== "intent") continue;
          for (const v of values) {
            if (v.form === undefined) continue;
            if (Array.isArray(v.form) && field !== arrayField) continue;
            const where = `${path} intent=${intent} ${field} = ${v.label}`;
            const a = route.multipart
              ? await send(path, { body: multipartBody(intent, field, v.form), cookie })
              : await send(path, { body: formBody(intent, field, v.form), type: "application/x-www-form-urlencoded", cookie: route.who === "fresh" ? await cookieFor("fresh") : cookie });
            if (mustRefuse(kind, v.label)) expect4xx(a, where);
            else expectNo5xx(a, where);
          }
          // a field name with brackets, as some form libraries send nested objects
          const nestedName = await send(path, { body: `intent=${intent ?? ""}&${field}[a][b][c]=1`, type: "application/x-www-form-urlencoded", cookie });
          expectNo5xx(nestedName, `${path} ${field}[a][b][c]`);
        }
      }
      await expectAlive();
    });

    // the whole-body cases once per URL (some URLs have two lines above, one per group of intents)
    if (formRoutes.findIndex((r) => r.path() === route.path()) !== formRoutes.indexOf(route)) continue;
    it(`POST ${route.path().replace(/\d+/g, ":id")}: JSON, text/plain, broken multipart and oversized bodies`, { timeout: 120_000 }, async () => {
      const path = route.path();
      const cookie = await cookieFor(route.who);
      const cases: { label: string; body: BodyInit; type: string; status?: number }[] = [
        { label: "JSON to a form action", body: JSON.stringify({ intent: route.intents[0] ?? "x", [Object.keys(route.fields)[0]]: 1 }), type: "application/json" },
        { label: "text/plain", body: "intent=x", type: "text/plain" },
        { label: "broken multipart", body: brokenMultipart.body, type: brokenMultipart.type },
        // the targets tab takes up to 6.25 MB (a 2 MB CSV, URL-encoded), so 5 MB is under its limit there
        { label: "5 MB form", body: fiveMbForm(), type: "application/x-www-form-urlencoded", status: route.multipart || path.endsWith("/targets") ? undefined : 413 },
        { label: "5 MB form, chunked without Content-Length", body: chunked(fiveMbForm()), type: "application/x-www-form-urlencoded", status: route.multipart || path.endsWith("/targets") ? undefined : 413 },
      ];
      for (const c of cases) {
        const where = `${path} ${c.label}`;
        const a = await send(path, { body: c.body, type: c.type, cookie });
        expect4xx(a, where);
        if (c.status) expect.soft(a.status, `${where}: ${show(a)}`).toBe(c.status);
      }
      await expectAlive();
    });
  }

  it("left the seeded data and the fresh draft in place", async () => {
    expect(await Proposal.findByPk(ids.proposal)).not.toBeNull();
    expect(await Target.findByPk(ids.target)).not.toBeNull();
    expect(await Telescope.findByPk(ids.telescope)).not.toBeNull();
    expect(await Instrument.findByPk(ids.instrument)).not.toBeNull();
    expect(await Filter.count()).toBeGreaterThanOrEqual(ids.filters);
    expect(await User.findOne({ where: { email: "admin@kestrel-ridge.example" } })).not.toBeNull();
  });
});
