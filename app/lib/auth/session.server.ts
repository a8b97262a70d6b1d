// Two layers: a signed cookie (`__nightshare`) for what a browser carries before it is signed in
// (where to return, the pending code's encrypted state, a flash message), and a server-side row in
// `sessions` for a signed-in browser: its cookie then holds only a random token. Deleting the row
// ends the session, whatever the browser still holds.
import { createHash, randomBytes } from "node:crypto";
import { createCookieSessionStorage } from "react-router";
import { Op, type Includeable, type Transaction } from "sequelize";
import { UserSession } from "~/models/index.server";
import { env } from "../env.server";

export const SESSION_IDLE_MINUTES = 12 * 60;
export const SESSION_MAX_DAYS = 14;
/** `lastSeenAt` is written at most this often, not on every request. */
export const SESSION_TOUCH_SECONDS = 60;

export interface SessionData {
  /** Random token of the server-side session (signed in). */
  sid: string;
  redirectTo: string;
  /** The pending code's state from remix-auth-totp (a JWE: encrypted and authenticated). */
  pendingCode: string;
}
export interface SessionFlash {
  flash: string;
}

export const sessionStorage = createCookieSessionStorage<SessionData, SessionFlash>({
  cookie: {
    name: "__nightshare",
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    // Secure whenever the app is served over https (production); plain http only on loopback.
    secure: env.APP_URL.startsWith("https:"),
    secrets: [env.SESSION_SECRET],
    maxAge: 60 * 60 * 24 * SESSION_MAX_DAYS,
  },
});

export function getSession(request: Request) {
  return sessionStorage.getSession(request.headers.get("Cookie"));
}

export function sha256(value: string) {
  return createHash("sha256").update(value).digest("hex");
}

/** Creates the server-side session of a user; answers the token for the cookie. */
export async function startUserSession(userId: number, { transaction, now = new Date() }: { transaction?: Transaction; now?: Date } = {}) {
  const token = randomBytes(32).toString("base64url");
  await UserSession.create(
    {
      tokenHash: sha256(token),
      userId,
      lastSeenAt: now,
      expiresAt: new Date(now.getTime() + SESSION_MAX_DAYS * 86_400_000),
    },
    { transaction },
  );
  return token;
}

/** A fresh cookie that holds only the session token (everything from before sign-in is dropped). */
export async function signedInCookie(token: string) {
  const session = await sessionStorage.getSession();
  session.set("sid", token);
  return sessionStorage.commitSession(session);
}

/** The live session for this token, touched at most once a minute; expired rows are deleted. */
/** The live session of this token (`include`: what to read with it in the same statement). */
export async function findUserSession(token: string | undefined, now = new Date(), { include }: { include?: Includeable[] } = {}) {
  if (!token) return null;
  const row = await UserSession.findOne({ where: { tokenHash: sha256(token) }, include });
  if (!row) return null;
  const idleSince = now.getTime() - SESSION_IDLE_MINUTES * 60_000;
  if (row.expiresAt.getTime() <= now.getTime() || row.lastSeenAt.getTime() <= idleSince) {
    await UserSession.destroy({ where: { id: row.id } });
    return null;
  }
  if (now.getTime() - row.lastSeenAt.getTime() >= SESSION_TOUCH_SECONDS * 1000) {
    await UserSession.update({ lastSeenAt: now }, { where: { id: row.id } });
  }
  return row;
}

export async function endUserSession(token: string | undefined) {
  if (token) await UserSession.destroy({ where: { tokenHash: sha256(token) } });
}

/** Ends every session of a user (sign out everywhere, a role change); answers how many ended. */
export async function endSessionsOf(userId: number, { transaction, exceptId }: { transaction?: Transaction; exceptId?: number } = {}) {
  return UserSession.destroy({
    where: { userId, ...(exceptId ? { id: { [Op.ne]: exceptId } } : {}) },
    transaction,
  });
}

/** Drops sessions that can no longer be used (called now and then, not per request). */
export async function pruneSessions(now = new Date()) {
  return UserSession.destroy({
    where: {
      [Op.or]: [
        { expiresAt: { [Op.lte]: now } },
        { lastSeenAt: { [Op.lte]: new Date(now.getTime() - SESSION_IDLE_MINUTES * 60_000) } },
      ],
    },
  });
}
