// The HTTP front (app/cli/http-app.ts): proxy trust, cross-site refusals, security headers and
// body limits, through the same express stack as `npm start`.
import http from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createHttpApp } from "~/cli/http-app";
import { RoleGrant } from "~/models/index.server";
import { form, request, testApp } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { testEnv } from "../helpers/env";
import { newUser, sessionCookieFor } from "../helpers/session";

const MB = 1024 * 1024;
const exposure = {
  band: "V",
  magnitude: 19,
  snr: 30,
  airmass: 1.2,
  seeingArcsec: 1.1,
  moonCategory: "grey",
  telescope: { apertureM: 2.4, centralObstruction: 0.3 },
  instrument: { throughput: 0.55, pixelScaleArcsec: 0.35, readNoiseE: 4, darkEPerPixelPerS: 0.001, fullWellE: 90000 },
};

/** The front alone, with a stand-in for React Router that echoes what reached it. */
function echoFront(options: { trustProxy?: false | number | string[]; appUrl?: string } = {}) {
  return createHttpApp({
    build: {} as never,
    clientDir: path.join(testEnv.buildDir, "client"),
    ...options,
    handler: async (req) =>
      Response.json({ clientIp: req.headers.get("x-nightshare-client-ip"), url: req.url, bodyBytes: req.body ? (await req.arrayBuffer()).byteLength : 0 }),
  });
}

let adminCookie: string;

beforeAll(async () => {
  await ensureDatabase();
  adminCookie = await sessionCookieFor("admin@kestrel-ridge.example");
});

describe("proxy trust", () => {
  it("with TRUST_PROXY=1 the client address is the hop the proxy added, not the client's pick", async () => {
    const res = await supertest(echoFront({ trustProxy: 1 })).get("/anything").set("X-Forwarded-For", "1.2.3.4, 5.6.7.8");
    // One trusted hop: the socket is the proxy; the right-most forwarded entry is what it saw.
    expect(res.body.clientIp).toBe("5.6.7.8");
  });

  it("with two trusted hops the second address from the right is the client", async () => {
    const res = await supertest(echoFront({ trustProxy: 2 })).get("/anything").set("X-Forwarded-For", "1.2.3.4, 5.6.7.8, 9.9.9.9");
    expect(res.body.clientIp).toBe("5.6.7.8");
  });

  it("without TRUST_PROXY, X-Forwarded-For and a forged internal header are ignored", async () => {
    const res = await supertest(echoFront())
      .get("/anything")
      .set("X-Forwarded-For", "1.2.3.4")
      .set("X-Nightshare-Client-Ip", "6.6.6.6");
    expect(res.body.clientIp).toMatch(/127\.0\.0\.1$/);
  });

  it("a named proxy address is trusted only when the request comes from it", async () => {
    const fromProxy = await supertest(echoFront({ trustProxy: ["127.0.0.1"] })).get("/x").set("X-Forwarded-For", "1.2.3.4, 5.6.7.8");
    expect(fromProxy.body.clientIp).toBe("5.6.7.8");
    const notTheProxy = await supertest(echoFront({ trustProxy: ["10.0.0.1"] })).get("/x").set("X-Forwarded-For", "5.6.7.8");
    expect(notTheProxy.body.clientIp).toMatch(/127\.0\.0\.1$/);
  });
});

/**
 * The front with a build whose visibility route echoes what reached its loader: a science GET is
 * answered before express's router (http-app.ts `front`), so its request must be cleaned the same way.
 */
function echoScienceFront(options: { trustProxy?: false | number | string[] } = {}) {
  const loader = ({ request }: { request: Request }) => ({
    clientIp: request.headers.get("x-nightshare-client-ip"),
    nonce: request.headers.get("x-nightshare-csp-nonce"),
    tooLarge: request.headers.get("x-nightshare-body-too-large"),
    url: request.url,
  });
  const build = { routes: { "routes/api.v1.visibility": { module: { loader } } }, entry: { module: {} } };
  return createHttpApp({ build: build as never, clientDir: path.join(testEnv.buildDir, "client"), ...options });
}

describe("a science GET answered before the router", () => {
  it("sets the client address itself and drops forged internal headers", async () => {
    const res = await supertest(echoScienceFront())
      .get("/api/v1/visibility?ra=1")
      .set("X-Forwarded-For", "1.2.3.4")
      .set("X-Nightshare-Client-Ip", "6.6.6.6")
      .set("X-Nightshare-Csp-Nonce", "chosen")
      .set("X-Nightshare-Body-Too-Large", "1");
    expect(res.status).toBe(200);
    expect(res.body.clientIp).toMatch(/127\.0\.0\.1$/);
    expect(res.body.tooLarge).toBeNull();
    // the nonce the loader saw is the one in the policy sent, not the client's
    expect(res.body.nonce).not.toBe("chosen");
    expect(res.headers["content-security-policy"]).toContain(`'nonce-${res.body.nonce}'`);
    expect(res.headers["x-frame-options"]).toBe("DENY");
    expect(res.body.url).toMatch(/\/api\/v1\/visibility\?ra=1$/);
  });

  it("honours TRUST_PROXY as express does: address, protocol and host", async () => {
    const res = await supertest(echoScienceFront({ trustProxy: 1 }))
      .get("/api/v1/visibility?x=1")
      .set("X-Forwarded-For", "1.2.3.4, 5.6.7.8")
      .set("X-Forwarded-Proto", "https")
      .set("X-Forwarded-Host", "sky.example:8443");
    expect(res.body.clientIp).toBe("5.6.7.8");
    expect(res.body.url).toBe("https://sky.example:8443/api/v1/visibility?x=1");
    // the same request through express's layers to React Router sees the same
    const viaExpress = await supertest(echoFront({ trustProxy: 1 }))
      .get("/api/v1/visibility/?x=1")
      .set("X-Forwarded-For", "1.2.3.4, 5.6.7.8")
      .set("X-Forwarded-Proto", "https")
      .set("X-Forwarded-Host", "sky.example:8443");
    expect(viaExpress.status).toBe(200);
    expect(viaExpress.body.url).toBe("https://sky.example:8443/api/v1/visibility/?x=1");
    expect(viaExpress.body.clientIp).toBe("5.6.7.8");
  });

  it("without TRUST_PROXY ignores the forwarded address, protocol and host", async () => {
    const res = await supertest(echoScienceFront())
      .get("/api/v1/visibility")
      .set("X-Forwarded-For", "1.2.3.4")
      .set("X-Forwarded-Proto", "https")
      .set("X-Forwarded-Host", "sky.example");
    expect(res.body.clientIp).toMatch(/127\.0\.0\.1$/);
    expect(res.body.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/api\/v1\/visibility$/);
  });

  it("gives each request its own nonce", async () => {
    const agent = supertest(echoScienceFront());
    const nonces = new Set<string>();
    for (let i = 0; i < 300; i++) nonces.add((await agent.get("/api/v1/visibility")).body.nonce);
    // 300 requests span more than one refill of the nonce pool (256 per refill)
    expect(nonces.size).toBe(300);
  });
});

describe("cross-site requests", () => {
  it("refuses a text/plain POST to an API route (400 JSON naming the content type) and changes nothing", async () => {
    const target = await newUser();
    const res = await (await request())
      .post("/api/v1/admin/users")
      .set("Cookie", adminCookie)
      .set("Content-Type", "text/plain")
      .send(JSON.stringify({ intent: "grant", userId: target.user.id, role: "chair" }));
    expect(res.status).toBe(400);
    expect(res.body.error).toMatch(/JSON/);
    expect(res.body.issues).toEqual([{ path: "content-type", message: "Content-Type must be application/json" }]);
    expect(await RoleGrant.count({ where: { userId: target.user.id } })).toBe(0);
  });

  it.each([
    ["an Origin on another port (same site)", { Origin: "http://127.0.0.1:1" }],
    ["an Origin of another site", { Origin: "https://elsewhere.example" }],
    ["Origin null", { Origin: "null" }],
    ["Sec-Fetch-Site: same-site", { "Sec-Fetch-Site": "same-site" }],
    ["Sec-Fetch-Site: cross-site", { "Sec-Fetch-Site": "cross-site" }],
  ])("refuses a JSON POST to the API with %s (403 JSON), changing nothing", async (_label, headers) => {
    const target = await newUser();
    const res = await (await request())
      .post("/api/v1/admin/users")
      .set("Cookie", adminCookie)
      .set(headers)
      .send({ intent: "grant", userId: target.user.id, role: "chair" });
    expect(res.status).toBe(403);
    expect(res.headers["content-type"]).toMatch(/application\/json/);
    expect(res.body.error).toMatch(/another site/);
    expect(await RoleGrant.count({ where: { userId: target.user.id } })).toBe(0);
  });

  it("accepts a JSON POST from the app's own origin", async () => {
    const target = await newUser();
    const res = await (await request())
      .post("/api/v1/admin/users")
      .set("Cookie", adminCookie)
      .set("Origin", new URL(testEnv.appUrl).origin)
      .set("Sec-Fetch-Site", "same-origin")
      .send({ intent: "grant", userId: target.user.id, role: "chair" });
    expect(res.status).toBe(200);
    expect(await RoleGrant.count({ where: { userId: target.user.id } })).toBe(1);
  });

  it.each([
    ["Origin", "https://elsewhere.example"],
    ["Sec-Fetch-Site", "cross-site"],
    ["Sec-Fetch-Site", "same-site"],
  ])("refuses a form post to a page with %s: %s (403)", async (name, value) => {
    const target = await newUser();
    const res = await (await request())
      .post("/admin/users")
      .set("Cookie", adminCookie)
      .set(name, value)
      .type("form")
      .send(form({ intent: "grant", userId: target.user.id, role: "reviewer" }));
    expect(res.status).toBe(403);
    expect(res.text).toContain("came from another site");
    expect(await RoleGrant.count({ where: { userId: target.user.id } })).toBe(0);
  });

  it("lets the payment service's webhook through without an Origin check (its signature is checked)", async () => {
    const res = await (await request())
      .post("/api/v1/payments/webhook")
      .set("Origin", "https://elsewhere.example")
      .set("Content-Type", "application/json")
      .send("{}");
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body)).toMatch(/[Ss]ignature/);
  });
});

describe("security headers", () => {
  it("a page carries a CSP whose nonce is on every inline script, and the other headers", async () => {
    const res = await (await request()).get("/sign-in");
    expect(res.status).toBe(200);
    const csp = String(res.headers["content-security-policy"]);
    const nonce = /'nonce-([^']+)'/.exec(csp)?.[1];
    expect(nonce).toMatch(/^[A-Za-z0-9+/=]{16,}$/);
    for (const directive of ["frame-ancestors 'none'", "object-src 'none'", "base-uri 'self'", "default-src 'self'"]) expect(csp).toContain(directive);
    expect(csp).toMatch(/form-action 'self'/);
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    const scripts = [...res.text.matchAll(/<script\b([^>]*)>/g)].map((m) => m[1]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const attributes of scripts) expect(attributes).toContain(`nonce="${nonce}"`);
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["referrer-policy"]).toBe("same-origin");
    expect(res.headers["x-frame-options"]).toBe("DENY");
    // The test app is served over http: no HSTS.
    expect(res.headers["strict-transport-security"]).toBeUndefined();
  });

  it("each response gets its own nonce", async () => {
    const agent = await request();
    const [a, b] = [await agent.get("/sign-in"), await agent.get("/sign-in")];
    expect(a.headers["content-security-policy"]).not.toBe(b.headers["content-security-policy"]);
  });

  it("answers for a signed-in browser are private, no-store; static files are not", async () => {
    const pi = await newUser();
    const page = await (await request()).get("/proposals").set("Cookie", pi.cookie);
    expect(page.status).toBe(200);
    expect(page.headers["cache-control"]).toBe("private, no-store");
    const api = await (await request()).get("/api/v1/proposals").set("Cookie", pi.cookie);
    expect(api.headers["cache-control"]).toBe("private, no-store");
    const icon = await (await request()).get("/favicon.svg").set("Cookie", pi.cookie);
    expect(icon.status).toBe(200);
    expect(icon.headers["cache-control"]).toMatch(/max-age=3600/);
    expect(icon.headers["x-content-type-options"]).toBe("nosniff");
  });

  it("sends HSTS when APP_URL is https", async () => {
    const res = await supertest(echoFront({ appUrl: "https://portal.example" })).get("/x");
    expect(res.headers["strict-transport-security"]).toMatch(/max-age=\d{7,}/);
  });
});

/** A chunked POST (no Content-Length) of `total` bytes through a real socket; resolves with the answer. */
function chunkedPost(port: number, pathname: string, contentType: string, total: number) {
  return new Promise<{ status: number; body: string }>((resolve, reject) => {
    const req = http.request({ host: "127.0.0.1", port, path: pathname, method: "POST", headers: { "Content-Type": contentType, "Transfer-Encoding": "chunked" } });
    let answered = false;
    req.on("response", (res) => {
      answered = true;
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c: string) => (body += c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on("error", (error) => (answered ? undefined : reject(error)));
    const chunk = Buffer.alloc(64 * 1024, "a");
    let sent = 0;
    const pump = () => {
      while (!answered && sent < total) {
        sent += chunk.length;
        if (!req.write(chunk)) return void req.once("drain", pump);
      }
      req.end();
    };
    pump();
  });
}

describe("body limits", () => {
  let server: http.Server;
  let port: number;
  beforeAll(async () => {
    const app = await testApp();
    server = await new Promise((resolve) => {
      const s = app.listen(0, "127.0.0.1", () => resolve(s));
    });
    port = (server.address() as AddressInfo).port;
  });
  afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

  it("refuses 2 MB of JSON to an API route with 413 JSON", async () => {
    const res = await (await request()).post("/api/v1/exposure").send({ ...exposure, padding: "x".repeat(2 * MB) });
    expect(res.status).toBe(413);
    expect(res.headers["content-type"]).toMatch(/application\/json/);
    expect(res.body.error).toContain("larger than 1 MB");
  });

  it("refuses a 5 MB form to /sign-in with the 413 page", async () => {
    const res = await (await request()).post("/sign-in").type("form").send(form({ intent: "send", email: "someone@test.example", padding: "x".repeat(5 * MB) }));
    expect(res.status).toBe(413);
    expect(res.text).toContain("Too much at once");
    expect(res.text).toContain("larger than 1 MB");
  });

  it("refuses a chunked upload without Content-Length to the API once it passes the limit", async () => {
    const res = await chunkedPost(port, "/api/v1/exposure", "application/json", 4 * MB);
    expect(res.status).toBe(413);
    expect(JSON.parse(res.body).error).toContain("larger than 1 MB");
  });

  it("refuses a chunked form to a page once it passes the limit", async () => {
    const res = await chunkedPost(port, "/sign-in", "application/x-www-form-urlencoded", 4 * MB);
    expect(res.status).toBe(413);
    expect(res.body).toContain("Too much at once");
  });

  it("refuses a science case far over its own limit with 413, but lets a body under 1 MB elsewhere through", async () => {
    const pi = await newUser();
    const big = await (await request())
      .post("/proposals/1/science-case")
      .set("Cookie", pi.cookie)
      .field("intent", "upload")
      .attach("file", Buffer.alloc(14 * MB, 1), { filename: "case.pdf", contentType: "application/pdf" });
    expect(big.status).toBe(413);
    expect(big.text).toContain("larger than 12 MB, the most this page takes");
    const small = await (await request()).post("/api/v1/exposure").send({ ...exposure, note: "x".repeat(900 * 1024) });
    expect(small.status).not.toBe(413);
  });

  it("still answers afterwards", async () => {
    const res = await fetch(`http://127.0.0.1:${port}/sign-in`);
    expect(res.status).toBe(200);
    const api = await (await request()).post("/api/v1/exposure").send(exposure);
    expect(api.status).toBe(200);
    expect(api.body.exposureSeconds).toBeGreaterThan(0);
  });
});
