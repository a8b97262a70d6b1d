import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { declareConflict, requireDeskUser } from "~/lib/review/desk.server";
import { conflictSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/api.v1.review.assignments.$assignmentId.conflict";

/** POST /api/v1/review/assignments/:assignmentId/conflict (reviewer) `{ reason }`. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireDeskUser(request);
  if (request.method !== "POST") return methodNotAllowed("POST");
  const assignmentId = apiId(params.assignmentId, "assignmentId");
  const { reason } = await apiBody(request, conflictSchema);
  await apiAttempt(() => declareConflict({ user, assignmentId, reason }));
  return json({ ok: true, status: "conflict" });
}

export async function loader() {
  return methodNotAllowed("POST");
}
