import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { submittedReviews } from "~/lib/review/chair.server";
import type { Route } from "./+types/api.v1.calls.$callId.reviews";

/** GET /api/v1/calls/:callId/reviews (chair): every submitted review with its scores; `withheld` lists the proposals this chair is conflicted on, whose reviews are left out. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  return json(await apiAttempt(() => submittedReviews({ callId, viewer: user })));
}

export async function action() {
  return methodNotAllowed("GET");
}
