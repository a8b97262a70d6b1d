import { callBoard } from "~/lib/allocation/board.server";
import { requireRole } from "~/lib/auth.server";
import { apiId, json, methodNotAllowed } from "~/lib/review/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.board";

/**
 * GET /api/v1/calls/:callId/board (chair): per proposal the raw mean, normalised score, spread,
 * disagreement flag, computed and chair's rank, requested and allocated hours; oversubscription
 * per telescope × moon category.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const board = await callBoard({ callId: apiId(params.callId, "callId") });
  return json({
    panel: board.panel,
    locked: board.locked,
    proposals: board.proposals.map(({ proposalId, code, rawMean, normalisedScore, spread, disagreement, computedRank, chairRank, requested, allocation, fallbackReviewerIds, reviews }) => ({
      proposalId, code, reviews, rawMean, normalisedScore, spread, disagreement, fallbackReviewerIds, computedRank, chairRank, requested, allocation,
    })),
    oversubscription: board.oversubscription,
  });
}

export async function action() {
  return methodNotAllowed("GET");
}
