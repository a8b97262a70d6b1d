import { startSemesterCheck } from "~/lib/allocation/semester-check.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { semesterCheckSchema } from "~/lib/schemas/semester-check";
import type { Route } from "./+types/api.v1.calls.$callId.semester-check";

/**
 * POST /api/v1/calls/:callId/semester-check (chair) `{ realisations?: 1–1000 = 200, seed?: 0–2³²−1 = 1 }`
 * → 202 `{ id }`: the check is queued and runs in a worker thread; follow it at /api/v1/semester-checks/:id.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const body = await apiBody(request, semesterCheckSchema);
  return json(await apiAttempt(() => startSemesterCheck({ actor: user, callId, ...body })), 202);
}

export async function loader() {
  return methodNotAllowed("POST");
}
