import { useEffect, useRef } from "react";
import type { FieldValues, Path, UseFormReturn } from "react-hook-form";

export type ApiIssue = { path: string; message: string };
export type ApiError = { error: string; issues: ApiIssue[] };

export function isApiError(x: unknown): x is ApiError {
  return typeof x === "object" && x !== null && "error" in x && "issues" in x;
}

/**
 * Re-validates the form as the user types and, when it is valid, calls `send` after a pause.
 * Field errors from the client schema appear at once; the server's 400 issues are put back on
 * the same fields by `useServerIssues`. What the user typed is never replaced.
 */
export function useLiveForm<T extends FieldValues, O>(form: UseFormReturn<T, unknown, O>, send: (values: O) => void, delayMs = 450) {
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const sendRef = useRef(send);
  sendRef.current = send;
  useEffect(() => {
    const sub = form.watch(() => {
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => {
        void form.handleSubmit((values) => sendRef.current(values))();
      }, delayMs);
    });
    return () => {
      sub.unsubscribe();
      if (timer.current) clearTimeout(timer.current);
    };
  }, [form, delayMs]);
}

export function useServerIssues<T extends FieldValues>(form: UseFormReturn<T, unknown, unknown>, body: unknown, fields: readonly string[]) {
  useEffect(() => {
    if (!isApiError(body)) return;
    for (const issue of body.issues) {
      const field = fields.includes(issue.path) ? issue.path : fields.find((f) => issue.path.startsWith(`${f}.`));
      if (field) form.setError(field as Path<T>, { type: "server", message: issue.message });
    }
  }, [body, form, fields]);
}

export const fmt = (x: number | null | undefined, digits = 2) =>
  x === null || x === undefined || !Number.isFinite(x) ? "—" : x.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: digits });

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

export const MOON_COLOURS = { dark: "#1e3a5f", grey: "#8a9bb0", bright: "#e8a849" } as const;
