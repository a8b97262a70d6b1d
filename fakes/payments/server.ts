// A local stand-in for the part of Stripe the product uses. Start: `npm run fake:payments`.
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import express, { type ErrorRequestHandler } from "express";
import { apiRouter } from "./api";
import { requireSecretKey } from "./auth";
import { ApiError, noSuch } from "./errors";
import { pageRouter } from "./page";
import { SessionStore } from "./store";
import { WebhookSender } from "./webhooks";

export interface PaymentFakeOptions {
  host?: string;
  /** 0 picks a free port; the one chosen is returned. */
  port: number;
  secretKey: string;
  webhookUrl?: string;
  webhookSecret: string;
  /** Base of the hosted page's address, if the browser reaches the fake under another name. */
  publicUrl?: string;
  /** Pauses between webhook attempts; attempts = length + 1. Default 1, 2, 4, 8 s (5 attempts). */
  webhookRetryDelaysMs?: number[];
  /** How often open sessions past `expires_at` are expired (and `checkout.session.expired` sent). */
  expirySweepMs?: number;
  log?: (line: string) => void;
}

export interface PaymentFake {
  url: string;
  port: number;
  close(): Promise<void>;
}

const LOOPBACK = /^(127\.\d{1,3}\.\d{1,3}\.\d{1,3}|::1|localhost)$/;

export async function createPaymentFake(options: PaymentFakeOptions): Promise<PaymentFake> {
  const host = options.host ?? "127.0.0.1";
  if (!LOOPBACK.test(host)) throw new Error(`The payment fake binds loopback only; refusing host ${host}.`);
  if (!Number.isInteger(options.port) || options.port < 0 || options.port > 65535) {
    throw new Error(`Invalid port for the payment fake: ${options.port}`);
  }
  if (!/^sk_test_\S+$/.test(options.secretKey)) {
    throw new Error("The payment fake needs a test secret key (sk_test_…); it never accepts a live key.");
  }
  if (!options.webhookSecret) throw new Error("The payment fake needs a webhook signing secret.");

  const sender = new WebhookSender({
    url: options.webhookUrl,
    secret: options.webhookSecret,
    retryDelaysMs: options.webhookRetryDelaysMs ?? [1000, 2000, 4000, 8000],
    log: options.log,
  });
  const store = new SessionStore(sender);
  const app = express();
  const server = createServer(app);
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.address() as AddressInfo).port;
  const url = `http://${host.includes(":") ? `[${host}]` : host}:${port}`;
  const payBaseUrl = (options.publicUrl ?? url).replace(/\/+$/, "");

  app.disable("x-powered-by");
  app.set("query parser", "extended");
  app.use((_req, res, next) => {
    res.set("Request-Id", `req_${Math.random().toString(36).slice(2, 16)}`);
    next();
  });
  app.get("/_fake/health", (_req, res) => {
    res.json({ ok: true, webhook_url: options.webhookUrl ?? null });
  });
  app.use("/v1", requireSecretKey(options.secretKey), apiRouter({ store, sender, payBaseUrl }));
  app.use("/_fake", requireSecretKey(options.secretKey), fakeAdminRouter(sender));
  app.use(pageRouter(store));
  app.use((_req, res) => {
    res.status(404).json({ error: { type: "invalid_request_error", message: "Not found." } });
  });
  app.use(errorHandler);

  const sweep = setInterval(() => store.sweepExpired(), options.expirySweepMs ?? 30_000);

  return {
    url,
    port,
    close: async () => {
      clearInterval(sweep);
      sender.close();
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
    },
  };
}

/** Test and development helpers; not part of Stripe's API. */
function fakeAdminRouter(sender: WebhookSender) {
  const router = express.Router();
  router.get("/events", (_req, res) => {
    res.json({ object: "list", data: sender.list().map(describe) });
  });
  router.get("/events/:id", (req, res) => {
    const record = sender.get(req.params.id);
    if (!record) throw noSuch("event", req.params.id, "id");
    res.json(describe(record));
  });
  router.post("/events/:id/resend", (req, res) => {
    const record = sender.resend(req.params.id);
    if (!record) throw noSuch("event", req.params.id, "id");
    res.json(describe(record));
  });
  return router;
}

function describe(record: ReturnType<WebhookSender["list"]>[number]) {
  return { id: record.event.id, type: record.event.type, created: record.event.created, delivered: record.delivered, attempts: record.attempts, event: record.event };
}

const errorHandler: ErrorRequestHandler = (error, _req, res, _next) => {
  if (error instanceof ApiError) return void res.status(error.status).json(error.body);
  // body-parser's errors carry a status (e.g. 413 too large, 400 malformed).
  const status = typeof error?.status === "number" && error.status >= 400 && error.status < 500 ? error.status : 500;
  const type = status === 500 ? "api_error" : "invalid_request_error";
  if (status === 500) console.error(error);
  res.status(status).json({ error: { type, message: status === 500 ? "The payment fake hit an internal error." : String(error.message) } });
};

// ---- started as a program -------------------------------------------------------------

function requiredEnv(name: string): string {
  const value = process.env[name];
  if (!value) {
    console.error(`payment fake: environment variable ${name} is missing (see fakes/payments/README.md).`);
    process.exit(1);
  }
  return value;
}

async function main(): Promise<void> {
  const portText = process.env.PAYMENTS_FAKE_PORT ?? "4242";
  if (!/^\d+$/.test(portText)) {
    console.error(`payment fake: PAYMENTS_FAKE_PORT must be a port number, got "${portText}".`);
    process.exit(1);
  }
  const webhookUrl = process.env.PAYMENTS_WEBHOOK_URL ?? "http://127.0.0.1:3000/api/v1/payments/webhook";
  try {
    new URL(webhookUrl);
  } catch {
    console.error(`payment fake: PAYMENTS_WEBHOOK_URL is not a URL: "${webhookUrl}".`);
    process.exit(1);
  }
  const fake = await createPaymentFake({
    host: process.env.PAYMENTS_FAKE_HOST ?? "127.0.0.1",
    port: Number(portText),
    secretKey: requiredEnv("STRIPE_SECRET_KEY"),
    webhookSecret: requiredEnv("STRIPE_WEBHOOK_SECRET"),
    webhookUrl,
    publicUrl: process.env.PAYMENTS_FAKE_PUBLIC_URL,
    log: (line) => console.log(`payment fake: ${line}`),
  }).catch((error: unknown) => {
    console.error(`payment fake: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  });
  console.log(`payment fake: listening on ${fake.url}, webhooks to ${webhookUrl} (state is in memory)`);
  const stop = () => void fake.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) void main();
