import { data } from "react-router";
import { requireRole } from "~/lib/auth/auth.server";
import { apiIssues } from "~/lib/forms";
import { adminUserActionSchema } from "~/lib/schemas/roles";
import { changeRole, listUsersWithRoles, RoleChangeRefused, signOutEverywhere } from "~/lib/auth/users.server";
import type { Route } from "./+types/api.v1.admin.users";

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  return data({ users: await listUsersWithRoles() });
}

/** POST `{ intent: "grant" | "revoke", userId, role }` or `{ intent: "sign-out-everywhere", userId }` as JSON. */
export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return data({ error: "The body must be JSON.", issues: [{ path: "(body)", message: "Send a JSON object." }] }, { status: 400 });
  }
  const parsed = adminUserActionSchema.safeParse(body);
  if (!parsed.success) return data(apiIssues(parsed.error), { status: 400 });
  try {
    if (parsed.data.intent === "sign-out-everywhere") return data(await signOutEverywhere({ actor, userId: parsed.data.userId }));
    return data(await changeRole({ actor, ...parsed.data }));
  } catch (error) {
    if (error instanceof RoleChangeRefused) {
      return data({ error: error.message, issues: [{ path: "userId", message: error.message }] }, { status: 400 });
    }
    throw error;
  }
}
