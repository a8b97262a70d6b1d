// How the office's actions answer: 400 with the field's message and what was typed, or a redirect.
import { data } from "react-router";
import type { z } from "zod";
import { fieldErrors, idSchema, Refusal, type FieldErrors } from "../forms";

export function formValues(formData: FormData) {
  const values: Record<string, string> = {};
  for (const [key, value] of formData) if (typeof value === "string" && key !== "intent") values[key] = value;
  return values;
}

export function refused(intent: string, values: Record<string, string>, errors: FieldErrors, rowId?: number) {
  return data({ ok: false as const, intent, rowId, errors, values }, { status: 400 });
}

/** Parses with the form's schema, runs the change, and turns refusals into field messages. */
export async function handle<S extends z.ZodType, R>(
  { intent, values, schema, rowId }: { intent: string; values: Record<string, string>; schema: S; rowId?: number },
  work: (input: z.output<S>) => Promise<R>,
) {
  const parsed = schema.safeParse(values);
  if (!parsed.success) return refused(intent, values, fieldErrors(parsed.error), rowId);
  return attempt({ intent, values, rowId }, () => work(parsed.data));
}

export async function attempt<R>(
  { intent, values, rowId }: { intent: string; values: Record<string, string>; rowId?: number },
  work: () => Promise<R>,
) {
  try {
    return await work();
  } catch (error) {
    if (error instanceof Refusal) {
      if (error.status === 404) throw data({ message: error.message }, { status: 404 });
      return refused(intent, values, { [error.field]: error.message }, rowId);
    }
    throw error;
  }
}

export function idParam(value: string | undefined, what: string) {
  const id = idSchema(what).safeParse(value);
  if (!id.success) throw data({ message: `There is no ${what} at this address.` }, { status: 404 });
  return id.data;
}

export function unknownIntent() {
  return data({ ok: false as const, intent: "unknown", errors: { form: "That button does nothing here; reload the page." } }, { status: 400 });
}

/** A loader's read: a missing record is a 404 page, not a 500. */
export async function orNotFound<T>(read: Promise<T>): Promise<T> {
  try {
    return await read;
  } catch (error) {
    if (error instanceof Refusal && error.status === 404) throw data({ message: error.message }, { status: 404 });
    throw error;
  }
}
