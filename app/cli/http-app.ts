// The HTTP front of the app: security headers, static files from the client build, the
// cross-site and body-size checks, then React Router's request handler (the science GETs are
// answered before express: see `answerScienceGet`). Shared by `npm start`
// and the integration and browser tests, so both run the same stack.
import { randomBytes } from "node:crypto";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import path from "node:path";
import type { TLSSocket } from "node:tls";
import { writeReadableStreamToWritable } from "@react-router/node";
import express, { type Request as ExpressRequest, type Response as ExpressResponse } from "express";
import proxyaddr from "proxy-addr";
import { createRequestHandler, RouterContextProvider, type ServerBuild } from "react-router";
import {
  bodyLimitFor,
  contentSecurityPolicy,
  framedBySameOrigin,
  crossSiteReason,
  isApiPath,
  isJsonContentType,
  megabytes,
  paymentOrigins,
  SAFE_METHODS,
  WEBHOOK_PATHS,
  type TrustProxy,
} from "../lib/http/front-rules";

/** Headers only this front may set; whatever a client sends under these names is dropped. */
export const INTERNAL_HEADERS = {
  clientIp: "x-nightshare-client-ip",
  nonce: "x-nightshare-csp-nonce",
  bodyTooLarge: "x-nightshare-body-too-large",
} as const;
const INTERNAL_NAMES: readonly string[] = Object.values(INTERNAL_HEADERS);

type Handler = (request: Request) => Promise<Response>;

export interface HttpAppOptions {
  build: ServerBuild;
  clientDir: string;
  /** express's `trust proxy`: false, a hop count or proxy addresses (see `parseTrustProxy`). */
  trustProxy?: TrustProxy;
  /** The public address; its origin is the one same-origin checks accept. Default `APP_URL`. */
  appUrl?: string;
  /** Replaces React Router's handler (tests of the front alone). */
  handler?: Handler;
}

export function createHttpApp({ build, clientDir, trustProxy = false, appUrl = process.env.APP_URL, handler }: HttpAppOptions) {
  const app = express();
  app.disable("x-powered-by");
  // Exactly the configured hops (or addresses) are trusted, never every hop: with TRUST_PROXY=1
  // req.ip is the address the nearest proxy saw, whatever else a client put in X-Forwarded-For.
  app.set("trust proxy", trustProxy);
  const appOrigin = appUrl ? new URL(appUrl).origin : null;
  const https = appOrigin?.startsWith("https:") ?? false;
  const formActionOrigins = paymentOrigins(process.env);
  // the two policies, built once; each request puts its nonce in the slot
  const policy = contentSecurityPolicy({ nonce: NONCE_SLOT, formActionOrigins, frameAncestors: "'none'" });
  const framedPolicy = contentSecurityPolicy({ nonce: NONCE_SLOT, formActionOrigins, frameAncestors: "'self'" });

  const handle = handler ?? createRequestHandler(build, process.env.NODE_ENV);
  const direct = handler ? new Map<string, DirectRoute>() : directRoutes(build);
  const clientIp = (req: ExpressRequest) => req.ip ?? req.socket.remoteAddress ?? "unknown";

  /** The security headers of every answer (the policy with the request's nonce). */
  const securityHeaders = (nonce: string, framed: boolean): [string, string][] => {
    const list: [string, string][] = [
      ["Content-Security-Policy", (framed ? framedPolicy : policy).replace(NONCE_SLOT, nonce)],
      ["X-Content-Type-Options", "nosniff"],
      ["X-Frame-Options", framed ? "SAMEORIGIN" : "DENY"],
      ["Referrer-Policy", "same-origin"],
      ["Cross-Origin-Opener-Policy", "same-origin"],
    ];
    if (https) list.push(["Strict-Transport-Security", "max-age=31536000"]);
    return list;
  };
  /** The headers of every answer, and the request's own values only this front may set. */
  const frontHeaders = (req: ExpressRequest, res: ExpressResponse) => {
    for (const name of INTERNAL_NAMES) delete req.headers[name];
    const nonce = cspNonce();
    req.headers[INTERNAL_HEADERS.nonce] = nonce;
    for (const [name, value] of securityHeaders(nonce, framedBySameOrigin(req.method, req.path, () => req.query))) res.setHeader(name, value);
  };
  app.use((req, res, next) => {
    frontHeaders(req, res);
    next();
  });
  app.use("/assets", express.static(path.join(clientDir, "assets"), { immutable: true, maxAge: "1y" }));
  // The client build's top-level files all have an extension (favicon.ico, robots.txt …): a path
  // without one is a page or an API call, and skips the file system look-up.
  const topLevelFiles = express.static(clientDir, { maxAge: "1h", index: false });
  app.use((req, res, next) => (/\.[^/]+$/.test(req.path) ? topLevelFiles(req, res, next) : next()));
  app.use((req, _res, next) => {
    // Set on every request, so a client cannot choose its own rate-limit bucket.
    req.headers[INTERNAL_HEADERS.clientIp] = clientIp(req);
    next();
  });
  app.use((req, res, next) => {
    if (SAFE_METHODS.has(req.method) || WEBHOOK_PATHS.has(req.path)) return next();
    const api = isApiPath(req.path);
    const allowed = new Set([`${req.protocol}://${req.get("host") ?? ""}`.toLowerCase()]);
    if (appOrigin) allowed.add(appOrigin.toLowerCase());
    const reason = crossSiteReason({ origin: req.get("origin"), secFetchSite: req.get("sec-fetch-site") }, allowed);
    if (reason) {
      const message = "This request came from another site, so it was refused. Use the form on this site.";
      return void refuse(res, api, 403, message, reason);
    }
    if (api && !isJsonContentType(req.get("content-type"))) {
      // 400 like any other bad input on the API (the field named is the header).
      return void refuse(res, api, 400, "Send the body as JSON (Content-Type: application/json).", "Content-Type must be application/json", "content-type");
    }
    next();
  });
  app.use(async (req, res, next) => {
    try {
      const request = await fetchRequest(req, res);
      if (!request) return;
      const route = direct.get(req.path);
      const fn = req.method === "GET" ? route?.loader : req.method === "POST" ? route?.action : undefined;
      if (fn) await directRequest(req, res, request, fn, build);
      else await sendResponse(req, res, await handle(request));
    } catch (error) {
      next(error);
    }
  });
  // In place of express's error page, which shows the stack outside production: the message only
  app.use((error: unknown, req: ExpressRequest, res: ExpressResponse, next: (error?: unknown) => void) => {
    if (res.headersSent) return next(error);
    console.error("[app] request failed:", error);
    res.status(500).setHeader("Cache-Control", "no-store");
    res.type("text/plain").send("Unexpected Server Error");
  });

  // A science GET (the exact path, no extension, no body, no cross-site check for a GET) is
  // answered before express: the same headers, client address and direct call as through it,
  // in plain node (express's router and its request and response prototypes cost as much as the
  // computation on the busiest calls). Everything else goes through express as above.
  const science: ScienceFront = {
    ...proxyTrust(app),
    securityHeaders: (nonce) => securityHeaders(nonce, false),
    build,
  };
  const front = (req: IncomingMessage, res: ServerResponse) => {
    const url = req.url ?? "";
    const query = url.indexOf("?");
    const loader = req.method === "GET" ? direct.get(query < 0 ? url : url.slice(0, query))?.loader : undefined;
    if (!loader) return void app(req, res);
    answerScienceGet(req, res, loader, science).catch((error) => {
      console.error("[app] science request failed:", error);
      // the security headers on this answer too (its own nonce: nothing was sent before)
      if (!res.headersSent) res.writeHead(500, [...securityHeaders(cspNonce(), false), ["Content-Type", "text/plain; charset=utf-8"], ["Cache-Control", "no-store"]].flat());
      res.end("Unexpected Server Error");
    });
  };
  return Object.assign(front, {
    /** As express's `app.listen`: an HTTP server with this front as its handler. */
    listen: (port: number, host: string, onListening?: () => void) => createServer(front).listen(port, host, onListening),
  });
}

// ---------------------------------------------------------------------------------------------
// The science API without React Router's request cycle

/**
 * The public science routes (visibility, exposure, astrometry, epoch plan): pure computations
 * that read no session and catch their own failures (lib/science-api.server's `guarded` answers
 * every error as JSON). For them React Router's cycle — matching the path twice, the root
 * middleware, the data strategy, `Response.json` and reading that body back — costs more than
 * the computation itself, so the front calls the same route module's loader (GET) or action
 * (POST) and writes its `data()` as React Router would: `Response.json`'s status, headers and
 * `application/json`, after the same security headers, cross-site and body-size checks. The root
 * middleware has nothing to do for them: the 413 page is for pages (the API's 413 is answered
 * above), and their database failures never reach `handleError` (no `databaseFailed` mark).
 * Only the exact paths: any other spelling, and other methods, go through React Router.
 */
const DIRECT_ROUTE_IDS: Record<string, string> = {
  "/api/v1/visibility": "routes/api.v1.visibility",
  "/api/v1/exposure": "routes/api.v1.exposure",
  "/api/v1/astrometry": "routes/api.v1.astrometry",
  "/api/v1/epoch-plan": "routes/api.v1.epoch-plan",
};

type RouteFunction = (args: { request: Request; params: Record<string, string>; context: RouterContextProvider }) => unknown;
type DirectRoute = { loader?: RouteFunction; action?: RouteFunction };

function directRoutes(build: ServerBuild) {
  const routes = new Map<string, DirectRoute>();
  for (const [pathname, id] of Object.entries(DIRECT_ROUTE_IDS)) {
    const module = build.routes[id]?.module as DirectRoute | undefined;
    // a build without the route (or a changed id) is served by React Router as before
    if (module) routes.set(pathname, { loader: module.loader, action: module.action });
  }
  return routes;
}

type DataWithInit = { type: "DataWithResponseInit"; data: unknown; init: ResponseInit | null };
const isDataWithInit = (value: unknown): value is DataWithInit =>
  typeof value === "object" && value !== null && (value as { type?: unknown }).type === "DataWithResponseInit";

/** The express path's direct call: the security headers are already on `res`. */
async function directRequest(req: ExpressRequest, res: ExpressResponse, request: Request, fn: RouteFunction, build: ServerBuild) {
  writeAnswer(req, res, await runDirect(fn, request, build), []);
}

/**
 * A route module's loader or action called as React Router calls a resource route, its answer
 * as `Response.json(data, init)` would give it, without building a stream and reading it back.
 */
async function runDirect(fn: RouteFunction, request: Request, build: ServerBuild): Promise<Answer> {
  const args = { request, params: {}, context: new RouterContextProvider() };
  try {
    const result = await fn(args);
    if (isDataWithInit(result)) {
      const init = result.init;
      return { status: init?.status ?? 200, statusText: init?.statusText, headers: init?.headers ? new Headers(init.headers) : undefined, body: JSON.stringify(result.data) ?? "null", json: true };
    }
    return await fromResponse(result instanceof Response ? result : typeof result === "string" ? new Response(result) : Response.json(result));
  } catch (error) {
    if (error instanceof Response) return fromResponse(error);
    // as React Router answers a resource route's unexpected error
    build.entry.module.handleError?.(error, args);
    return fromResponse(new Response("Unexpected Server Error", { status: 500, headers: { "X-Remix-Error": "yes" } }));
  }
}

/**
 * Writes a direct answer in one write (status line, headers, body): `security` (the defaults,
 * which a route's own headers replace; empty when already set on `res`), the route's headers,
 * JSON's content type, then the cache rule of `setResponseHeaders`.
 */
function writeAnswer(req: IncomingMessage, res: ServerResponse, answer: Answer, security: [string, string][]) {
  if (res.destroyed || res.writableEnded) return;
  const out = new Map<string, [string, string]>();
  for (const [name, value] of security) out.set(name.toLowerCase(), [name, value]);
  const cookies = answer.headers?.getSetCookie() ?? [];
  for (const [name, value] of answer.headers ?? []) if (name !== "set-cookie") out.set(name, [name, value]);
  if (answer.json && !out.has("content-type")) out.set("content-type", ["content-type", "application/json"]);
  if (req.headers.cookie || cookies.length) out.set("cache-control", ["Cache-Control", "private, no-store"]);
  const flat: string[] = [];
  for (const [name, value] of out.values()) flat.push(name, value);
  for (const cookie of cookies) flat.push("set-cookie", cookie);
  flat.push("Content-Length", String(Buffer.byteLength(answer.body)));
  // headers given here replace those set on `res` before (node's writeHead with a list)
  res.writeHead(answer.status, answer.statusText || undefined, flat);
  res.end(answer.body);
}

type ScienceFront = ProxyTrust & {
  securityHeaders: (nonce: string) => [string, string][];
  build: ServerBuild;
};
type Answer = { status: number; statusText?: string; headers?: Headers; body: string | Buffer; json: boolean };

/** A science GET in plain node: as `directRequest` after express's layers, without express. */
async function answerScienceGet(req: IncomingMessage, res: ServerResponse, loader: RouteFunction, front: ScienceFront) {
  const nonce = cspNonce();
  const headers = fetchHeaders(req, INTERNAL_NAMES);
  headers.set(INTERNAL_HEADERS.nonce, nonce);
  // express's req.ip: the nearest address the configured proxies do not vouch for
  headers.set(INTERNAL_HEADERS.clientIp, proxyaddr(req, front.trust) ?? "unknown");
  const url = requestUrl(requestProtocol(req, front), requestHost(req, front), req.url ?? "");
  if (url === null) {
    // as express's path answers it (`fetchRequest`): a 400 naming the host, with the headers
    const body = JSON.stringify(badHost);
    const flat = [...front.securityHeaders(nonce), ["Cache-Control", "no-store"], ["Content-Type", "application/json; charset=utf-8"], ["Content-Length", String(Buffer.byteLength(body))]].flat();
    res.writeHead(400, flat);
    return void res.end(body);
  }
  writeAnswer(req, res, await runDirect(loader, new Request(url, { headers }), front.build), front.securityHeaders(nonce));
}

async function fromResponse(response: Response): Promise<Answer> {
  return { status: response.status, statusText: response.statusText, headers: response.headers, body: Buffer.from(await response.arrayBuffer()), json: false };
}

/**
 * The URL a route gets: the protocol and host as express computes them and the request target's
 * path and query. An absolute-form target (`GET http://elsewhere/path`, RFC 9112 §3.2.2) keeps
 * only its path and query, so that its authority is never glued onto ours. Null when no URL can
 * be made (a Host with a space, `<`, an unclosed `[` …): the front answers that 400.
 */
export function requestUrl(protocol: string, host: string, target: string): string | null {
  let pathAndQuery = target;
  if (!target.startsWith("/")) {
    if (!URL.canParse(target)) return null;
    const absolute = new URL(target);
    pathAndQuery = `${absolute.pathname}${absolute.search}`;
  }
  const url = URL.parse(`${protocol}://${host}${pathAndQuery}`);
  return url ? url.href : null;
}

const BAD_HOST = "The request's Host header is not a host name; send the address this site is served at.";
const badHost = { error: BAD_HOST, issues: [{ path: "host", message: "Host is not a valid host name" }] };

const firstValue = (value: string | string[] | undefined) => (Array.isArray(value) ? value[0] : value);

/** How far the front trusts proxies: express's compiled `trust proxy` and whether it is set. */
type ProxyTrust = { trust: (address: string, hop: number) => boolean; trustEnabled: boolean };
const proxyTrust = (app: express.Application): ProxyTrust => ({ trust: app.get("trust proxy fn"), trustEnabled: app.enabled("trust proxy") });

/** express's req.protocol, for either path. */
function requestProtocol(req: IncomingMessage, { trust }: ProxyTrust) {
  const protocol = (req.socket as TLSSocket).encrypted ? "https" : "http";
  if (!trust(req.socket.remoteAddress ?? "", 0)) return protocol;
  const header = firstValue(req.headers["x-forwarded-proto"]) || protocol;
  return header.split(",")[0].trim();
}

/** The host React Router sees, as @react-router/express builds it (from express's req.hostname), for either path. */
function requestHost(req: IncomingMessage, { trust, trustEnabled }: ProxyTrust) {
  const forwarded = trustEnabled ? firstValue(req.headers["x-forwarded-host"]) : undefined;
  const [, forwardedPort] = forwarded?.split(":") ?? [];
  const [, hostPort] = req.headers.host?.split(":") ?? [];
  const port = [forwardedPort, hostPort].map((p) => Number.parseInt(p ?? "", 10)).find((p) => Number.isSafeInteger(p));
  // express's req.hostname: the forwarded host only from a trusted proxy, without its port
  let host = forwarded && trust(req.socket.remoteAddress ?? "", 0) ? forwarded.split(",")[0].trimEnd() : req.headers.host;
  if (host) {
    const offset = host[0] === "[" ? host.indexOf("]") + 1 : 0;
    const colon = host.indexOf(":", offset);
    if (colon !== -1) host = host.slice(0, colon);
  }
  const hostname = host?.split(/[\\/?#@]/)[0] || "localhost";
  return `${hostname}${port ? `:${port}` : ""}`;
}

function refuse(res: ExpressResponse, api: boolean, status: number, message: string, detail: string, field = "(request)") {
  res.status(status).setHeader("Cache-Control", "no-store");
  if (api) return res.json({ error: message, issues: [{ path: field, message: detail }] });
  return res.type("html").send(refusalPage(status, message));
}

function refusalPage(status: number, message: string) {
  const escaped = message.replace(/[&<>"]/g, (c) => `&#${c.charCodeAt(0)};`);
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Refused · Nightshare</title></head><body style="font-family:sans-serif;max-width:40rem;margin:4rem auto;padding:0 1.5rem"><p>Error ${status}</p><h1>Not accepted</h1><p>${escaped}</p><p><a href="/">Back to the start page</a></p></body></html>`;
}

/** Reads the body up to `limit` bytes; `null` when it is larger (the rest is discarded). */
function readLimitedBody(req: IncomingMessage, limit: number): Promise<Buffer | null> {
  const declared = Number(req.headers["content-length"]);
  if (Number.isFinite(declared) && declared > limit) {
    discardRest(req);
    return Promise.resolve(null);
  }
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let total = 0;
    const cleanup = () => {
      req.off("data", onData);
      req.off("end", onEnd);
      req.off("error", onError);
    };
    const onData = (chunk: Buffer) => {
      total += chunk.length;
      if (total > limit) {
        cleanup();
        discardRest(req);
        resolve(null);
      } else chunks.push(chunk);
    };
    const onEnd = () => {
      cleanup();
      resolve(Buffer.concat(chunks, total));
    };
    const onError = (error: Error) => {
      cleanup();
      reject(error);
    };
    req.on("data", onData);
    req.on("end", onEnd);
    req.on("error", onError);
  });
}

const DISCARD_MAX_BYTES = 32 * 1024 * 1024;
const DISCARD_MAX_MS = 5_000;

/**
 * Reads and drops what is left of a refused body, so that the client can read our 413 (closing
 * a socket with unread data resets it); past 32 MB or 5 s the connection is cut instead.
 */
function discardRest(req: IncomingMessage) {
  if (req.complete) return;
  let dropped = 0;
  const timer = setTimeout(() => req.socket.destroy(), DISCARD_MAX_MS);
  timer.unref();
  req.on("data", (chunk: Buffer) => {
    dropped += chunk.length;
    if (dropped > DISCARD_MAX_BYTES) req.socket.destroy();
  });
  req.once("end", () => clearTimeout(timer));
  req.once("close", () => clearTimeout(timer));
  req.resume();
}

/**
 * The CSP nonce: 16 random bytes, taken from a pool filled 4 KB at a time (one call to the
 * system's generator per 256 requests instead of one per request; every nonce is still fresh
 * randomness, never reused).
 */
const NONCE_BYTES = 16;
const NONCE_SLOT = "{nonce}";
let noncePool = Buffer.alloc(0);
let nonceOffset = 0;
function cspNonce() {
  if (nonceOffset + NONCE_BYTES > noncePool.length) {
    noncePool = randomBytes(256 * NONCE_BYTES);
    nonceOffset = 0;
  }
  const nonce = noncePool.toString("base64", nonceOffset, nonceOffset + NONCE_BYTES);
  nonceOffset += NONCE_BYTES;
  return nonce;
}

/** The request's headers as Fetch API headers, without those named in `drop`. */
function fetchHeaders(req: IncomingMessage, drop: readonly string[] = []) {
  const headers = new Headers();
  for (const [key, values] of Object.entries(req.headers)) {
    if (values === undefined || drop.includes(key)) continue;
    if (Array.isArray(values)) for (const value of values) headers.append(key, value);
    else headers.set(key, values);
  }
  return headers;
}

/** The Fetch API request React Router (or a direct route) gets; null when a 413 was answered. */
async function fetchRequest(req: ExpressRequest, res: ExpressResponse): Promise<Request | null> {
  const trust = proxyTrust(req.app);
  const href = requestUrl(requestProtocol(req, trust), requestHost(req, trust), req.originalUrl);
  if (href === null) {
    discardRest(req);
    refuse(res, isApiPath(req.path), 400, BAD_HOST, badHost.issues[0].message, "host");
    return null;
  }
  let body: Buffer | undefined;
  const headers = fetchHeaders(req);
  if (req.method !== "GET" && req.method !== "HEAD") {
    const { limit, what } = bodyLimitFor(req.path);
    const read = await readLimitedBody(req, limit);
    headers.delete("transfer-encoding");
    if (read === null) {
      const message = `The request is larger than ${megabytes(limit)}, the limit for ${what}. Nothing was saved.`;
      if (isApiPath(req.path)) {
        res.status(413).setHeader("Cache-Control", "no-store");
        res.json({ error: message, issues: [{ path: "(body)", message }] });
        return null;
      }
      // Pages: React Router renders the error page (the root middleware answers 413).
      headers.set(INTERNAL_HEADERS.bodyTooLarge, String(limit));
      headers.delete("content-length");
      headers.delete("content-type");
    } else {
      body = read;
      headers.set("content-length", String(read.length));
    }
  }
  const controller = new AbortController();
  let finished = false;
  res.on("finish", () => (finished = true));
  res.on("close", () => finished || controller.abort());
  return new Request(href, { method: req.method, headers, body: body ? new Uint8Array(body.buffer as ArrayBuffer, body.byteOffset, body.byteLength) : undefined, signal: controller.signal });
}

function setResponseHeaders(req: ExpressRequest, res: ExpressResponse, headers: Headers) {
  for (const [key, value] of headers.entries()) {
    // A route's own security headers (e.g. a sandbox for uploaded files) replace the defaults.
    if (key === "set-cookie") res.append(key, value);
    else res.setHeader(key, value);
  }
  // Nothing said to a signed-in browser may sit in a shared or back-button cache.
  if (req.headers.cookie || headers.has("set-cookie")) res.setHeader("Cache-Control", "private, no-store");
}

async function sendResponse(req: ExpressRequest, res: ExpressResponse, response: Response) {
  if (res.destroyed || res.writableEnded) {
    await response.body?.cancel();
    return;
  }
  res.statusMessage = response.statusText;
  res.status(response.status);
  setResponseHeaders(req, res, response.headers);
  if (response.headers.get("Content-Type")?.match(/text\/event-stream/i)) res.flushHeaders();
  if (!response.body) return void res.end();
  // JSON is never streamed: one write with the headers instead of a write per chunk and one to end
  if (/^application\/json\b/i.test(response.headers.get("Content-Type") ?? "")) {
    const body = Buffer.from(await response.arrayBuffer());
    res.setHeader("Content-Length", body.length);
    return void res.end(body);
  }
  try {
    await writeReadableStreamToWritable(response.body, res);
  } catch (error) {
    if (res.destroyed || res.writableEnded) return;
    throw error;
  }
}

/** `buildDir`: the folder `react-router build` wrote (server/ and client/). */
export async function loadBuild(buildDir: string) {
  const serverEntry = path.join(buildDir, "server/index.js");
  const build = (await import(serverEntry)) as ServerBuild;
  return { build, clientDir: path.join(buildDir, "client") };
}
