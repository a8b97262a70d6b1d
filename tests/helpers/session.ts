import { claimInvitations } from "~/lib/proposals/proposals.server";
import { signedInCookie, startUserSession } from "~/lib/auth/session.server";
import { RoleGrant, User } from "~/models/index.server";
import type { GrantableRole } from "~/lib/domain";

/**
 * A session cookie for the user with this address, as the app sets after sign-in: a server-side
 * session row, the cookie holding only its token, and the user's invitations claimed.
 */
export async function sessionCookieFor(email: string): Promise<string> {
  const user = await User.findOne({ where: { email } });
  if (!user) throw new Error(`No user ${email} in the test database`);
  await claimInvitations({ user });
  const token = await startUserSession(user.id);
  return (await signedInCookie(token)).split(";")[0];
}

let counter = 0;
/** A fresh user (optionally with roles) and its cookie. */
export async function newUser({ roles = [], name = "Test Person" }: { roles?: GrantableRole[]; name?: string } = {}) {
  counter += 1;
  const email = `user-${Date.now()}-${counter}@test.example`;
  const user = await User.create({ email, name, institution: "Test Institute", lastSignInAt: null });
  for (const role of roles) await RoleGrant.create({ userId: user.id, role, grantedById: null });
  return { user, email, cookie: await sessionCookieFor(email) };
}
