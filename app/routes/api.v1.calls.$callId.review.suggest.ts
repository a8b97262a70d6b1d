import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { suggestForCall } from "~/lib/review/chair.server";
import { suggestSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/api.v1.calls.$callId.review.suggest";

/** POST /api/v1/calls/:callId/review/suggest (chair) `{ perProposal }`: the suggestion; changes nothing. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireRole(request, "chair");
  if (request.method !== "POST") return methodNotAllowed("POST");
  const callId = apiId(params.callId, "callId");
  const { perProposal } = await apiBody(request, suggestSchema);
  return json(await apiAttempt(() => suggestForCall({ callId, perProposal, viewer: user })));
}

export async function loader() {
  return methodNotAllowed("POST");
}
