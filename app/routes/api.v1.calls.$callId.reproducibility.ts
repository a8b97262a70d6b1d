import { boardUncertainty } from "~/lib/allocation/board-uncertainty";
import { callBoard } from "~/lib/allocation/board.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.reproducibility";

/**
 * GET /api/v1/calls/:callId/reproducibility (chair): split each proposal's reviewers into two
 * random halves `draws` times; `expectedAgreement` is the mean fraction of the first half's
 * accepted list (above the allocation line) that the second half accepts too, `spread` its
 * standard deviation over the splits. Proposals with fewer than two grades are left out.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const board = await apiAttempt(() => callBoard({ callId }));
  const { expectedAgreement, spread, draws, seed, quartileAgreement, proposals, leftOut } = boardUncertainty(board).reproducibility;
  return json({ expectedAgreement, spread, draws, seed, quartileAgreement, proposals, leftOut });
}

export async function action() {
  return methodNotAllowed("GET");
}
