import { RoleGrant, sequelize, User } from "~/models/index.server";
import type { GrantableRole } from "~/models/RoleGrant";
import { writeAudit } from "./audit.server";
import type { SessionUser } from "./auth.server";

export async function listUsersWithRoles() {
  const users = await User.findAll({
    include: [{ model: RoleGrant, as: "roleGrants" }],
    order: [["email", "ASC"]],
  });
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    name: u.name ?? "",
    institution: u.institution ?? "",
    isMemberInstitution: u.isMemberInstitution,
    lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
    roles: (u.roleGrants ?? []).map((g) => g.role).sort(),
  }));
}

export class RoleChangeRefused extends Error {}

/** Grants or revokes one role; the change and its audit entry are one transaction. */
export async function changeRole({
  actor,
  userId,
  role,
  intent,
}: {
  actor: SessionUser;
  userId: number;
  role: GrantableRole;
  intent: "grant" | "revoke";
}) {
  if (intent === "revoke" && role === "admin" && userId === actor.id) {
    throw new RoleChangeRefused("You cannot revoke your own admin role; ask another admin.");
  }
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user) throw new RoleChangeRefused("That user does not exist.");
    if (intent === "grant") {
      const [, created] = await RoleGrant.findOrCreate({
        where: { userId, role },
        defaults: { userId, role, grantedById: actor.id },
        transaction,
      });
      if (!created) return { changed: false, email: user.email };
    } else {
      const removed = await RoleGrant.destroy({ where: { userId, role }, transaction });
      if (!removed) return { changed: false, email: user.email };
    }
    await writeAudit(
      { actorId: actor.id, action: `role.${intent}`, entityType: "user", entityId: userId, details: { role, email: user.email } },
      transaction,
    );
    return { changed: true, email: user.email };
  });
}
