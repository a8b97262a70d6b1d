import { apiAttempt, json, methodNotAllowed } from "~/lib/http/api.server";
import { listMyAssignments, requireDeskUser } from "~/lib/review/desk.server";
import type { Route } from "./+types/api.v1.review.assignments";

/** GET /api/v1/review/assignments (reviewer): mine. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireDeskUser(request);
  return json({ assignments: await apiAttempt(() => listMyAssignments({ user })) });
}

export async function action() {
  return methodNotAllowed("GET");
}
