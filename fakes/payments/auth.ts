import { timingSafeEqual } from "node:crypto";
import type { RequestHandler } from "express";
import { ApiError } from "./errors";

/** Stripe accepts the secret key as a Bearer token or as the Basic-auth user name (`curl -u sk_test_…:`). */
function presentedKey(header: string | undefined): string | undefined {
  if (!header) return undefined;
  const [scheme, value = ""] = header.trim().split(/\s+/, 2);
  if (/^bearer$/i.test(scheme)) return value;
  if (/^basic$/i.test(scheme)) return Buffer.from(value, "base64").toString("utf8").split(":")[0];
  return undefined;
}

function sameKey(a: string, b: string): boolean {
  const left = Buffer.from(a);
  const right = Buffer.from(b);
  return left.length === right.length && timingSafeEqual(left, right);
}

export function requireSecretKey(secretKey: string): RequestHandler {
  return (req, _res, next) => {
    const key = presentedKey(req.get("authorization"));
    if (!key) {
      throw new ApiError(
        401,
        "invalid_request_error",
        "You did not provide an API key. You need to provide your API key in the Authorization header, " +
          "using Bearer auth (e.g. 'Authorization: Bearer YOUR_SECRET_KEY').",
      );
    }
    if (!sameKey(key, secretKey)) {
      const shown = key.length > 12 ? `${key.slice(0, 8)}${"*".repeat(8)}${key.slice(-4)}` : "****";
      throw new ApiError(401, "invalid_request_error", `Invalid API Key provided: ${shown}`, {
        code: "api_key_invalid",
      });
    }
    next();
  };
}
