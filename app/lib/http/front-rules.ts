// Pure rules of the HTTP front (app/cli/http-app.ts): proxy trust, body limits, same-origin
// checks and the Content-Security-Policy. No express, no database: unit-testable, and importable
// from the environment schema.
import { isIP } from "node:net";
import { SCIENCE_CASE_MAX_BYTES } from "../proposals/science-case";

// ---------------------------------------------------------------------------------------------
// Proxy trust

/** What express's `trust proxy` setting gets: false, a hop count, or a list of addresses/CIDRs. */
export type TrustProxy = false | number | string[];

const NAMED_RANGES = new Set(["loopback", "linklocal", "uniquelocal"]);

function validAddressOrRange(entry: string) {
  if (NAMED_RANGES.has(entry)) return true;
  const [address, prefix, ...rest] = entry.split("/");
  if (rest.length) return false;
  const family = isIP(address);
  if (!family) return false;
  if (prefix === undefined) return true;
  if (!/^\d{1,3}$/.test(prefix)) return false;
  return Number(prefix) <= (family === 4 ? 32 : 128);
}

/**
 * `TRUST_PROXY`: unset, empty or `0` → trust no proxy; a whole number n → trust the n nearest
 * hops (express's hop count: the address used is the n-th from the right of
 * `X-Forwarded-For` plus the socket); otherwise a comma list of proxy addresses, CIDR ranges or
 * `loopback`/`linklocal`/`uniquelocal`. Anything else (`true`, `yes`, a host name) is refused,
 * because "trust every hop" lets a client choose its own address.
 */
export function parseTrustProxy(value: string | undefined): { ok: true; value: TrustProxy } | { ok: false; message: string } {
  const text = (value ?? "").trim();
  if (text === "" || text === "0" || text === "false") return { ok: true, value: false };
  if (/^\d+$/.test(text)) {
    const hops = Number(text);
    if (hops > 10) return { ok: false, message: "a hop count above 10 is not plausible; give the number of proxies in front of the app" };
    return { ok: true, value: hops };
  }
  const entries = text.split(",").map((e) => e.trim()).filter(Boolean);
  const bad = entries.filter((e) => !validAddressOrRange(e));
  if (bad.length || entries.length === 0) {
    return {
      ok: false,
      message: `must be the number of proxy hops (e.g. 1) or a comma list of proxy addresses/CIDR ranges; not understood: ${bad.join(", ") || text}`,
    };
  }
  return { ok: true, value: entries };
}

// ---------------------------------------------------------------------------------------------
// Body limits

export const DEFAULT_BODY_LIMIT = 1024 * 1024;
/** The multipart envelope around an uploaded file (headers, boundaries, other fields). */
export const MULTIPART_MARGIN = 256 * 1024;
export const SCIENCE_CASE_MARGIN = 2 * 1024 * 1024;
/** A 2 MB target CSV (the import's own limit) URL-encoded can triple in size. */
export const TARGET_IMPORT_BODY_LIMIT = 3 * 2_000_000 + MULTIPART_MARGIN;

const bodyLimits: { pattern: RegExp; limit: number; what: string }[] = [
  // 2 MB over the file limit: a file a little too large still reaches the route, which answers
  // with its message next to the file field; only far larger bodies are cut here.
  { pattern: /^\/proposals\/[^/]+\/science-case\/?$/, limit: SCIENCE_CASE_MAX_BYTES + SCIENCE_CASE_MARGIN, what: "a science-case upload" },
  { pattern: /^\/proposals\/[^/]+\/targets\/?$/, limit: TARGET_IMPORT_BODY_LIMIT, what: "a target import" },
];

/** The most bytes a request body to this path may have (JSON, forms, uploads). */
export function bodyLimitFor(pathname: string): { limit: number; what: string } {
  const path = pathname.replace(/\.data$/, "");
  for (const rule of bodyLimits) if (rule.pattern.test(path)) return { limit: rule.limit, what: rule.what };
  return { limit: DEFAULT_BODY_LIMIT, what: "a request" };
}

export function megabytes(bytes: number) {
  const mb = bytes / (1024 * 1024);
  return `${Number.isInteger(mb) ? mb : mb.toFixed(1)} MB`;
}

// ---------------------------------------------------------------------------------------------
// Cross-site requests

export const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/** Signature-checked by the payment service; no browser posts there. */
export const WEBHOOK_PATHS = new Set(["/api/v1/payments/webhook"]);

export function isApiPath(pathname: string) {
  return pathname === "/api" || pathname.startsWith("/api/");
}

/** `application/json` or `application/<something>+json`, with or without parameters. */
export function isJsonContentType(value: string | undefined) {
  if (!value) return false;
  const type = value.split(";")[0].trim().toLowerCase();
  return type === "application/json" || (type.startsWith("application/") && type.endsWith("+json"));
}

/**
 * Why a state-changing request looks cross-site, or null when it does not. `Sec-Fetch-Site`
 * `cross-site`/`same-site` is refused (a page on another port or subdomain is same-site, not
 * same-origin); an `Origin` must be one of `allowedOrigins` (`null` never is). A request with
 * neither header does not come from a current browser's cross-site form or fetch.
 */
export function crossSiteReason(headers: { origin?: string; secFetchSite?: string }, allowedOrigins: ReadonlySet<string>): string | null {
  const site = headers.secFetchSite?.toLowerCase();
  if (site === "cross-site" || site === "same-site") return `Sec-Fetch-Site is ${site}`;
  if (headers.origin !== undefined && !allowedOrigins.has(headers.origin.toLowerCase())) return `Origin ${headers.origin} is not this site`;
  return null;
}

// ---------------------------------------------------------------------------------------------
// Content-Security-Policy

/**
 * The policy for every response. Scripts: our own files and the inline scripts React Router
 * renders with this request's nonce. Styles allow inline `style` attributes (React and the chart
 * library set them). `form-action` lets a form post end on the payment service's page.
 */
/**
 * The one response our own pages may frame: a committee member's inline science case
 * (`/review/:proposalId/files/:fileId?inline=1`, shown in the review page). Everything else stays unframeable.
 */
export function framedBySameOrigin(method: string, path: string, query: () => Record<string, unknown>) {
  // the query is read only for the file path (parsing it is most of this check's cost)
  return method === "GET" && /^\/review\/\d{1,10}\/files\/\d{1,10}$/.test(path) && query().inline === "1";
}

export function contentSecurityPolicy({ nonce, formActionOrigins = [], frameAncestors = "'none'" }: { nonce: string; formActionOrigins?: string[]; frameAncestors?: string }) {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    `form-action ${["'self'", ...formActionOrigins].join(" ")}`,
    `frame-ancestors ${frameAncestors}`,
  ].join("; ");
}

/** Where a form post may end up besides our own pages: the payment service's hosted page. */
export function paymentOrigins(env: Record<string, string | undefined>): string[] {
  if (!env.STRIPE_API_HOST) return ["https://checkout.stripe.com"];
  const protocol = env.STRIPE_API_PROTOCOL === "http" ? "http" : "https";
  const port = env.STRIPE_API_PORT ? `:${env.STRIPE_API_PORT}` : "";
  try {
    return [new URL(`${protocol}://${env.STRIPE_API_HOST}${port}`).origin];
  } catch {
    return [];
  }
}
