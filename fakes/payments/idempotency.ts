import type { RequestHandler } from "express";
import { ApiError, invalidParam } from "./errors";

interface Saved {
  fingerprint: string;
  status: number;
  body: unknown;
}

/**
 * Stripe's Idempotency-Key: a POST repeated with the same key gets the first response back
 * (with `Idempotent-Replayed: true`) instead of acting twice; the same key with other
 * parameters is an `idempotency_error`. Only successful results are kept: like Stripe, a
 * request refused by validation leaves nothing behind and may be retried with its key.
 */
export function idempotency(): RequestHandler {
  const saved = new Map<string, Saved>();
  return (req, res, next) => {
    const key = req.get("idempotency-key");
    if (req.method !== "POST" || !key) return next();
    if (key.length > 255) {
      throw invalidParam("Idempotency-Key", "Idempotency keys can be at most 255 characters long.");
    }
    const fingerprint = JSON.stringify([req.method, req.originalUrl, req.body ?? {}]);
    const prior = saved.get(key);
    if (prior) {
      if (prior.fingerprint !== fingerprint) {
        throw new ApiError(
          400,
          "idempotency_error",
          "Keys for idempotent requests can only be used with the same parameters they were first used with. " +
            `Try using a key other than '${key}' if you meant to execute a different request.`,
        );
      }
      res.set("Idempotent-Replayed", "true").set("Idempotency-Key", key).status(prior.status).json(prior.body);
      return;
    }
    const send = res.json.bind(res);
    res.json = (body: unknown) => {
      if (res.statusCode >= 200 && res.statusCode < 300) {
        saved.set(key, { fingerprint, status: res.statusCode, body: structuredClone(body) });
      }
      res.set("Idempotency-Key", key);
      return send(body);
    };
    next();
  };
}
