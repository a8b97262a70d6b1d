import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { saveGrade, requireDeskUser } from "~/lib/review/desk.server";
import { gradeSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/api.v1.review.assignments.$assignmentId";

/** PUT /api/v1/review/assignments/:assignmentId (reviewer): the grade, as a draft or submitted. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "PUT") return methodNotAllowed("PUT");
  const user = await requireDeskUser(request);
  const assignmentId = apiId(params.assignmentId, "assignmentId");
  const values = await apiBody(request, gradeSchema);
  return json(await apiAttempt(() => saveGrade({ user, assignmentId, values })));
}

export async function loader() {
  return methodNotAllowed("PUT");
}
