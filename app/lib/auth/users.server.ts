import { QueryTypes } from "sequelize";
import { RoleGrant, sequelize, User } from "~/models/index.server";
import type { GrantableRole } from "~/models/RoleGrant";
import { writeAudit } from "../audit.server";
import { Refusal } from "../forms";
import type { SessionUser } from "./auth.server";
import { endSessionsOf, SESSION_IDLE_MINUTES } from "./session.server";

export async function listUsersWithRoles() {
  const users = await User.findAll({
    include: [{ model: RoleGrant, as: "roleGrants" }],
    order: [["email", "ASC"]],
  });
  const now = new Date();
  const live = await sequelize.query<{ userId: number; n: number }>(
    "SELECT userId, COUNT(*) AS n FROM sessions WHERE expiresAt > :now AND lastSeenAt > :idle GROUP BY userId",
    { type: QueryTypes.SELECT, replacements: { now, idle: new Date(now.getTime() - SESSION_IDLE_MINUTES * 60_000) } },
  );
  const sessionsByUser = new Map(live.map((r) => [Number(r.userId), Number(r.n)]));
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    name: u.name ?? "",
    institution: u.institution ?? "",
    isMemberInstitution: u.isMemberInstitution,
    lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
    roles: (u.roleGrants ?? []).map((g) => g.role).sort(),
    activeSessions: sessionsByUser.get(u.id) ?? 0,
  }));
}

export type UserWithRoles = Awaited<ReturnType<typeof listUsersWithRoles>>[number];

/** A role change or sign-out the office cannot make: a message at the form's (or body's) `userId`. */
const refusedFor = (message: string) => new Refusal(message, { field: "userId" });

/**
 * Grants or revokes one role; the change, the end of that person's sessions (they sign in again
 * with the new roles; an admin changing their own roles keeps the session they are using) and the
 * audit entry are one transaction.
 */
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
    throw refusedFor("You cannot revoke your own admin role; ask another admin.");
  }
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user) throw refusedFor("That user does not exist.");
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
    const sessionsEnded = await endSessionsOf(userId, { transaction, exceptId: userId === actor.id ? actor.sessionId : undefined });
    await writeAudit(
      { actorId: actor.id, action: `role.${intent}`, entityType: "user", entityId: userId, details: { role, email: user.email, sessionsEnded } },
      transaction,
    );
    return { changed: true, email: user.email };
  });
}

/** "Sign this person out everywhere": ends every session of the user, audited. */
export async function signOutEverywhere({ actor, userId }: { actor: SessionUser; userId: number }) {
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user) throw refusedFor("That user does not exist.");
    const sessionsEnded = await endSessionsOf(userId, { transaction });
    await writeAudit(
      { actorId: actor.id, action: "user.signed_out_everywhere", entityType: "user", entityId: userId, details: { email: user.email, sessionsEnded } },
      transaction,
    );
    return { email: user.email, sessionsEnded };
  });
}
