import { requireRole } from "~/lib/auth/auth.server";
import { sendDecisions } from "~/lib/decisions/send.server";
import { apiAttempt, apiBody, apiId, json, methodNotAllowed } from "~/lib/http/api.server";
import { sendBodySchema } from "~/lib/schemas/decisions";
import type { Route } from "./+types/api.v1.calls.$callId.decisions.send";

/**
 * POST /api/v1/calls/:callId/decisions/send (admin), body `{}` → 202 `{ batch, letters, mails }`:
 * every unsent letter queued; a second call queues nothing (`letters: 0`, the last batch). 409
 * while the allocation is not locked. Follow the batch at GET /api/v1/decision-batches/:id.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  const user = await requireRole(request, "admin");
  const callId = apiId(params.callId, "callId");
  await apiBody(request, sendBodySchema);
  const sent = await apiAttempt(() => sendDecisions({ actor: user, callId }));
  return json(sent, sent.letters > 0 ? 202 : 200);
}

export async function loader() {
  return methodNotAllowed("POST");
}
