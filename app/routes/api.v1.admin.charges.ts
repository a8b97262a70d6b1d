import { data } from "react-router";
import { requireRole } from "~/lib/auth/auth.server";
import { allCharges } from "~/lib/payments/office.server";
import { methodNotAllowed } from "~/lib/http/api.server";
import type { Route } from "./+types/api.v1.admin.charges";

/** GET /api/v1/admin/charges: every charge with its state (the office). */
export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  return data({ charges: await allCharges() }, { headers: { "Cache-Control": "private, no-store" } });
}

export function action() {
  return methodNotAllowed("GET");
}
