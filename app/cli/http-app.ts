// The HTTP front of the app: security headers, static files from the client build, the
// cross-site and body-size checks, then React Router's request handler. Shared by `npm start`
// and the integration and browser tests, so both run the same stack.
import { randomBytes } from "node:crypto";
import type { IncomingMessage } from "node:http";
import path from "node:path";
import { writeReadableStreamToWritable } from "@react-router/node";
import express, { type Request as ExpressRequest, type Response as ExpressResponse } from "express";
import { createRequestHandler, type ServerBuild } from "react-router";
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

  app.use((req, res, next) => {
    for (const name of Object.values(INTERNAL_HEADERS)) delete req.headers[name];
    const nonce = randomBytes(16).toString("base64");
    req.headers[INTERNAL_HEADERS.nonce] = nonce;
    const framed = framedBySameOrigin(req.method, req.path, req.query);
    res.setHeader("Content-Security-Policy", contentSecurityPolicy({ nonce, formActionOrigins, frameAncestors: framed ? "'self'" : "'none'" }));
    res.setHeader("X-Content-Type-Options", "nosniff");
    res.setHeader("X-Frame-Options", framed ? "SAMEORIGIN" : "DENY");
    res.setHeader("Referrer-Policy", "same-origin");
    res.setHeader("Cross-Origin-Opener-Policy", "same-origin");
    if (https) res.setHeader("Strict-Transport-Security", "max-age=31536000");
    next();
  });
  app.use("/assets", express.static(path.join(clientDir, "assets"), { immutable: true, maxAge: "1y" }));
  // The client build's top-level files all have an extension (favicon.ico, robots.txt …): a path
  // without one is a page or an API call, and skips the file system look-up.
  const topLevelFiles = express.static(clientDir, { maxAge: "1h", index: false });
  app.use((req, res, next) => (/\.[^/]+$/.test(req.path) ? topLevelFiles(req, res, next) : next()));
  app.use((req, _res, next) => {
    // Set on every request, so a client cannot choose its own rate-limit bucket.
    req.headers[INTERNAL_HEADERS.clientIp] = req.ip ?? req.socket.remoteAddress ?? "unknown";
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
  const handle = handler ?? createRequestHandler(build, process.env.NODE_ENV);
  app.use(async (req, res, next) => {
    try {
      await reactRouterRequest(req, res, handle);
    } catch (error) {
      next(error);
    }
  });
  return app;
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

async function reactRouterRequest(req: ExpressRequest, res: ExpressResponse, handle: Handler) {
  let body: Buffer | undefined;
  const headers = new Headers();
  for (const [key, values] of Object.entries(req.headers)) {
    if (values === undefined) continue;
    if (Array.isArray(values)) for (const value of values) headers.append(key, value);
    else headers.set(key, values);
  }
  if (req.method !== "GET" && req.method !== "HEAD") {
    const { limit, what } = bodyLimitFor(req.path);
    const read = await readLimitedBody(req, limit);
    headers.delete("transfer-encoding");
    if (read === null) {
      const message = `The request is larger than ${megabytes(limit)}, the limit for ${what}. Nothing was saved.`;
      if (isApiPath(req.path)) {
        res.status(413).setHeader("Cache-Control", "no-store");
        return void res.json({ error: message, issues: [{ path: "(body)", message }] });
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
  const url = new URL(`${req.protocol}://${requestHost(req)}${req.originalUrl}`);
  const request = new Request(url.href, { method: req.method, headers, body: body ? new Uint8Array(body.buffer as ArrayBuffer, body.byteOffset, body.byteLength) : undefined, signal: controller.signal });
  const response = await handle(request);
  await sendResponse(req, res, response);
}

/** The host React Router sees, as @react-router/express builds it. */
function requestHost(req: ExpressRequest) {
  const [, forwardedPort] = req.app.enabled("trust proxy") ? (req.get("X-Forwarded-Host")?.split(":") ?? []) : [];
  const [, hostPort] = req.get("host")?.split(":") ?? [];
  const port = [forwardedPort, hostPort].map((p) => Number.parseInt(p ?? "", 10)).find((p) => Number.isSafeInteger(p));
  const hostname = req.hostname?.split(/[\\/?#@]/)[0] || "localhost";
  return `${hostname}${port ? `:${port}` : ""}`;
}

async function sendResponse(req: ExpressRequest, res: ExpressResponse, response: Response) {
  if (res.destroyed || res.writableEnded) {
    await response.body?.cancel();
    return;
  }
  res.statusMessage = response.statusText;
  res.status(response.status);
  for (const [key, value] of response.headers.entries()) {
    // A route's own security headers (e.g. a sandbox for uploaded files) replace the defaults.
    if (key === "set-cookie") res.append(key, value);
    else res.setHeader(key, value);
  }
  // Nothing said to a signed-in browser may sit in a shared or back-button cache.
  if (req.headers.cookie || response.headers.has("set-cookie")) res.setHeader("Cache-Control", "private, no-store");
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

export async function loadBuild(root: string) {
  const serverEntry = path.join(root, "build/server/index.js");
  const build = (await import(serverEntry)) as ServerBuild;
  return { build, clientDir: path.join(root, "build/client") };
}
