// Security headers on pages and on the API (issue 7, item 7).
import { beforeAll, describe, expect, it } from "vitest";
import { request } from "../helpers/app";
import { sessionCookieFor } from "../helpers/session";
import { seededIds, type SeededIds } from "./fixtures";

let ids: SeededIds;
beforeAll(async () => {
  ids = await seededIds();
});

const publicPages = ["/", "/sign-in", "/calls", "/sky-tools", "/no/such/page"];
const signedInPages = () => [
  { path: "/proposals", email: "pi@kestrel-ridge.example" },
  { path: `/proposals/${ids.proposalA}`, email: "pi@kestrel-ridge.example" },
  { path: `/proposals/${ids.proposalA}/feasibility`, email: "pi@kestrel-ridge.example" },
  { path: "/welcome", email: "pi@kestrel-ridge.example" },
  { path: "/admin/users", email: "admin@kestrel-ridge.example" },
  { path: "/review", email: "reviewer@kestrel-ridge.example" },
];
const referrerPolicies = ["no-referrer", "same-origin", "strict-origin", "strict-origin-when-cross-origin"];

function directives(csp: string) {
  return new Map(
    csp
      .split(";")
      .map((d) => d.trim())
      .filter(Boolean)
      .map((d) => {
        const [name, ...values] = d.split(/\s+/);
        return [name.toLowerCase(), values] as const;
      }),
  );
}

async function get(path: string, cookie = "") {
  const agent = await request();
  const req = agent.get(path).redirects(0);
  if (cookie) req.set("Cookie", cookie);
  return req;
}

function expectCommon(res: { headers: Record<string, string> }, where: string) {
  expect(res.headers["x-content-type-options"], where).toBe("nosniff");
  expect(referrerPolicies, `${where}: Referrer-Policy ${res.headers["referrer-policy"]}`).toContain(res.headers["referrer-policy"]);
  expect(res.headers["x-powered-by"], where).toBeUndefined();
}

/** The page's CSP allows scripts only by nonce, the inline scripts carry it, and no one may frame the page. */
function expectPageCsp(res: { headers: Record<string, string>; text: string }, where: string) {
  const csp = res.headers["content-security-policy"];
  expect(csp, `${where}: Content-Security-Policy`).toBeTruthy();
  const d = directives(csp);
  expect(d.get("frame-ancestors"), where).toEqual(["'none'"]);
  const scripts = d.get("script-src") ?? d.get("default-src") ?? [];
  const nonces = scripts.filter((v) => /^'nonce-[A-Za-z0-9+/=_-]{16,}'$/.test(v));
  expect(nonces.length, `${where}: script-src ${scripts.join(" ")}`).toBe(1);
  expect(scripts, where).not.toContain("'unsafe-inline'");
  const nonce = nonces[0].slice("'nonce-".length, -1);
  const inline = [...res.text.matchAll(/<script\b([^>]*)>/g)].map((m) => m[1]);
  expect(inline.length, `${where}: the page has scripts`).toBeGreaterThan(0);
  for (const attrs of inline) expect(attrs, `${where}: <script${attrs}>`).toContain(`nonce="${nonce}"`);
  return nonce;
}

describe("security headers on pages", () => {
  for (const path of publicPages) {
    it(`GET ${path} (anonymous) sends CSP with a nonce, frame-ancestors 'none', nosniff, Referrer-Policy`, async () => {
      const res = await get(path);
      expect(res.headers["content-type"]).toMatch(/text\/html/);
      expectCommon(res, path);
      expectPageCsp(res, path);
    });
  }

  it("uses a new nonce on every response", async () => {
    const [a, b] = [await get("/"), await get("/")];
    expect(expectPageCsp(a, "/ first")).not.toBe(expectPageCsp(b, "/ second"));
  });

  it("signed-in pages are private, no-store, with the same headers", async () => {
    for (const { path, email } of signedInPages()) {
      const res = await get(path, await sessionCookieFor(email));
      expect(res.status, path).toBe(200);
      expectCommon(res, path);
      expectPageCsp(res, path);
      const cache = (res.headers["cache-control"] ?? "").split(",").map((s: string) => s.trim());
      expect(cache, `${path}: Cache-Control ${res.headers["cache-control"]}`).toEqual(expect.arrayContaining(["private", "no-store"]));
    }
  });

  it("the redirect to sign-in carries the headers too", async () => {
    const res = await get("/proposals");
    expect(res.status).toBe(302);
    expectCommon(res, "302 /proposals");
  });
});

describe("security headers on the API and on files", () => {
  it("public API answers carry nosniff and Referrer-Policy and no x-powered-by", async () => {
    for (const path of ["/api/v1/visibility", "/healthz", "/api/v1/proposals"]) {
      const res = await get(path);
      expect(res.headers["content-type"], path).toMatch(/application\/json/);
      expectCommon(res, path);
    }
  });

  it("signed-in API answers are private, no-store", async () => {
    const cookie = await sessionCookieFor("pi@kestrel-ridge.example");
    for (const path of ["/api/v1/proposals", `/api/v1/proposals/${ids.proposalA}`]) {
      const res = await get(path, cookie);
      expect(res.status, path).toBe(200);
      expectCommon(res, path);
      const cache = (res.headers["cache-control"] ?? "").split(",").map((s: string) => s.trim());
      expect(cache, path).toEqual(expect.arrayContaining(["private", "no-store"]));
    }
  });

  it("an uploaded file is served as an attachment, sandboxed, nosniff, private", async () => {
    const path = `/proposals/${ids.proposalA}/files/${ids.fileA}`;
    const res = await get(path, await sessionCookieFor("pi@kestrel-ridge.example"));
    expect(res.status).toBe(200);
    expectCommon(res, path);
    expect(res.headers["content-disposition"]).toMatch(/^attachment;/);
    expect(directives(res.headers["content-security-policy"] ?? "").has("sandbox"), `CSP ${res.headers["content-security-policy"]}`).toBe(true);
    expect(res.headers["cache-control"]).toMatch(/private/);
    expect(res.headers["cache-control"]).toMatch(/no-store/);
  });
});
