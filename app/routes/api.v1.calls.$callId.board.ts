import { callBoard } from "~/lib/allocation/board.server";
import { boardUncertainty } from "~/lib/allocation/board-uncertainty";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.board";

/**
 * GET /api/v1/calls/:callId/board (chair): per proposal the raw mean, normalised score, spread,
 * disagreement flag, computed and chair's rank, requested and allocated hours; oversubscription
 * per telescope × moon category; each ranked proposal's 68 % rank interval and probability of lying
 * above the allocation line from the bootstrap of its reviewers' grades (null when unranked).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const board = await apiAttempt(() => callBoard({ callId }));
  const uncertainty = boardUncertainty(board);
  return json({
    panel: board.panel,
    locked: board.locked,
    proposals: board.proposals.map(({ proposalId, code, rawMean, normalisedScore, spread, disagreement, computedRank, chairRank, requested, allocation, fallbackReviewerIds, reviews }) => {
      const u = uncertainty.rows.get(proposalId);
      return {
        proposalId, code, reviews, rawMean, normalisedScore, spread, disagreement, fallbackReviewerIds, computedRank, chairRank, requested, allocation,
        rankInterval: u?.rankInterval ?? null,
        probabilityAboveLine: u?.probabilityAboveLine ?? null,
      };
    }),
    coinFlip: uncertainty.coinFlip,
    oversubscription: board.oversubscription,
  });
}

export async function action() {
  return methodNotAllowed("GET");
}
