import type { z } from "zod";

export type FieldErrors = Record<string, string>;

/** zod issues → one message per field path, for the field-level messages on our forms. */
export function fieldErrors(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "form";
    out[key] ??= issue.message;
  }
  return out;
}

/** The body of a 400 from our JSON API: `{ error, issues: [{ path, message }] }`. */
export function apiIssues(error: z.ZodError, summary = "The request has invalid fields.") {
  return {
    error: summary,
    issues: error.issues.map((issue) => ({ path: issue.path.join(".") || "(body)", message: issue.message })),
  };
}
