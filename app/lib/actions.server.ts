// The one way a route's action reads its form: a zod discriminated union over `intent` parses the
// fields (ids coerced by `idSchema`), the work runs with the parsed input, and a bad field, an
// unknown button or a domain refusal comes back as `{ ok: false, intent, errors, values }` with
// what the user typed, never as a 500.
import { data } from "react-router";
import { z } from "zod";
import { fieldErrors, idSchema, readForm, Refusal, type ActionFailure, type FieldErrors, type FormValues } from "./forms";

export type { ActionFailure, FormValues };

export const UNKNOWN_INTENT = "That button does nothing here; reload the page.";

/**
 * One option of a route's union: `intent: name` and the fields of `schema` (any object schema,
 * transforms included); the parsed value carries its `intent` for the route's `switch`.
 */
export function intent<N extends string>(name: N): z.ZodObject<{ intent: z.ZodLiteral<N> }>;
export function intent<N extends string, S extends z.ZodType<object, any>>(
  name: N,
  schema: S,
): z.ZodPipe<z.ZodPipe<z.ZodObject<{ intent: z.ZodLiteral<N> }, z.core.$loose>, S>, z.ZodTransform<z.output<S> & { intent: N }, z.output<S>>>;
export function intent(name: string, schema?: z.ZodType<object, any>) {
  const head = z.object({ intent: z.literal(name) });
  if (!schema) return head;
  return head
    .loose()
    .pipe(schema)
    .transform((value) => ({ ...value, intent: name }));
}

/** Fields as the schema reads them: strings, a repeated name as an array. */
export function formFields(form: FormData): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const key of new Set(form.keys())) {
    const all = form.getAll(key).filter((v): v is string => typeof v === "string");
    if (all.length) out[key] = all.length > 1 ? all : all[0];
  }
  return out;
}

/** What the user typed, to echo: every field as read (a repeated one as its array), `intent` left out. */
export function formValues(fields: Record<string, string | string[]>): FormValues {
  const { intent: _intent, ...values } = fields;
  return values;
}

export function failure(
  intent: string,
  errors: FieldErrors,
  values: FormValues,
  { status = 400, rowId, headers }: { status?: number; rowId?: number; headers?: HeadersInit } = {},
) {
  const body: ActionFailure = { ok: false, intent, errors, values, ...(rowId === undefined ? {} : { rowId }) };
  return data(body, { status, headers });
}

/** A refusal as the form's field message; a 404 refusal is the 404 page (the record is gone). */
export function refusalFailure(error: unknown, intent: string, values: FormValues, rowId?: number) {
  if (!(error instanceof Refusal)) throw error;
  if (error.status === 404) throw data({ message: error.message }, { status: 404 });
  return failure(intent, { [error.field]: error.message }, values, { status: error.status, rowId });
}

export interface ActionContext {
  /** the posted form, for files */
  form: FormData;
  values: FormValues;
}

/**
 * Reads the request's form, parses it with the route's union and runs `work` on the result.
 * `rowId` names the field that says which table row the form belongs to, so the page shows the
 * message in that row. A route that must read its body its own way (a size-limited upload)
 * passes the form it read instead of the request.
 */
export async function formAction<S extends z.ZodType<{ intent: string }>, R>(
  request: Request | FormData,
  schema: S,
  work: (input: z.output<S>, context: ActionContext) => Promise<R> | R,
  { rowId: rowField }: { rowId?: string } = {},
) {
  const form = request instanceof FormData ? request : await readForm(request);
  const fields = formFields(form);
  const values = formValues(fields);
  const posted = typeof fields.intent === "string" ? fields.intent : "";
  const row = rowField ? idSchema().safeParse(fields[rowField]) : undefined;
  const rowId = row?.success ? row.data : undefined;
  const parsed = schema.safeParse(fields);
  if (!parsed.success) {
    const intentIssue = parsed.error.issues.some((issue) => issue.path.length === 1 && issue.path[0] === "intent");
    if (intentIssue) return failure("unknown", { form: UNKNOWN_INTENT }, values);
    return failure(posted, fieldErrors(parsed.error), values, { rowId });
  }
  try {
    return await work(parsed.data, { form, values });
  } catch (error) {
    return refusalFailure(error, parsed.data.intent, values, rowId);
  }
}

/**
 * A loader's or action's read: a refusal of the data layer is the page's error with its status
 * and message — 404 the not-found page (a record that is gone, or not this user's), 403 the
 * role's page, 400/409 "not understood"/"changed meanwhile" — not a 500. Give the read's promise,
 * or a function running several reads.
 */
export async function orNotFound<T>(read: Promise<T> | (() => Promise<T>)): Promise<T> {
  try {
    return await (typeof read === "function" ? read() : read);
  } catch (error) {
    if (error instanceof Refusal) throw data({ message: error.message }, { status: error.status });
    throw error;
  }
}

/** A URL id (`:callId`, `:proposalId`): anything but a row id is a page that does not exist. */
export function idParam(value: string | undefined, what: string): number {
  const id = idSchema(what).safeParse(value);
  if (!id.success) throw data({ message: `There is no ${what} at this address.` }, { status: 404 });
  return id.data;
}
