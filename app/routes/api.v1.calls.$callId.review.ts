import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { reviewState } from "~/lib/review/chair.server";
import type { Route } from "./+types/api.v1.calls.$callId.review";

/** GET /api/v1/calls/:callId/review (chair): panel, proposals in review, assignments, conflicts, loads. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  return json(await apiAttempt(() => reviewState({ callId, viewer: user })));
}

export async function action() {
  return methodNotAllowed("GET");
}
