// Small helpers shared by the workspace's loaders and actions.
import { data } from "react-router";
import { idSchema, Refusal } from "../forms";
import { NO_PROPOSAL } from "./proposals.server";

/** The :proposalId of the URL as a number; anything else is a proposal that does not exist. */
export function proposalIdParam(params: { proposalId?: string }): number {
  const id = idSchema("proposal").safeParse(params.proposalId);
  if (!id.success) throw data({ message: NO_PROPOSAL }, { status: 404 });
  return id.data;
}

/** A refusal from the data layer as the form's field error (what the user typed comes back too). */
export function refusalResponse<V>(error: unknown, values: V) {
  if (error instanceof Refusal) {
    return data({ ok: false as const, errors: { [error.field]: error.message } as Record<string, string>, values }, { status: error.status });
  }
  throw error;
}

/** Form fields as strings, repeated names as arrays. */
export function formValues(form: FormData): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const key of new Set(form.keys())) {
    const all = form.getAll(key).filter((v): v is string => typeof v === "string");
    out[key] = all.length > 1 ? all : (all[0] ?? "");
  }
  return out;
}
