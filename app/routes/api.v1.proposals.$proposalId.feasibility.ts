import { data } from "react-router";
import { z } from "zod";
import { requireUser } from "~/lib/auth/auth.server";
import { observationDetails } from "~/lib/proposals/feasibility-summary";
import { feasibilitySheetOf, loadFeasibilityInput } from "~/lib/proposals/feasibility.server";
import { apiIssues, idSchema } from "~/lib/forms";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { apiAttempt, apiId, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.proposals.$proposalId.feasibility";

const querySchema = z.object({ observationId: idSchema("observation") });

/**
 * GET /api/v1/proposals/:proposalId/feasibility?observationId=: one card of the feasibility sheet
 * in full (what the sheet page fetches when a card opens), for the proposal's team like the page
 * (others 404). The sheet comes from its cache when the page has just computed it.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = apiId(params.proposalId, "proposalId");
  await apiAttempt(() => getProposalForUser({ proposalId, user }));
  const query = querySchema.safeParse({ observationId: new URL(request.url).searchParams.get("observationId") ?? undefined });
  if (!query.success) return data(apiIssues(query.error), { status: 400 });
  const details = observationDetails(feasibilitySheetOf(await apiAttempt(() => loadFeasibilityInput({ proposalId }))), query.data.observationId);
  if (!details) return data({ error: "No such observation on this proposal.", issues: [{ path: "observationId", message: "is not an observation of this proposal" }] }, { status: 404 });
  return data(details, { headers: { "Cache-Control": "private, no-store" } });
}

export function action() {
  return methodNotAllowed("GET");
}
