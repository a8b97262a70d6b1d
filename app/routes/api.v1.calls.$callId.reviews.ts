import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { submittedReviews } from "~/lib/review/chair.server";
import type { Route } from "./+types/api.v1.calls.$callId.reviews";

/** GET /api/v1/calls/:callId/reviews (chair): every submitted review with its scores. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  return json({ reviews: await apiAttempt(() => submittedReviews({ callId })) });
}

export async function action() {
  return methodNotAllowed("GET");
}
