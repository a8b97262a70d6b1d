import { requireEpochOffice, requireUser } from "~/lib/auth/auth.server";
import { epochProgress, epochReadAccess, recordEpoch } from "~/lib/epochs/epochs.server";
import { epochRecordSchema } from "~/lib/epochs/schema";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.proposals.$proposalId.epochs";

/**
 * GET /api/v1/proposals/:proposalId/epochs[?observationId=]: the team and the office/observers read
 * executed against planned epochs, the precision reached so far, projected and required.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = apiId(params.proposalId, "proposalId");
  const q = new URL(request.url).searchParams.get("observationId");
  const observationId = q === null ? undefined : apiId(q, "observationId");
  await apiAttempt(() => epochReadAccess({ user, proposalId }));
  const progress = await apiAttempt(() => epochProgress({ proposalId, observationId, withReplan: new URL(request.url).searchParams.get("replan") === "1" }));
  return json(progress);
}

/**
 * POST /api/v1/proposals/:proposalId/epochs (admin or observer): one executed or lost epoch,
 * `{ observationId?, observedAt, telescopeId, frames, fwhmArcsec?, precisionMas? | snr?, lost?: { cause }, note? }`.
 * `observationId` names the epoch's observation (and so its target); it may be left out when the
 * programme has one astrometric observation.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireEpochOffice(request);
  const proposalId = apiId(params.proposalId, "proposalId");
  const input = await apiBody(request, epochRecordSchema);
  const row = await apiAttempt(() => recordEpoch({ user, proposalId, input, source: "api" }));
  return json({ id: row.id, observationId: row.observationId, plannedEpochId: row.plannedEpochId, precisionMas: row.precisionMas, precisionSource: row.precisionSource, lost: row.lostCause ? { cause: row.lostCause } : undefined }, 201);
}
