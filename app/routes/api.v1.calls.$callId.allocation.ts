import { saveAllocation } from "~/lib/allocation/allocate.server";
import { callBoard, conflictedLast } from "~/lib/allocation/board.server";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";
import { requireRole } from "~/lib/auth/auth.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { allocationSchema } from "~/lib/schemas/allocation";
import type { Route } from "./+types/api.v1.calls.$callId.allocation";

/**
 * PUT /api/v1/calls/:callId/allocation (chair) `{ rows: [{ proposalId, telescopeId, moonCategory,
 * semesterCode, hours }], tiers?: [{ proposalId, tier, waitlisted? }] }`: replaces the allocation of
 * every proposal named; 409 while the allocation is locked.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "PUT") return methodNotAllowed("PUT");
  const user = await requireRole(request, "chair");
  const callId = apiId(params.callId, "callId");
  const body = await apiBody(request, allocationSchema);
  const saved = await apiAttempt(() => saveAllocation({ actor: user, callId, rows: body.rows, tiers: body.tiers }));
  const [board, conflicts] = await apiAttempt(() => Promise.all([callBoard({ callId }), chairConflicts({ callId, chair: user })]));
  // in computed order, the proposals this chair is conflicted on last, by id (their place would tell their grades)
  const rows = conflictedLast(board.proposals, conflicts);
  return json({ saved, proposals: rows.map((p) => ({ proposalId: p.proposalId, tier: p.tier, waitlisted: p.waitlisted, allocation: p.allocation })) });
}

export async function loader() {
  return methodNotAllowed("PUT");
}
