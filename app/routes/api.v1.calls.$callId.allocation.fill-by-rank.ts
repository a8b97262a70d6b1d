import { fillAllocationByRank } from "~/lib/allocation/allocate.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.allocation.fill-by-rank";

/** POST /api/v1/calls/:callId/allocation/fill-by-rank (chair): assured → queue → filler down the board. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  return json(await apiAttempt(() => fillAllocationByRank({ actor: user, callId })));
}

export async function loader() {
  return methodNotAllowed("POST");
}
