import { fillAllocationByRank } from "~/lib/allocation/allocate.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { fillSchema } from "~/lib/schemas/allocation";
import type { Route } from "./+types/api.v1.calls.$callId.allocation.fill-by-rank";

/**
 * POST /api/v1/calls/:callId/allocation/fill-by-rank (chair) `{ replaceHandSet?: boolean }`:
 * assured → queue → filler down the board, around the proposals the chair set by hand (`kept`),
 * or over those too with `replaceHandSet: true`.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const body = await apiBody(request, fillSchema);
  return json(await apiAttempt(() => fillAllocationByRank({ actor: user, callId, replaceHandSet: body.replaceHandSet })));
}

export async function loader() {
  return methodNotAllowed("POST");
}
