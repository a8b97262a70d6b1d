import { unlockAllocation } from "~/lib/allocation/allocate.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { unlockSchema } from "~/lib/schemas/allocation";
import type { Route } from "./+types/api.v1.calls.$callId.allocation.unlock";

/** POST /api/v1/calls/:callId/allocation/unlock (chair) `{ reason }`: proposals go back to in review. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const { reason } = await apiBody(request, unlockSchema);
  return json(await apiAttempt(() => unlockAllocation({ actor: user, callId, reason })));
}

export async function loader() {
  return methodNotAllowed("POST");
}
