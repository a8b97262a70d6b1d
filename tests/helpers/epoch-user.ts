import type { SessionUser } from "~/lib/auth/auth.server";
import { RoleGrant, User } from "~/models/index.server";

/** The session user the guards would give this address (for calling data functions directly). */
export async function getSessionUserFor(email: string): Promise<SessionUser> {
  const user = await User.findOne({ where: { email }, include: [{ model: RoleGrant, as: "roleGrants" }] });
  if (!user) throw new Error(`No user ${email}`);
  return { id: user.id, email: user.email, name: user.name, institution: user.institution, isMemberInstitution: user.isMemberInstitution, roles: (user.roleGrants ?? []).map((g) => g.role) };
}
