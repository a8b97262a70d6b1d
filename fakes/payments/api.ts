// The slice of Stripe's v1 HTTP API the product uses.
import { Router, urlencoded, type Request } from "express";
import { ApiError, invalidParam, noSuch } from "./errors";
import { idempotency } from "./idempotency";
import type { LineItem, StoredSession } from "./sessions";
import type { SessionStore } from "./store";
import type { WebhookSender } from "./webhooks";

export function apiRouter(deps: { store: SessionStore; sender: WebhookSender; payBaseUrl: string }): Router {
  const { store, sender, payBaseUrl } = deps;
  const router = Router();
  router.use(urlencoded({ extended: true, limit: "256kb" }));
  router.use(idempotency());

  router.post("/checkout/sessions", (req, res) => {
    const stored = store.create(req.body ?? {}, payBaseUrl);
    res.json(withExpansions(stored, req));
  });

  router.get("/checkout/sessions", (req, res) => {
    const limit = listLimit(req);
    const status = typeof req.query.status === "string" ? req.query.status : undefined;
    let all = store.list();
    if (status) all = all.filter((s) => s.session.status === status);
    const after = typeof req.query.starting_after === "string" ? req.query.starting_after : undefined;
    if (after) {
      const at = all.findIndex((s) => s.session.id === after);
      if (at < 0) throw noSuch("checkout.session", after, "starting_after");
      all = all.slice(at + 1);
    }
    res.json({
      object: "list",
      data: all.slice(0, limit).map((s) => withExpansions(s, req)),
      has_more: all.length > limit,
      url: "/v1/checkout/sessions",
    });
  });

  router.get("/checkout/sessions/:id", (req, res) => {
    res.json(withExpansions(store.get(req.params.id), req));
  });

  router.get("/checkout/sessions/:id/line_items", (req, res) => {
    const stored = store.get(req.params.id);
    res.json(lineItemList(stored.session.id, stored.lineItems, listLimit(req)));
  });

  router.post("/checkout/sessions/:id/expire", (req, res) => {
    res.json(store.expire(req.params.id));
  });

  router.get("/events/:id", (req, res) => {
    const record = sender.get(req.params.id);
    if (!record) throw noSuch("event", req.params.id, "id");
    res.json(record.event);
  });

  router.use((req) => {
    throw new ApiError(
      404,
      "invalid_request_error",
      `Unrecognized request URL (${req.method}: ${req.originalUrl.split("?")[0]}). ` +
        "This payment fake implements only what fakes/payments/README.md lists.",
    );
  });
  return router;
}

function expandList(req: Request): string[] {
  const raw = req.method === "GET" ? req.query.expand : (req.body as Record<string, unknown> | undefined)?.expand;
  if (raw === undefined) return [];
  const list = Array.isArray(raw) ? raw : typeof raw === "object" && raw !== null ? Object.values(raw) : [raw];
  return list.map(String);
}

function withExpansions(stored: StoredSession, req: Request): object {
  const expand = expandList(req);
  for (const path of expand) {
    if (path !== "line_items") {
      throw invalidParam("expand", `This property cannot be expanded (${path}). The payment fake expands only line_items.`);
    }
  }
  if (!expand.includes("line_items")) return stored.session;
  return { ...stored.session, line_items: lineItemList(stored.session.id, stored.lineItems, 10) };
}

function lineItemList(sessionId: string, items: LineItem[], limit: number) {
  return {
    object: "list",
    data: items.slice(0, limit),
    has_more: items.length > limit,
    url: `/v1/checkout/sessions/${sessionId}/line_items`,
  };
}

function listLimit(req: Request): number {
  const raw = req.query.limit;
  if (raw === undefined) return 10;
  const n = typeof raw === "string" && /^\d+$/.test(raw) ? Number(raw) : NaN;
  if (!(n >= 1 && n <= 100)) throw invalidParam("limit", "This value must be between 1 and 100.");
  return n;
}
