import { requireRole } from "~/lib/auth/auth.server";
import { batchProgress } from "~/lib/decisions/send.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.decision-batches.$id";

/** GET /api/v1/decision-batches/:id (admin) → `{ id, callId, kind, letters, total, queued, sent, failed, retrying, done, percent, lastError, createdAt }`. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const id = apiId(params.id, "id");
  const progress = await apiAttempt(() => batchProgress({ id }));
  if (!progress) return json({ error: "No such decision batch.", issues: [] }, 404);
  return json(progress);
}

export async function action() {
  return methodNotAllowed("GET");
}
