import { sessionStorage } from "~/lib/session.server";
import { RoleGrant, User } from "~/models/index.server";
import type { GrantableRole } from "~/lib/domain";

/** A session cookie for the user with this address, as the app would set after sign-in. */
export async function sessionCookieFor(email: string): Promise<string> {
  const user = await User.findOne({ where: { email } });
  if (!user) throw new Error(`No user ${email} in the test database`);
  const session = await sessionStorage.getSession();
  session.set("userId", user.id);
  return (await sessionStorage.commitSession(session)).split(";")[0];
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
