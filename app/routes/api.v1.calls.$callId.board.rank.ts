import { moveOnBoard } from "~/lib/allocation/allocate.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { boardMoveSchema } from "~/lib/schemas/allocation";
import type { Route } from "./+types/api.v1.calls.$callId.board.rank";

/** POST /api/v1/calls/:callId/board/rank (chair) `{ proposalId, chairRank | null, reason }`: audited. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const body = await apiBody(request, boardMoveSchema);
  return json(await apiAttempt(() => moveOnBoard({ actor: user, callId, ...body })));
}

export async function loader() {
  return methodNotAllowed("POST");
}
