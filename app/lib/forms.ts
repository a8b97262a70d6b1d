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

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");

/**
 * One validation message in plain words, naming its field once. Messages from the parsers and the
 * API schemas come in several shapes — `Dec: must be …` (the parser's own label), `maxAirmass must
 * be at most 10` (the API's field id), or a bare `must be a calendar date` — and a caller used to
 * prefix the path as well, giving `dec: Dec: must …`. Give the field's id (`dec`, `site.timeZone`)
 * and its name for people (`Dec`, `Time zone`); `names` turns other field ids mentioned in the
 * message into words too.
 */
export function plainIssue(message: string, opts: { field?: string; name?: string; names?: Record<string, string> } = {}): string {
  const leaf = opts.field?.split(".").pop() ?? "";
  const name = opts.name ?? leaf;
  let text = message.trim();
  // "Dec: must …", "dec: Dec: must …", "ra: RA: hours must be 0–23": drop leading "<label>:" prefixes
  const labels = [leaf, name, opts.field ?? ""].filter(Boolean).map(escape);
  if (labels.length) {
    const prefix = new RegExp(`^(?:(?:${labels.join("|")})\\s*:\\s*)+`, "i");
    const stripped = text.replace(prefix, "");
    if (stripped !== text) text = /^not\b/.test(stripped) ? stripped : /^required\b/.test(stripped) ? `${name} is ${stripped}` : `${name} ${stripped}`;
  }
  // the field's own id as the subject ("maxAirmass must …"); other ids wherever they stand
  if (leaf && name !== leaf) text = text.replace(new RegExp(`^${escape(leaf)}(?![\\w])`), name);
  const names: Record<string, string> = { ...opts.names };
  // a camelCase id is no English word: safe to replace wherever it stands
  if (/[A-Z]/.test(leaf) && name !== leaf) names[leaf] ??= name.toLowerCase();
  for (const id of Object.keys(names).sort((a, b) => b.length - a.length)) {
    text = text.replace(new RegExp(`(^|[^\\w.])${escape(id)}(?![\\w])`, "g"), (_m, before: string) => `${before}${names[id]}`);
  }
  // "date is required", "must be a calendar date": say which field
  if (/^(must|should)\b/.test(text)) text = `${name} ${text}`;
  else if (/^date is required\b/.test(text) && name) text = text.replace(/^date/, name);
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** "field: message" for a list of problems, without naming the field twice (`dec: Dec: must…` → `Dec must…`). */
export function issueLine(field: string, message: string): string {
  const text = plainIssue(message, { field, name: field });
  const leaf = field.split(".").pop() ?? field;
  return !leaf || text.toLowerCase().startsWith(leaf.toLowerCase()) ? text : `${field}: ${text}`;
}
