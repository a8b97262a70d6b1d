import { callBoard, conflictedLast, withholdConflicted } from "~/lib/allocation/board.server";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";
import { boardUncertainty } from "~/lib/allocation/board-uncertainty";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.board";

/**
 * GET /api/v1/calls/:callId/board (chair): per proposal the raw mean, normalised score, spread,
 * disagreement flag, computed and chair's rank, requested and allocated hours; oversubscription
 * per telescope × moon category; each ranked proposal's 68 % rank interval and probability of lying
 * above the allocation line from the bootstrap of its reviewers' grades (null when unranked). On a
 * proposal this chair is conflicted on, every grade-derived field is null and `withheld` says why.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const [board, conflicts] = await apiAttempt(() => Promise.all([callBoard({ callId }), chairConflicts({ callId, chair: user })]));
  const uncertainty = boardUncertainty(board);
  const rows = withholdConflicted(
    board.proposals.map((p) => ({ ...p, rankInterval: uncertainty.rows.get(p.proposalId)?.rankInterval ?? null, probabilityAboveLine: uncertainty.rows.get(p.proposalId)?.probabilityAboveLine ?? null })),
    conflicts,
  );
  return json({
    panel: board.panel,
    locked: board.locked,
    // in computed order; the proposals this chair is conflicted on last, by id (their place would tell their grades)
    proposals: conflictedLast(rows, conflicts).map(
      ({ proposalId, code, rawMean, normalisedScore, spread, disagreement, computedRank, chairRank, requested, allocation, fallbackReviewerIds, reviews, rankInterval, probabilityAboveLine, withheld }) => ({
        proposalId, code, reviews, rawMean, normalisedScore, spread, disagreement, fallbackReviewerIds, computedRank, chairRank, requested, allocation, rankInterval, probabilityAboveLine, withheld,
      }),
    ),
    coinFlip: uncertainty.coinFlip,
    oversubscription: board.oversubscription,
  });
}

export async function action() {
  return methodNotAllowed("GET");
}
