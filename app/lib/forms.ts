import { data } from "react-router";
import { z } from "zod";

export type FieldErrors = Record<string, string>;

/**
 * What the user typed, echoed with a refusal so the form keeps it (files and `intent` left out):
 * a field posted once is its string, a field posted several times (ticked boxes) every value in order.
 */
export type FormValues = Record<string, string | string[]>;

/** A typed field as text (of a field posted twice, the first value); undefined when it was not posted. */
export function valueText(values: FormValues | null | undefined, name: string): string | undefined {
  const value = values?.[name];
  return Array.isArray(value) ? value[0] : value;
}

/** What was typed, one text a field, for forms whose fields are all single (spread over their blank values). */
export function valueTexts(values: FormValues | null | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  for (const name of Object.keys(values ?? {})) out[name] = valueText(values, name) ?? "";
  return out;
}

/** Every value posted under `name` (the boxes ticked); none posted → []. */
export function valueList(values: FormValues | null | undefined, name: string): string[] {
  const value = values?.[name];
  return value === undefined ? [] : Array.isArray(value) ? value : [value];
}

export interface ActionFailure {
  ok: false;
  /** the button the failure belongs to; "unknown" when the form named none of the route's */
  intent: string;
  errors: FieldErrors;
  values: FormValues;
  /** the table row the form sat in, when a page has one form per row */
  rowId?: number;
}

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
    // a field the schema does not take (a strict object's unknown key) is named itself, one issue each
    issues: error.issues.flatMap((issue) =>
      issue.code === "unrecognized_keys"
        ? issue.keys.map((key) => ({ path: [...issue.path, key].join("."), message: `${key} is not a field of this request; leave it out` }))
        : [{ path: issue.path.join(".") || "(body)", message: issue.message }],
    ),
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

/**
 * "field: message" for a list of problems, without naming the field twice (`dec: Dec: must…` →
 * `Dec must…`). `asWritten`: the field is a column the user typed (a CSV header), so a message
 * opening with it keeps its spelling (`precision_mas is required`, not `Precision_mas …`).
 */
export function issueLine(field: string, message: string, opts: { asWritten?: boolean } = {}): string {
  const text = plainIssue(message, { field, name: field });
  const leaf = field.split(".").pop() ?? field;
  if (!leaf) return text;
  if (!text.toLowerCase().startsWith(leaf.toLowerCase())) return `${field}: ${text}`;
  return opts.asWritten && new RegExp(`^${escape(leaf)}(?![\\w])`).test(message.trim()) ? `${leaf}${text.slice(leaf.length)}` : text;
}

/**
 * The one refusal type, `{ message, status, field }`: bad input, or a rule of the domain the user
 * can act on (a locked allocation, a read-only proposal, the PI's own right). The data layer and
 * the parsing helpers below throw it; the responders turn it into a field message (forms) or a
 * JSON 4xx (API).
 */
export class Refusal extends Error {
  readonly status: number;
  /** the form field (or JSON path) it belongs to; "form" for the form as a whole */
  readonly field: string;
  /** when to ask again (a busy queue's 503): the API sends it as Retry-After */
  readonly retryAfterSeconds?: number;
  /** more facts for the API's body (the id of the check already running) */
  readonly details?: Record<string, unknown>;
  constructor(
    message: string,
    { status = 400, field = "form", retryAfterSeconds, details }: { status?: number; field?: string; retryAfterSeconds?: number; details?: Record<string, unknown> } = {},
  ) {
    super(message);
    this.status = status;
    this.field = field;
    this.retryAfterSeconds = retryAfterSeconds;
    this.details = details;
  }
}

/** Ids are INT UNSIGNED columns; larger numbers are no id of ours. */
export const MAX_ID = 4_294_967_295;

/**
 * A row id from a form, a query or a JSON body: a whole number 1…MAX_ID, given as a number or as
 * decimal digits (so `abc`, `1e3`, `0x10`, `-1`, `NaN`, `Infinity` and `12abc` are all refused).
 */
export function idSchema(what = "id", message = `The ${what} must be a positive whole number.`) {
  return z.preprocess(
    (v) => (typeof v === "string" && /^\s*\d{1,12}\s*$/.test(v) ? Number(v) : v),
    z.number({ error: message }).int({ error: message }).positive({ error: message }).max(MAX_ID, { error: message }),
  );
}

/** `value` as an id, or a 400 Refusal naming the field. */
export function parseId(value: unknown, field: string, what = field): number {
  const r = idSchema(what).safeParse(value);
  if (!r.success) throw new Refusal(r.error.issues[0]?.message ?? `The ${what} is not valid.`, { field });
  return r.data;
}

/** Bytes of a string in UTF-8 (MariaDB's TEXT columns hold 65 535 bytes, not characters). */
export function utf8Bytes(text: string) {
  return new TextEncoder().encode(text).byteLength;
}

/** MariaDB TEXT: at most 65 535 bytes. */
export const TEXT_COLUMN_BYTES = 65_535;

const FORM_TYPES = /^(application\/x-www-form-urlencoded|multipart\/form-data)\s*(;|$)/i;

/**
 * The body of a form post, or a 400 page when it is none: JSON, text, or a broken multipart
 * body sent to a form action is bad input, never a 500.
 */
export async function readForm(request: Request): Promise<FormData> {
  const type = request.headers.get("Content-Type") ?? "";
  if (!FORM_TYPES.test(type.trim())) {
    throw data({ message: "This address takes a form (application/x-www-form-urlencoded or multipart/form-data)." }, { status: 400 });
  }
  try {
    return await request.formData();
  } catch {
    throw data({ message: "The form could not be read: the body is not a well-formed form. Reload the page and send it again." }, { status: 400 });
  }
}
