// The role × route matrix: every URL of app/routes.ts, for every kind of person, GET and POST.
// Who may do what is written out below; a route added to app/routes.ts without a line here
// fails the suite. Parameterised routes are tried with seeded ids: pi@'s own draft (A) and
// pi2@'s draft (B, "another PI's proposal"), and a file of B under A's id.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { request } from "../helpers/app";
import { appOrigin, cookieOf, fill, flattenRoutes, people, seededIds, type Person, type SeededIds } from "./fixtures";

/**
 * anyone: no sign-in needed · signedIn: any account · member: PI or Co-I of that proposal (others
 * get 404, as if it did not exist) · reviewer/chair/admin: that role (others 403) · none: the
 * method is not offered (405 for everyone) · committee: the chair and the proposal's assigned
 * reviewers, for proposals past the draft stage; the seeded A and B are drafts, so every signed-in
 * person gets 404 (the committee's own access is tested in tests/integration/review.test.ts) ·
 * office: admin or observer (the epoch log; others 403) · memberOrAdmin: the team and the admin (others 404).
 */
type Who = "anyone" | "signedIn" | "member" | "committee" | "reviewer" | "chair" | "admin" | "none" | "office" | "memberOrAdmin";
type Rule = {
  get: Who;
  post: Who;
  /** the status an allowed GET answers with no query (default 200) */
  getOk?: number | ((person: Person) => number);
};

const signedInGoesHome = (person: Person) => (person === "anonymous" ? 200 : 302);

const expectations: Record<string, Rule> = {
  "/healthz": { get: "anyone", post: "none" },
  "/api/v1/payments/webhook": { get: "none", post: "anyone" },
  "/api/v1/visibility": { get: "anyone", post: "none", getOk: 400 }, // no query: 400 naming the fields
  "/api/v1/exposure": { get: "none", post: "anyone" },
  "/api/v1/astrometry": { get: "none", post: "anyone" },
  "/api/v1/epoch-plan": { get: "none", post: "anyone" },
  "/api/v1/admin/users": { get: "admin", post: "admin" },
  "/api/v1/proposals": { get: "signedIn", post: "none" },
  "/api/v1/proposals/:proposalId": { get: "member", post: "none" },
  // observers read accepted programmes only (A and B are drafts: 404 for them); tested in epoch-log.test.ts
  "/api/v1/proposals/:proposalId/epochs": { get: "memberOrAdmin", post: "office" }, // the probe body: 400
  "/api/v1/proposals/:proposalId/charges": { get: "member", post: "none" },
  "/api/v1/proposals/:proposalId/feasibility": { get: "member", post: "none", getOk: 400 }, // no observationId: 400 naming it
  // no charge with the seeded id: 404 for every signed-in person (the PI's own: charges-pay.test.ts)
  "/api/v1/charges/:chargeId/checkout": { get: "none", post: "member" },
  "/api/v1/admin/charges": { get: "admin", post: "none" },
  // the seeded drafts have no paid charge: 404 for the team too (the receipt itself: charges-pay.test.ts)
  "/proposals/:proposalId/charges/:chargeId/receipt.pdf": { get: "member", post: "none", getOk: 404 },
  "/admin/charges.csv": { get: "admin", post: "none" },
  "/proposals/:proposalId/pdf": { get: "member", post: "none" },
  "/proposals/:proposalId/decision-letter.pdf": { get: "member", post: "none", getOk: 404 }, // the seeded drafts have no letter
  "/proposals/:proposalId/files/:fileId": { get: "member", post: "none" },
  "/api/v1/calls/:callId/review": { get: "chair", post: "none" },
  "/api/v1/calls/:callId/review/suggest": { get: "none", post: "chair" },
  "/api/v1/calls/:callId/review/assignments": { get: "none", post: "none" }, // PUT (tested in review.test.ts)
  // the seeded call is named: the POST is a 409 (dual-anonymous reveals in review-anonymity.test.ts)
  "/api/v1/calls/:callId/review/teams": { get: "chair", post: "chair" },
  "/api/v1/calls/:callId/reviews": { get: "chair", post: "none" },
  "/api/v1/calls/:callId/board": { get: "chair", post: "none" },
  "/api/v1/calls/:callId/board/rank": { get: "none", post: "chair" },
  "/api/v1/calls/:callId/ra-pressure": { get: "chair", post: "none", getOk: 400 }, // no telescopeId: 400 naming it
  "/api/v1/calls/:callId/reproducibility": { get: "chair", post: "none" },
  "/api/v1/calls/:callId/allocation": { get: "none", post: "none" }, // PUT (tested in board.test.ts)
  "/api/v1/calls/:callId/allocation/fill-by-rank": { get: "none", post: "chair" },
  "/api/v1/calls/:callId/allocation/lock": { get: "none", post: "chair" },
  "/api/v1/calls/:callId/allocation/unlock": { get: "none", post: "chair" },
  "/api/v1/calls/:callId/semester-check": { get: "none", post: "chair" }, // the probe's unknown field: 400
  "/api/v1/semester-checks/:id": { get: "chair", post: "none", getOk: 404 }, // no check with the seeded ids
  // 200: the chair's probe of allocation/lock (earlier in this table's order) has locked the seeded
  // open call by then; the 409 of an unlocked call is tested in tests/integration/decisions.test.ts
  "/api/v1/calls/:callId/decisions": { get: "admin", post: "none" },
  "/api/v1/calls/:callId/decisions/send": { get: "none", post: "admin" }, // the probe's unknown field: 400
  "/api/v1/decision-batches/:id": { get: "admin", post: "none", getOk: 404 }, // no batch with the seeded ids
  "/api/v1/review/assignments": { get: "reviewer", post: "none" },
  "/api/v1/review/assignments/:assignmentId": { get: "none", post: "none" }, // PUT (tested in review.test.ts)
  "/api/v1/review/assignments/:assignmentId/conflict": { get: "none", post: "reviewer" }, // the probe body lacks a reason: 400
  "/review/:proposalId/pdf": { get: "committee", post: "none" },
  "/review/:proposalId/files/:fileId": { get: "committee", post: "none" },
  "/sign-in/link": { get: "anyone", post: "none", getOk: 302 }, // no token: back to /sign-in
  "/sign-out": { get: "anyone", post: "anyone", getOk: 302 },
  "/?index": { get: "anyone", post: "none" },
  "/sign-in": { get: "anyone", post: "anyone", getOk: signedInGoesHome },
  "/welcome": { get: "signedIn", post: "signedIn" },
  "/sky-tools": { get: "anyone", post: "none" },
  "/review": { get: "reviewer", post: "none" },
  "/review/settings": { get: "reviewer", post: "reviewer" },
  "/review/:proposalId": { get: "committee", post: "committee" },
  "/committee": { get: "chair", post: "none" },
  "/committee/:callId": { get: "chair", post: "chair" },
  "/committee/:callId/assignments": { get: "chair", post: "none" },
  "/committee/:callId/board": { get: "chair", post: "chair" },
  "/committee/:callId/allocation": { get: "chair", post: "chair" },
  "/committee/:callId/ranked-list.csv": { get: "chair", post: "none" },
  "/committee/:callId/allocation.csv": { get: "chair", post: "none" },
  // the seeded A and B are drafts, on no board: 404 for the chair too (tested in allocation-sheet.test.ts)
  "/committee/:callId/proposals/:proposalId/epochs.ics": { get: "chair", post: "none", getOk: 404 },
  "/proposals?index": { get: "signedIn", post: "none" },
  "/proposals/new": { get: "signedIn", post: "signedIn" },
  "/proposals/:proposalId": { get: "member", post: "none" },
  "/proposals/:proposalId?index": { get: "member", post: "member" },
  "/proposals/:proposalId/team": { get: "member", post: "member" },
  "/proposals/:proposalId/targets": { get: "member", post: "member" },
  "/proposals/:proposalId/observations": { get: "member", post: "member" },
  "/proposals/:proposalId/feasibility": { get: "member", post: "none" },
  "/proposals/:proposalId/science-case": { get: "member", post: "member" },
  "/proposals/:proposalId/change-log": { get: "member", post: "none" },
  "/proposals/:proposalId/epochs": { get: "member", post: "member" }, // the probe: 400 (intent must be accept-replan)
  "/proposals/:proposalId/decision": { get: "member", post: "member" }, // the helpfulness rating; the probe: 400 (rating access: distributed-review.test.ts)
  "/proposals/:proposalId/charges": { get: "member", post: "member" },
  "/proposals/:proposalId/submit": { get: "member", post: "member", getOk: 302 }, // a GET goes to the summary
  "/calls": { get: "anyone", post: "none" },
  "/admin?index": { get: "admin", post: "none" },
  "/admin/users": { get: "admin", post: "admin" },
  "/admin/telescopes": { get: "admin", post: "admin" },
  "/admin/telescopes/:telescopeId": { get: "admin", post: "admin" },
  "/admin/instruments/:instrumentId": { get: "admin", post: "admin" },
  "/admin/calls": { get: "admin", post: "none" },
  "/admin/calls/new": { get: "admin", post: "admin" },
  "/admin/calls/:callId": { get: "admin", post: "admin" },
  "/admin/epochs": { get: "office", post: "office" },
  // A and B are drafts, not accepted astrometry programmes: 404 for the office too (tested in epoch-log.test.ts)
  "/admin/epochs/:proposalId": { get: "office", post: "office", getOk: 404 },
  "/admin/calls/:callId/decisions": { get: "admin", post: "admin" },
  "/admin/charges": { get: "admin", post: "admin" },
  "/*": { get: "anyone", post: "none", getOk: 404 },
};

type Instance = { label: string; params: Record<string, string | number>; members: Person[] };

/** The concrete URLs a pattern is tried with, and who is on that proposal's team. */
function instancesOf(pattern: string, ids: SeededIds): Instance[] {
  if (pattern.includes(":fileId")) {
    return [
      { label: "A's file", params: { proposalId: ids.proposalA, fileId: ids.fileA }, members: ["pi", "coi"] },
      { label: "B's file", params: { proposalId: ids.proposalB, fileId: ids.fileB }, members: ["stranger", "coi"] },
      // B's file under A's id: nobody may read it this way, not even a member of both
      { label: "B's file under A", params: { proposalId: ids.proposalA, fileId: ids.fileB }, members: [] },
    ];
  }
  if (pattern.includes(":proposalId")) {
    return [
      { label: "proposal A", params: { proposalId: ids.proposalA, callId: ids.callId, chargeId: 4_000_000_000 }, members: ["pi", "coi"] },
      { label: "proposal B", params: { proposalId: ids.proposalB, callId: ids.callId, chargeId: 4_000_000_000 }, members: ["stranger", "coi"] },
    ];
  }
  if (pattern === "/*") return [{ label: "unknown page", params: {}, members: [] }];
  if (pattern.includes(":chargeId")) return [{ label: "no such charge", params: { chargeId: 4_000_000_000 }, members: [] }];
  return [{ label: "", params: { telescopeId: ids.telescopeId, instrumentId: ids.instrumentId, callId: ids.callId, assignmentId: ids.assignmentId, id: 4_000_000_000 }, members: [] }];
}

type Expected = { kind: "allowed"; status?: number } | { kind: "signIn" } | { kind: "forbidden" } | { kind: "notFound" } | { kind: "notOffered" };

function expected(who: Who, person: Person, instance: Instance, okStatus?: number): Expected {
  if (who === "none") return { kind: "notOffered" };
  if (who === "anyone") return { kind: "allowed", status: okStatus };
  if (person === "anonymous") return { kind: "signIn" };
  if (who === "signedIn") return { kind: "allowed", status: okStatus };
  if (who === "committee") return { kind: "notFound" };
  if (who === "member") return instance.members.includes(person) ? { kind: "allowed", status: okStatus } : { kind: "notFound" };
  if (who === "memberOrAdmin") return instance.members.includes(person) || person === "admin" ? { kind: "allowed", status: okStatus } : { kind: "notFound" };
  if (who === "office") return person === "admin" || person === "observer" ? { kind: "allowed", status: okStatus } : { kind: "forbidden" };
  return person === who ? { kind: "allowed", status: okStatus } : { kind: "forbidden" };
}

const flat = flattenRoutes();
let ids: SeededIds;
let cells = 0;

describe("every route in app/routes.ts has a line in the expectations table", () => {
  it("no route is missing and no line is stale", () => {
    const keys = flat.map((r) => r.key);
    expect(keys.filter((k) => !(k in expectations)), "routes without an expectation").toEqual([]);
    expect(Object.keys(expectations).filter((k) => !keys.includes(k)), "expectations of routes that are gone").toEqual([]);
  });
});

describe("the role × route matrix", () => {
  beforeAll(async () => {
    ids = await seededIds();
  });
  afterAll(() => {
    console.log(`security matrix: ${cells} cells (routes × instances × people × GET/POST) checked`);
  });

  for (const route of flat) {
    const rule = expectations[route.key];
    if (!rule) continue; // reported by the test above
    const isApi = route.pattern.startsWith("/api/");
    for (const method of ["GET", "POST"] as const) {
      for (const person of people) {
        it(`${method} ${route.key} as ${person}`, async () => {
          for (const instance of instancesOf(route.pattern, ids)) {
            cells += 1;
            const base = route.pattern === "/*" ? "/no/such/page" : fill(route.pattern, instance.params);
            const url = method === "POST" && route.key.endsWith("?index") ? `${base}?index` : base;
            const okStatus = typeof rule.getOk === "function" ? rule.getOk(person) : rule.getOk;
            const want = expected(method === "GET" ? rule.get : rule.post, person, instance, method === "GET" ? (okStatus ?? 200) : undefined);
            const agent = await request();
            const cookie = await cookieOf(person);
            const req =
              method === "GET"
                ? agent.get(url)
                : isApi
                  ? agent.post(url).set("Origin", appOrigin()).set("Content-Type", "application/json").send(JSON.stringify({ intent: "matrix-probe" }))
                  : agent.post(url).set("Origin", appOrigin()).type("form").send("intent=matrix-probe");
            // the app's own host and origin, as a browser posting one of the app's forms sends them
            req.set("Host", new URL(appOrigin()).host);
            if (cookie) req.set("Cookie", cookie);
            const res = await req.redirects(0);
            const where = `${method} ${url} (${instance.label || route.key}) as ${person}: ${res.status} ${res.headers.location ?? ""} ${res.text?.slice(0, 160) ?? ""}`;
            expect(res.status, where).toBeLessThan(500);
            switch (want.kind) {
              case "allowed":
                if (want.status !== undefined) expect(res.status, where).toBe(want.status);
                else {
                  // a probe body the route must refuse as input, not as a person
                  expect([401, 403, 404, 405], where).not.toContain(res.status);
                  expect(res.headers.location ?? "", where).not.toMatch(/^\/sign-in/);
                }
                break;
              case "signIn":
                if (isApi) {
                  expect(res.status, where).toBe(401);
                  expect(res.headers["content-type"], where).toMatch(/application\/json/);
                  expect(typeof res.body.error, where).toBe("string");
                } else {
                  expect(res.status, where).toBe(302);
                  if (method === "GET") expect(res.headers.location, where).toBe(`/sign-in?redirectTo=${encodeURIComponent(url)}`);
                  else expect(res.headers.location, where).toMatch(/^\/sign-in\?redirectTo=/);
                }
                break;
              case "forbidden":
                expect(res.status, where).toBe(403);
                if (isApi) expect(res.headers["content-type"], where).toMatch(/application\/json/);
                break;
              case "notFound":
                expect(res.status, where).toBe(404);
                if (isApi) expect(res.headers["content-type"], where).toMatch(/application\/json/);
                break;
              case "notOffered":
                // nothing happens: 405; a page whose own error boundary runs the workspace's
                // loaders sends an anonymous visitor to sign in first, which is as good
                if (person === "anonymous" && !isApi && res.status === 302) expect(res.headers.location, where).toMatch(/^\/sign-in\?redirectTo=/);
                else expect(res.status, where).toBe(405);
                break;
            }
          }
        });
      }
    }
  }
});
