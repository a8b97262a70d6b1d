import { requireRole } from "~/lib/auth/auth.server";
import { apiId, json, methodNotAllowed } from "~/lib/review/api.server";
import { submittedReviews } from "~/lib/review/chair.server";
import type { Route } from "./+types/api.v1.calls.$callId.reviews";

/** GET /api/v1/calls/:callId/reviews (chair): every submitted review with its scores. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  return json({ reviews: await submittedReviews({ callId: apiId(params.callId, "callId") }) });
}

export async function action() {
  return methodNotAllowed("GET");
}
