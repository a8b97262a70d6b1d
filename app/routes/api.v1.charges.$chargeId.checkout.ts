import { data } from "react-router";
import { requireUser } from "~/lib/auth/auth.server";
import { emptyJsonBody, refusalJson } from "~/lib/http/payments-api.server";
import { chargeOfPi, startCheckout } from "~/lib/payments/checkout.server";
import { apiId, methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.charges.$chargeId.checkout";

/**
 * POST /api/v1/charges/:chargeId/checkout (the PI) → `{ url }` of the payment page. No body: the
 * amount and everything else come from the charge on the server.
 */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  if (request.method !== "POST") return methodNotAllowed("POST");
  const chargeId = apiId(params.chargeId, "chargeId");
  try {
    await chargeOfPi({ user, chargeId });
    await emptyJsonBody(request);
    const { url, reused } = await startCheckout({ user, chargeId });
    return data({ url, chargeId, reused }, { headers: { "Cache-Control": "private, no-store" } });
  } catch (error) {
    refusalJson(error); // a refusal as JSON; anything else (a thrown 400 or 404) as it is
  }
}

export function loader() {
  return methodNotAllowed("POST");
}
