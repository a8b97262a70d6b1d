import { useEffect, useRef, useState } from "react";
import { plainIssue } from "~/lib/forms";

export type ApiIssue = { path: string; message: string };
export type ApiError = { error: string; issues: ApiIssue[] };

export function isApiError(x: unknown): x is ApiError {
  return typeof x === "object" && x !== null && "error" in x && "issues" in x;
}

/**
 * A form's values as a JSON body: strings trimmed, empty fields left out (an empty field means
 * "not given"; the API refuses "" for a number), nested objects kept.
 */
export function compact<T>(value: T): T {
  if (typeof value === "string") return value.trim() as T;
  if (Array.isArray(value)) return value.map(compact) as T;
  if (value && typeof value === "object") {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) {
      if (v === undefined || (typeof v === "string" && v.trim() === "")) continue;
      out[k] = compact(v);
    }
    return out as T;
  }
  return value;
}

/** A request to the JSON API: GET with a query, or POST with a JSON body. */
export type ApiRequest = { method: "GET"; url: string } | { method: "POST"; url: string; body: unknown };

export type LiveStatus = "current" | "computing" | "refused" | "failed";

type LiveState<R> = {
  result: R;
  /** the request whose answer `result` is */
  resultKey: string;
  issues: ApiIssue[];
  issuesKey: string | null;
  failure: string | null;
  failureKey: string | null;
};

/**
 * Live recomputation through the JSON API. `request` is derived from the form on every render;
 * when it differs from the request behind the numbers on screen, it is sent after `delayMs` of
 * quiet (earlier requests are aborted). The last good result stays on screen; `status` is
 * "current" only while that result belongs to exactly the inputs shown.
 * Plain fetch() rather than a fetcher: a fetcher's action URL would get `.data` appended.
 */
export function useLiveApi<R>(request: ApiRequest, initial: R, delayMs = 300) {
  const key = JSON.stringify(request);
  const [state, setState] = useState<LiveState<R>>(() => ({ result: initial, resultKey: key, issues: [], issuesKey: null, failure: null, failureKey: null }));
  const resultKey = useRef(state.resultKey);
  resultKey.current = state.resultKey;

  useEffect(() => {
    if (key === resultKey.current) return;
    const controller = new AbortController();
    const timer = setTimeout(async () => {
      try {
        const init: RequestInit =
          request.method === "GET"
            ? { method: "GET", headers: { Accept: "application/json" }, signal: controller.signal }
            : { method: "POST", headers: { Accept: "application/json", "Content-Type": "application/json" }, body: JSON.stringify(request.body), signal: controller.signal };
        const res = await fetch(request.url, init);
        const body: unknown = await res.json().catch(() => null);
        if (controller.signal.aborted) return;
        if (res.ok) {
          setState((s) => ({ ...s, result: body as R, resultKey: key, issues: [], issuesKey: null, failure: null, failureKey: null }));
        } else if (res.status === 400 && isApiError(body)) {
          setState((s) => ({ ...s, issues: body.issues, issuesKey: key, failure: body.issues.length ? null : body.error, failureKey: body.issues.length ? null : key }));
        } else {
          const message = isApiError(body) ? body.error : `The server answered ${res.status}.`;
          setState((s) => ({ ...s, issues: [], issuesKey: null, failure: message, failureKey: key }));
        }
      } catch {
        if (controller.signal.aborted) return;
        setState((s) => ({ ...s, issues: [], issuesKey: null, failure: "The server could not be reached.", failureKey: key }));
      }
    }, delayMs);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
    // `key` stands for `request`
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, delayMs]);

  const status: LiveStatus = key === state.resultKey ? "current" : key === state.issuesKey ? "refused" : key === state.failureKey ? "failed" : "computing";
  // the refusal of an earlier input stays visible while a newer one is computed; none once the result matches
  const issues = status === "current" ? [] : state.issues;
  const failure = status === "failed" ? state.failure : null;
  return { result: state.result, status, issues, failure };
}

/**
 * API issues → a message per form field, in words (`plainIssue`), plus those that concern no field
 * on the form. `fields` maps the form's field names to their names for people; `apiPath` turns an
 * issue path into the form's field name (identity by default).
 */
export function issuesByField<F extends string>(
  issues: ApiIssue[],
  fields: Record<F, string>,
  apiPath: (path: string) => string = (p) => p,
): { byField: Partial<Record<F, string>>; other: string[] } {
  const names: Record<string, string> = {};
  for (const [f, n] of Object.entries(fields) as [F, string][]) {
    names[f.split(".").pop() as string] = n.toLowerCase();
  }
  const byField: Partial<Record<F, string>> = {};
  const other: string[] = [];
  for (const issue of issues) {
    const path = apiPath(issue.path);
    const field = (Object.keys(fields) as F[]).find((f) => f === path) ?? (Object.keys(fields) as F[]).find((f) => path.startsWith(`${f}.`));
    if (field) {
      byField[field] ??= plainIssue(issue.message, { field, name: fields[field], names });
    } else {
      other.push(plainIssue(issue.message, { names }));
    }
  }
  return { byField, other };
}

export const STATUS_TEXT: Record<LiveStatus, string> = {
  current: "Up to date",
  computing: "Computing…",
  refused: "Not recomputed: correct the marked field. The numbers below are for the last inputs that worked.",
  failed: "Not recomputed. The numbers below are for the last inputs that worked.",
};

export const utcTime = (iso: string | null) => (iso ? iso.slice(11, 16) : "—");

/** Local wall-clock HH:MM of an ISO instant in an IANA zone (for display beside UTC). */
export function localTime(iso: string | null, timeZone: string) {
  if (!iso) return "—";
  try {
    return new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(new Date(iso));
  } catch {
    return "—";
  }
}

/** Props of a text input for an ISO date (the page shows every date as YYYY-MM-DD, whatever the browser's locale). */
export const isoDateInput = { type: "text", inputMode: "numeric", pattern: "\\d{4}-\\d{2}-\\d{2}", placeholder: "YYYY-MM-DD", autoComplete: "off", maxLength: 10 } as const;

/** A telescope of the observatory, as the Sky tools' site picker offers it. */
export type SkyTelescope = {
  id: number;
  name: string;
  siteName: string;
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  timeZone: string;
  apertureM: number;
  centralObstruction: number;
};
