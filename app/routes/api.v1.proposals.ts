import { data } from "react-router";
import { requireUser } from "~/lib/auth/auth.server";
import { withRequestedHours } from "~/lib/proposals/hours.server";
import { listProposalsForUser } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/api.v1.proposals";

/** GET /api/v1/proposals: the signed-in user's proposals (as PI or Co-I). */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposals = await withRequestedHours(await listProposalsForUser({ user }));
  return data({ proposals }, { headers: { "Cache-Control": "private, no-store" } });
}

export async function action() {
  return data({ error: "Use GET.", issues: [] }, { status: 405, headers: { Allow: "GET" } });
}
