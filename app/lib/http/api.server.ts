// The JSON API routes' HTTP adapter: ids from the URL, JSON bodies, and the data layer's refusals
// as `{ error, issues: [{ path, message }] }` with their status.
import { data } from "react-router";
import type { z } from "zod";
import { apiIssues, idSchema, Refusal } from "~/lib/forms";

const NO_STORE = { "Cache-Control": "private, no-store" };

export function json<T>(body: T, status = 200) {
  return data(body, { status, headers: NO_STORE });
}

/** A row id of the URL (`idSchema`: 1…MAX_ID), or a 400 naming it. */
export function apiId(value: string | undefined, name: string): number {
  const id = idSchema(name, "must be a positive whole number").safeParse(value);
  if (!id.success) throw data({ error: "The request has invalid fields.", issues: [{ path: name, message: "must be a positive whole number" }] }, { status: 400 });
  return id.data;
}

/** The request's JSON body checked with `schema`, or a 400 naming the fields. */
export async function apiBody<S extends z.ZodType>(request: Request, schema: S): Promise<z.output<S>> {
  let body: unknown;
  try {
    const text = await request.text();
    body = text.trim() === "" ? {} : JSON.parse(text);
  } catch {
    throw data({ error: "The body is not valid JSON.", issues: [{ path: "(body)", message: "must be a JSON object" }] }, { status: 400 });
  }
  const parsed = schema.safeParse(body);
  if (!parsed.success) throw data(apiIssues(parsed.error), { status: 400 });
  return parsed.data;
}

/**
 * A refusal of the data layer as the API's answer: `{ error, issues: [{ path, message }] }` (and
 * its `details`) with its status, Retry-After when it says when to ask again; anything else is
 * thrown on.
 */
export function apiRefusal(error: unknown): never {
  if (!(error instanceof Refusal)) throw error;
  const retry = error.retryAfterSeconds ?? (error.status === 503 ? 60 : undefined);
  throw data(
    { error: error.message, issues: [{ path: error.field, message: error.message }], ...error.details },
    { status: error.status, headers: { ...NO_STORE, ...(retry === undefined ? {} : { "Retry-After": String(retry) }) } },
  );
}

/** Runs a read or a change; a refusal from the data layer becomes `{ error, issues: [{ path, message }] }` with its status. */
export async function apiAttempt<R>(work: () => Promise<R>) {
  try {
    return await work();
  } catch (error) {
    apiRefusal(error);
  }
}

export function methodNotAllowed(allow: string) {
  return data({ error: `Use ${allow}.`, issues: [] }, { status: 405, headers: { Allow: allow } });
}
