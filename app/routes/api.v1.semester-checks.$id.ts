import { semesterCheckById, withholdPositions } from "~/lib/allocation/semester-check.server";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.semester-checks.$id";

/**
 * GET /api/v1/semester-checks/:id (chair) → `{ id, callId, status, progress, seed, realisations,
 * stale, result, error, createdAt, finishedAt }`; `result` once done, `stale` once finished.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const id = apiId(params.id, "id");
  const check = await apiAttempt(() => semesterCheckById({ id }));
  if (!check) return json({ error: "No such semester check.", issues: [] }, 404);
  // a programme this chair is conflicted on: no position, listed last
  return json(withholdPositions(check, await apiAttempt(() => chairConflicts({ callId: check.callId, chair: user }))));
}

export async function action() {
  return methodNotAllowed("GET");
}
