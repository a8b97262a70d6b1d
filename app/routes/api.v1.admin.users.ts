import { requireRole } from "~/lib/auth/auth.server";
import { changeRole, listUsersWithRoles, signOutEverywhere } from "~/lib/auth/users.server";
import { apiAttempt, apiBody, json } from "~/lib/http/api.server";
import { adminUserActionSchema } from "~/lib/schemas/roles";
import type { Route } from "./+types/api.v1.admin.users";

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  return json({ users: await listUsersWithRoles() });
}

/**
 * POST `{ intent: "grant" | "revoke", userId, role }` or `{ intent: "sign-out-everywhere", userId }` as JSON;
 * a malformed body is a 400 `{ error, issues: [{ path, message }] }` naming the field.
 */
export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const body = await apiBody(request, adminUserActionSchema);
  return apiAttempt(async () => json(body.intent === "sign-out-everywhere" ? await signOutEverywhere({ actor, userId: body.userId }) : await changeRole({ actor, ...body })));
}
