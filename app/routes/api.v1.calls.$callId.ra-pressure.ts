import { data } from "react-router";
import { callRaPressure } from "~/lib/allocation/ra-pressure.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.ra-pressure";

/**
 * GET /api/v1/calls/:callId/ra-pressure?telescopeId= (chair): 24 one-hour RA bins of the call's
 * semester at the telescope's site — dark hours (Sun below −18°) whose local sidereal time lies in
 * the bin, before and after the telescope's monthly clear fraction, and the requested hours of the
 * board's proposals spread over their targets' usable windows — each split by moon category.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const given = new URL(request.url).searchParams.getAll("telescopeId");
  if (given.length > 1) {
    throw data({ error: "The request has invalid fields.", issues: [{ path: "telescopeId", message: "give one telescopeId" }] }, { status: 400 });
  }
  const telescopeId = apiId(given[0], "telescopeId");
  return json(await apiAttempt(() => callRaPressure({ callId, telescopeId })));
}

export async function action() {
  return methodNotAllowed("GET");
}
