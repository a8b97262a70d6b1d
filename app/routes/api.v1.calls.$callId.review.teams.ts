import { requireRole } from "~/lib/auth/auth.server";
import { revealTeams, teamRevealState } from "~/lib/review/anonymity.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.review.teams";

/** GET /api/v1/calls/:callId/review/teams (chair): whether the call is dual-anonymous, the grades in, whether the teams are revealed. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  return json(await apiAttempt(() => teamRevealState({ callId })));
}

/** POST /api/v1/calls/:callId/review/teams (chair): reveals a dual-anonymous call's teams to the chair once every grade is in (409 before); audited. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("GET, POST");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  return json(await apiAttempt(() => revealTeams({ actor: user, callId })));
}
