import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { replaceAssignments, reviewState } from "~/lib/review/chair.server";
import { assignmentsSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/api.v1.calls.$callId.review.assignments";

/**
 * PUT /api/v1/calls/:callId/review/assignments (chair) `{ assignments: [{ proposalId, reviewerId }], commit? }`:
 * replaces the call's assignments in one transaction; a conflicted pair is a 400 naming it.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "PUT") return methodNotAllowed("PUT");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const body = await apiBody(request, assignmentsSchema);
  const result = await apiAttempt(() => replaceAssignments({ actor: user, callId, pairs: body.assignments, commit: body.commit }));
  return json({ ...result, ...(await apiAttempt(() => reviewState({ callId, viewer: user }))) });
}

export async function loader() {
  return methodNotAllowed("PUT");
}
