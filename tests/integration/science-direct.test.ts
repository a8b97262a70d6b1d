// The HTTP front calls the public science routes directly (app/cli/http-app.ts, DIRECT_ROUTE_IDS)
// instead of through React Router's request cycle. A path spelled with a trailing slash is left to
// React Router and reaches the same route module: both answers must be the same — status,
// headers (but the per-request nonce and date) and body — for answers, refusals and 405s.
import { describe, expect, it } from "vitest";
import { request } from "../helpers/app";

// an invented site and target
const QUERY = "lat=31.3&lon=-108.7&elevation=2100&timeZone=America/Denver&ra=150.25&dec=12.5&from=2027-02-01&nights=3&maxAirmass=2";

const comparable = (headers: Record<string, string>) => {
  const { date: _date, "content-security-policy": csp, ...rest } = headers;
  return { ...rest, "content-security-policy": csp?.replace(/'nonce-[^']+'/, "'nonce-…'") };
};

async function both(send: (path: string) => PromiseLike<{ status: number; headers: Record<string, string>; text: string }>, path: string) {
  const direct = await send(path);
  const throughRouter = await send(`${path}/`);
  return { direct, throughRouter };
}

describe("science routes answered by the front directly", () => {
  const cases: [string, (agent: Awaited<ReturnType<typeof request>>, path: string) => PromiseLike<{ status: number; headers: Record<string, string>; text: string }>, string][] = [
    ["GET visibility (200)", (a, p) => a.get(`${p}?${QUERY}`), "/api/v1/visibility"],
    ["GET visibility, a field out of range (400)", (a, p) => a.get(`${p}?${QUERY.replace("dec=12.5", "dec=123")}`), "/api/v1/visibility"],
    ["POST visibility (405)", (a, p) => a.post(p).set("Content-Type", "application/json").send("{}"), "/api/v1/visibility"],
    ["GET exposure (405)", (a, p) => a.get(p), "/api/v1/exposure"],
    ["POST exposure, an empty body (400)", (a, p) => a.post(p).set("Content-Type", "application/json").send("{}"), "/api/v1/exposure"],
    ["POST epoch plan, not JSON (400)", (a, p) => a.post(p).set("Content-Type", "application/json").send("{nope"), "/api/v1/epoch-plan"],
    ["GET visibility with a cookie (private, no-store)", (a, p) => a.get(`${p}?${QUERY}`).set("Cookie", "x=1"), "/api/v1/visibility"],
  ];
  for (const [label, send, path] of cases) {
    it(`${label}: as through React Router`, async () => {
      const agent = await request();
      const { direct, throughRouter } = await both((p) => send(agent, p), path);
      expect(direct.status, label).toBe(throughRouter.status);
      expect(comparable(direct.headers), label).toEqual(comparable(throughRouter.headers));
      expect(direct.text, label).toBe(throughRouter.text);
      expect(direct.headers["content-type"]).toMatch(/^application\/json/);
    });
  }
});
