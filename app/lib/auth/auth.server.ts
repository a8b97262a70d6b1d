// Who is signed in, and the guards every loader, action and API route starts with. Sign-in itself
// (codes, limits) is in `sign-in.server.ts`; sessions in `session.server.ts`.
import { data, redirect } from "react-router";
import { RoleGrant, User } from "~/models/index.server";
import type { GrantableRole } from "~/models/RoleGrant";
import { isEpochOffice } from "~/lib/epochs/office-roles";
import { endUserSession, findUserSession, getSession, sessionStorage } from "./session.server";

export {
  clientIp,
  CODE_LIFETIME_SECONDS,
  MAGIC_LINK_PATH,
  MAX_CODE_ATTEMPTS,
  MAX_CODES_PER_ADDRESS,
  MAX_CODES_PER_IP,
  RATE_WINDOW_MINUTES,
  safeRedirectTo,
} from "./sign-in.server";

export interface SessionUser {
  id: number;
  email: string;
  name: string | null;
  institution: string | null;
  isMemberInstitution: boolean;
  roles: GrantableRole[];
  /** Id of the server-side session row this request came with. */
  sessionId?: number;
}

/**
 * The shell's, the layout's and the page's loaders of one request each ask for the user: a
 * read (GET/HEAD) looks the session up once. Not for actions, which may sign in, out or change roles.
 */
const usersOfRequest = new WeakMap<Request, Promise<SessionUser | null>>();

export function getSessionUser(request: Request): Promise<SessionUser | null> {
  if (request.method !== "GET" && request.method !== "HEAD") return readSessionUser(request);
  let user = usersOfRequest.get(request);
  if (!user) {
    user = readSessionUser(request);
    usersOfRequest.set(request, user);
    // a failed read is not remembered
    user.catch(() => usersOfRequest.delete(request));
  }
  return user;
}

async function readSessionUser(request: Request): Promise<SessionUser | null> {
  const session = await getSession(request);
  // the account and its roles in the session's statement
  const row = await findUserSession(session.get("sid"), new Date(), { include: [{ model: User, as: "user", include: [{ model: RoleGrant, as: "roleGrants" }] }] });
  if (!row) return null;
  const user = row.user;
  if (!user) return null;
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    institution: user.institution,
    isMemberInstitution: user.isMemberInstitution,
    roles: (user.roleGrants ?? []).map((grant) => grant.role).sort(),
    sessionId: row.id,
  };
}

function isApi(request: Request) {
  return new URL(request.url).pathname.startsWith("/api/");
}

/** Anonymous visitors go to sign-in (pages) or get a 401 (API routes). */
export async function requireUser(request: Request): Promise<SessionUser> {
  const user = await getSessionUser(request);
  if (user) return user;
  if (isApi(request)) throw data({ error: "Sign in first." }, { status: 401 });
  const url = new URL(request.url);
  throw redirect(`/sign-in?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
}

export async function requireRole(request: Request, role: GrantableRole): Promise<SessionUser> {
  const user = await requireUser(request);
  if (user.roles.includes(role)) return user;
  if (isApi(request)) throw data({ error: `This needs the ${role} role.` }, { status: 403 });
  throw data({ message: `This part of Nightshare is for the ${role} role, which your account does not hold.` }, { status: 403 });
}

/** The epoch log's keepers, the office or an observer; others get 403 (JSON on the API). */
export async function requireEpochOffice(request: Request): Promise<SessionUser> {
  const user = await requireUser(request);
  if (isEpochOffice(user)) return user;
  if (isApi(request)) throw data({ error: "This needs the admin or observer role." }, { status: 403 });
  throw data({ message: "The epoch log is kept by the observatory office and its observers (admin or observer role)." }, { status: 403 });
}

/** Ends this browser's server-side session (an old copy of the cookie stops working too). */
export async function signOut(request: Request) {
  const session = await getSession(request);
  await endUserSession(session.get("sid"));
  return redirect("/", { headers: { "Set-Cookie": await sessionStorage.destroySession(session) } });
}
