import { data } from "react-router";
import { requireUser } from "~/lib/auth/auth.server";
import { chargesForTeam } from "~/lib/payments/team.server";
import { apiAttempt, apiId, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.proposals.$proposalId.charges";

/** GET /api/v1/proposals/:proposalId/charges: the proposal's charges, for its team (others 404). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = apiId(params.proposalId, "proposalId");
  const { charges, pageCharge, isPi } = await apiAttempt(() => chargesForTeam({ user, proposalId }));
  return data({ charges, pageCharge, canPay: isPi }, { headers: { "Cache-Control": "private, no-store" } });
}

export function action() {
  return methodNotAllowed("GET");
}
