// The charges' JSON routes: refusals as `{ error, issues: [{ path, message }] }` with their status.
import { data } from "react-router";
import { apiRefusal } from "~/lib/http/api.server";

const NO_STORE = { "Cache-Control": "private, no-store" };

/** A refusal as `{ error, issues: [{ path, message }] }` with its status (a 503 with Retry-After). */
export const refusalJson = apiRefusal;

/**
 * A body that must carry nothing: empty, or a JSON object without fields. Every field sent is named
 * in the 400 (an `amount` above all: amounts come from the server only).
 */
export async function emptyJsonBody(request: Request): Promise<void> {
  const text = await request.text();
  if (text.trim() === "") return;
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw data({ error: "The body is not valid JSON.", issues: [{ path: "(body)", message: "must be empty or a JSON object" }] }, { status: 400, headers: NO_STORE });
  }
  if (typeof body !== "object" || body === null || Array.isArray(body)) {
    throw data({ error: "The body must be a JSON object.", issues: [{ path: "(body)", message: "must be empty or a JSON object" }] }, { status: 400, headers: NO_STORE });
  }
  const keys = Object.keys(body);
  if (keys.length) {
    throw data(
      { error: "This request takes no fields: the server sets the amount and everything else of the payment.", issues: keys.slice(0, 20).map((k) => ({ path: k.slice(0, 100), message: "not accepted: the server sets the amount and everything else of the payment" })) },
      { status: 400, headers: NO_STORE },
    );
  }
}
