import { requireRole } from "~/lib/auth/auth.server";
import { callDecisions } from "~/lib/decisions/decisions.server";
import { notLockedRefusal } from "~/lib/decisions/facts.server";
import { apiAttempt, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.calls.$callId.decisions";

/**
 * GET /api/v1/calls/:callId/decisions (admin) → `{ call, lockedAt, decisions: [{ proposalId, code,
 * title, outcome, hours, tier, charge, comments, letter: { subject, body }, sent }], latestBatch }`;
 * 409 while the allocation is not locked.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const callId = apiId(params.callId, "callId");
  return json(
    await apiAttempt(async () => {
      const d = await callDecisions({ callId });
      if (!d.locked) throw notLockedRefusal();
      return {
        call: d.call,
        lockedAt: d.lockedAt,
        decisions: d.rows.map((r) => ({ proposalId: r.proposalId, code: r.code, title: r.title, outcome: r.outcome, hours: r.facts.hours, tier: r.facts.tier, charge: r.facts.charge, comments: r.facts.comments, letter: r.letter, sent: r.sent })),
        latestBatch: d.latestBatch,
      };
    }),
  );
}

export async function action() {
  return methodNotAllowed("GET");
}
