// Attacks on the HTTP front's plain-node path for the science GETs (app/cli/http-app.ts `front`,
// `answerScienceGet`): raw requests over node:net (absolute-form targets, hostile Host headers,
// smuggled internal headers), each answer compared with what the express path gives for the same
// request (`/api/v1/visibility/` goes through React Router) — status, security headers and
// Cache-Control — and never a 5xx without them.
import net from "node:net";
import type { AddressInfo, Server } from "node:net";
import path from "node:path";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createHttpApp } from "~/cli/http-app";
import { testApp } from "../helpers/app";
import { testEnv } from "../helpers/env";

// an invented site and target
const QUERY = "lat=31.3&lon=-108.7&elevation=2100&timeZone=America/Denver&ra=150.25&dec=12.5&from=2027-02-01&nights=2&maxAirmass=2";

type Raw = { status: number; headers: Record<string, string[]>; body: string };

/** One request written byte for byte; the answer parsed by hand (no client cleans it up). */
function raw(port: number, head: string): Promise<Raw> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(port, "127.0.0.1", () => socket.end(Buffer.from(`${head}\r\nConnection: close\r\n\r\n`, "latin1")));
    const chunks: Buffer[] = [];
    socket.on("data", (c) => chunks.push(c));
    socket.on("error", reject);
    socket.on("close", () => {
      const text = Buffer.concat(chunks).toString("latin1");
      const end = text.indexOf("\r\n\r\n");
      const [statusLine, ...lines] = text.slice(0, end).split("\r\n");
      const headers: Record<string, string[]> = {};
      for (const line of lines) {
        const colon = line.indexOf(":");
        const name = line.slice(0, colon).trim().toLowerCase();
        (headers[name] ??= []).push(line.slice(colon + 1).trim());
      }
      resolve({ status: Number(statusLine?.split(" ")[1] ?? 0), headers, body: text.slice(end + 4) });
    });
  });
}

const one = (a: Raw, name: string) => {
  expect(a.headers[name]?.length ?? 0, `${name}: ${JSON.stringify(a.headers[name])}`).toBe(1);
  return a.headers[name][0];
};

/** The security headers every answer carries: a CSP with a fresh nonce and no framing. */
function expectSecurityHeaders(a: Raw, where: string) {
  expect(one(a, "content-security-policy"), where).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]{20,}'.*frame-ancestors 'none'/);
  expect(one(a, "x-frame-options"), where).toBe("DENY");
  expect(one(a, "x-content-type-options"), where).toBe("nosniff");
  expect(one(a, "referrer-policy"), where).toBe("same-origin");
  expect(one(a, "cross-origin-opener-policy"), where).toBe("same-origin");
}

let server: Server;
let port = 0;
let host = "";

beforeAll(async () => {
  const app = await testApp();
  server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  port = (server.address() as AddressInfo).port;
  host = `127.0.0.1:${port}`;
});
afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

describe("a science GET over a raw socket", () => {
  it("an absolute-form target (GET http://evil/api/v1/visibility?…) is answered as its path, as through React Router", async () => {
    const plain = await raw(port, `GET /api/v1/visibility?${QUERY} HTTP/1.1\r\nHost: ${host}`);
    expect(plain.status).toBe(200);
    for (const pathname of ["/api/v1/visibility", "/api/v1/visibility/"]) {
      const absolute = await raw(port, `GET http://evil.example${pathname}?${QUERY} HTTP/1.1\r\nHost: ${host}`);
      expect(absolute.status, pathname).toBe(200);
      expectSecurityHeaders(absolute, pathname);
      expect(one(absolute, "cache-control"), pathname).toBe("no-store");
      expect(JSON.parse(absolute.body), pathname).toEqual(JSON.parse(plain.body));
    }
    // a page too: its path, not a 500
    const page = await raw(port, `GET http://evil.example/sign-in HTTP/1.1\r\nHost: ${host}`);
    expect(page.status).toBe(200);
    expectSecurityHeaders(page, "page");
  });

  it("a Host that makes no URL (space, <, [, a C1 byte) is a 400 naming the host, with the security headers, on both paths", async () => {
    for (const bad of ["a b", "a<b", "[::1", "a\x85b", "a%zzb"]) {
      for (const pathname of ["/api/v1/visibility", "/api/v1/visibility/"]) {
        const where = `${JSON.stringify(bad)} ${pathname}`;
        const a = await raw(port, `GET ${pathname}?${QUERY} HTTP/1.1\r\nHost: ${bad}`);
        expect(a.status, where).toBe(400);
        expectSecurityHeaders(a, where);
        expect(one(a, "cache-control"), where).toBe("no-store");
        expect(one(a, "content-type"), where).toMatch(/^application\/json/);
        const body = JSON.parse(a.body);
        expect(body.issues[0].path, where).toBe("host");
        expect(a.body, where).not.toMatch(/at .*\.(ts|js|mjs):\d+/);
      }
    }
    const page = await raw(port, `GET /sign-in HTTP/1.1\r\nHost: a b`);
    expect(page.status).toBe(400);
    expectSecurityHeaders(page, "page");
    expect(page.body).not.toMatch(/at .*\.(ts|js|mjs):\d+/);
  });

  it("a Host with @ or / (userinfo, a path) names the host before them, as express does", async () => {
    for (const [bad, seen] of [["evil@127.0.0.1", "evil"], ["127.0.0.1/evil", "127.0.0.1"]] as const) {
      const plain = await raw(port, `GET /api/v1/visibility?${QUERY} HTTP/1.1\r\nHost: ${bad}`);
      const viaRouter = await raw(port, `GET /api/v1/visibility/?${QUERY} HTTP/1.1\r\nHost: ${bad}`);
      expect([plain.status, viaRouter.status], `${bad} → ${seen}`).toEqual([200, 200]);
      expectSecurityHeaders(plain, bad);
      expect(plain.body).toBe(viaRouter.body);
    }
  });

  it("other spellings of the path (//, percent-encoded, a ;param, a #) are never a 5xx and carry the security headers", async () => {
    for (const target of [`//api/v1/visibility?${QUERY}`, `/api/v1/%76isibility?${QUERY}`, `/api/v1/visibility;x=1?${QUERY}`, `/api/v1/visibility#x`, `/api/v1/visibility%2F?${QUERY}`, `/api//v1/visibility?${QUERY}`]) {
      const a = await raw(port, `GET ${target} HTTP/1.1\r\nHost: ${host}`);
      expect(a.status, target).toBeGreaterThanOrEqual(200);
      expect(a.status, target).toBeLessThan(500);
      expectSecurityHeaders(a, target);
    }
  });

  it("HEAD and a very long query are answered as through React Router, with the same headers", async () => {
    const head = await raw(port, `HEAD /api/v1/visibility?${QUERY} HTTP/1.1\r\nHost: ${host}`);
    const headRouter = await raw(port, `HEAD /api/v1/visibility/?${QUERY} HTTP/1.1\r\nHost: ${host}`);
    expect(head.status).toBe(headRouter.status);
    expect(head.status).toBeLessThan(500);
    expectSecurityHeaders(head, "HEAD");
    const long = `${QUERY}&pad=${"x".repeat(12_000)}`;
    const plain = await raw(port, `GET /api/v1/visibility?${long} HTTP/1.1\r\nHost: ${host}`);
    const viaRouter = await raw(port, `GET /api/v1/visibility/?${long} HTTP/1.1\r\nHost: ${host}`);
    expect(plain.status).toBe(viaRouter.status);
    expect(plain.status).toBeLessThan(500);
    expectSecurityHeaders(plain, "long query");
    expect(one(plain, "cache-control")).toBe(one(viaRouter, "cache-control"));
  });
});

/** The front with a stand-in visibility route whose loader does `loader` (a build of one route). */
function frontWith(loader: (args: { request: Request }) => unknown, trustProxy: false | number = false) {
  const build = { routes: { "routes/api.v1.visibility": { module: { loader } } }, entry: { module: {} } };
  return createHttpApp({ build: build as never, clientDir: path.join(testEnv.buildDir, "client"), trustProxy });
}

async function listening(app: ReturnType<typeof createHttpApp>) {
  const s = await new Promise<Server>((resolve) => {
    const x = app.listen(0, "127.0.0.1", () => resolve(x));
  });
  return { port: (s.address() as AddressInfo).port, close: () => new Promise<void>((r) => s.close(() => r())) };
}

describe("a science GET with smuggled internal headers or an unusual loader result", () => {
  it("internal headers in any case, repeated, can choose neither the client address nor the nonce", async () => {
    const echo = await listening(frontWith(({ request }) => ({ ip: request.headers.get("x-nightshare-client-ip"), nonce: request.headers.get("x-nightshare-csp-nonce"), big: request.headers.get("x-nightshare-body-too-large") })));
    try {
      const a = await raw(
        echo.port,
        [
          "GET /api/v1/visibility?ra=1 HTTP/1.1",
          "Host: 127.0.0.1",
          "X-NIGHTSHARE-CLIENT-IP: 6.6.6.6",
          "x-nightshare-client-ip: 7.7.7.7",
          "X-Nightshare-Csp-Nonce: chosen",
          "x-nightshare-csp-nonce: chosen2",
          "X-Nightshare-Body-Too-Large: 1",
          "X-Forwarded-For: 8.8.8.8",
        ].join("\r\n"),
      );
      const body = JSON.parse(a.body);
      expect(body.ip).toBe("127.0.0.1");
      expect(body.big).toBeNull();
      expect(one(a, "content-security-policy")).toContain(`'nonce-${body.nonce}'`);
      expect(body.nonce).not.toMatch(/chosen/);
    } finally {
      await echo.close();
    }
  });

  it("a loader whose answer cannot be written (status 1000) is a 500 that still carries the security headers", async () => {
    const odd = await listening(frontWith(() => ({ type: "DataWithResponseInit", data: {}, init: { status: 1000 } })));
    try {
      const a = await raw(odd.port, "GET /api/v1/visibility HTTP/1.1\r\nHost: 127.0.0.1");
      expect(a.status).toBe(500);
      expectSecurityHeaders(a, "500");
      expect(one(a, "cache-control")).toBe("no-store");
    } finally {
      await odd.close();
    }
  });
});

describe("the science budget and a client's own addresses", () => {
  it("one /64 is one budget: an IPv6 client cannot take a fresh one per address; another /64 has its own", async () => {
    const { visibilityResponse, RATE_LIMIT_PER_MINUTE } = await import("~/lib/http/science-api.server");
    // the real route's function behind one trusted proxy hop, which passes on the client's address
    const app = supertest(frontWith(({ request }) => visibilityResponse(request), 1));
    const q = QUERY.replace("nights=2", "nights=1");
    const from = (address: string) => app.get(`/api/v1/visibility?${q}`).set("X-Forwarded-For", address);
    for (let i = 0; i < RATE_LIMIT_PER_MINUTE; i++) {
      const res = await from(`2001:db8:5:7:${(i + 1).toString(16)}::1`);
      expect(res.status, `request ${i + 1}`).toBe(200);
    }
    const fresh = await from("2001:0db8:0005:0007:ffff:ffff:ffff:fffe");
    expect(fresh.status, "a new address in the same /64").toBe(429);
    expect(Number(fresh.headers["retry-after"])).toBeGreaterThan(0);
    expect((await from("2001:db8:5:8::1")).status, "the next /64").toBe(200);
  });

  it("an IPv4 address written IPv4-mapped is the same budget as written plainly", async () => {
    const { rateLimitKey } = await import("~/lib/http/science-api.server");
    expect(rateLimitKey("::ffff:192.0.2.7")).toBe(rateLimitKey("192.0.2.7"));
    expect(rateLimitKey("::FFFF:192.0.2.7")).toBe("192.0.2.7");
    expect(rateLimitKey("2001:db8::1")).toBe(rateLimitKey("2001:db8:0:0:ffff::2"));
    expect(rateLimitKey("2001:db8::1")).not.toBe(rateLimitKey("2001:db8:0:1::1"));
    expect(rateLimitKey("fe80::1%eth0")).toBe(rateLimitKey("fe80::2"));
  });
});
