import { createHash } from "node:crypto";
import { data, redirect } from "react-router";
import { Authenticator } from "remix-auth";
import { TOTPStrategy } from "remix-auth-totp";
import { Op } from "sequelize";
import { RoleGrant, SignInCode, SignInRequest, User } from "~/models/index.server";
import type { GrantableRole } from "~/models/RoleGrant";
import { writeAudit } from "./audit.server";
import { env } from "./env.server";
import { enqueueMail } from "./mail-queue.server";
import { signInCodeMail } from "./mail-templates.server";
import { getSession, sessionStorage } from "./session.server";

export const CODE_LIFETIME_SECONDS = 300;
export const MAX_CODE_ATTEMPTS = 3;
export const RATE_WINDOW_MINUTES = 15;
export const MAX_CODES_PER_ADDRESS = 5;
export const MAX_CODES_PER_IP = 20;
export const MAGIC_LINK_PATH = "/sign-in/link";

export interface SessionUser {
  id: number;
  email: string;
  name: string | null;
  institution: string | null;
  isMemberInstitution: boolean;
  roles: GrantableRole[];
}

/** The client's address as our HTTP server saw it (it overwrites any header a client sends). */
export function clientIp(request: Request) {
  return request.headers.get("x-nightshare-client-ip") ?? "unknown";
}

export function safeRedirectTo(value: unknown, fallback = "/") {
  if (typeof value !== "string" || !value.startsWith("/") || value.startsWith("//")) return fallback;
  return value;
}

function tokenHash(jwe: string) {
  return createHash("sha256").update(jwe).digest("hex");
}

/** The encrypted code state that remix-auth-totp keeps in its own `_totp` cookie. */
export function totpTokenFromCookieHeader(header: string | null): string | null {
  if (!header) return null;
  const match = header.split(/;\s*/).find((part) => part.startsWith("_totp="));
  if (!match) return null;
  try {
    const params = new URLSearchParams(decodeURIComponent(match.slice("_totp=".length)));
    const totp = params.get("totp");
    return totp ? (JSON.parse(totp).jwe as string) : null;
  } catch {
    return null;
  }
}

export function totpStateFromRequest(request: Request): { email?: string; error?: string; hasCode: boolean } {
  const header = request.headers.get("Cookie") ?? "";
  const match = header.split(/;\s*/).find((part) => part.startsWith("_totp="));
  if (!match) return { hasCode: false };
  const params = new URLSearchParams(decodeURIComponent(match.slice("_totp=".length)));
  return {
    email: params.get("email") ?? undefined,
    error: params.get("error") ?? undefined,
    hasCode: Boolean(params.get("totp")),
  };
}

const strategy = new TOTPStrategy<SessionUser>(
  {
    secret: env.TOTP_SECRET,
    emailSentRedirect: "/sign-in",
    successRedirect: "/",
    failureRedirect: "/sign-in",
    magicLinkPath: MAGIC_LINK_PATH,
    totpGeneration: { period: CODE_LIFETIME_SECONDS, maxAttempts: MAX_CODE_ATTEMPTS },
    cookieOptions: env.APP_URL.startsWith("https:") ? { secure: true } : {},
    customErrors: {
      invalidEmail: "Enter a valid e-mail address, like name@institute.example.",
      invalidTotp: "That code is not right. Check the e-mail and try again, or ask for a new code.",
      expiredTotp: "That code has expired. Ask for a new one below.",
      missingSessionEmail: "Start again from this browser: ask for a new code.",
      missingSessionTotp: "No code is waiting for this browser: ask for a new one.",
      rateLimitExceeded: "Too many wrong codes. Ask for a new one.",
    },
    sendTOTP: async ({ email, code, magicLink }) => {
      const link = new URL(new URL(magicLink).pathname + new URL(magicLink).search, env.APP_URL).toString();
      await enqueueMail({ to: email, ...signInCodeMail({ code, link, minutes: CODE_LIFETIME_SECONDS / 60 }) });
    },
  },
  async ({ email, request }) => {
    const jwe = totpTokenFromCookieHeader(request.headers.get("Cookie"));
    const normalized = email.trim().toLowerCase();
    // Single use, atomically: a second request with the same code finds usedAt set.
    const [used] = await SignInCode.update(
      { usedAt: new Date() },
      {
        where: {
          tokenHash: jwe ? tokenHash(jwe) : "",
          usedAt: null,
          failedAttempts: { [Op.lt]: MAX_CODE_ATTEMPTS },
        },
      },
    );
    if (used !== 1) throw new Error("That code has already been used or was refused. Ask for a new one.");
    const [user, created] = await User.findOrCreate({
      where: { email: normalized },
      defaults: { email: normalized, name: null, institution: null, lastSignInAt: new Date() },
    });
    if (!created) await user.update({ lastSignInAt: new Date() });
    await writeAudit({ actorId: user.id, action: created ? "user.created" : "user.signed_in", entityType: "user", entityId: user.id });
    const session = await getSession(request);
    const redirectTo = safeRedirectTo(session.get("redirectTo"));
    session.unset("redirectTo");
    session.set("userId", user.id);
    throw redirect(user.name ? redirectTo : `/welcome?redirectTo=${encodeURIComponent(redirectTo)}`, {
      headers: { "Set-Cookie": await sessionStorage.commitSession(session) },
    });
  },
);

export const authenticator = new Authenticator<SessionUser>();
authenticator.use(strategy);

export async function rateLimitMessage({ email, ip, now = new Date() }: { email: string; ip: string; now?: Date }) {
  const since = new Date(now.getTime() - RATE_WINDOW_MINUTES * 60_000);
  for (const [where, limit, what] of [
    [{ email }, MAX_CODES_PER_ADDRESS, "this address"],
    [{ ip }, MAX_CODES_PER_IP, "your network address"],
  ] as const) {
    const recent = await SignInRequest.findAll({
      where: { ...where, createdAt: { [Op.gt]: since } },
      order: [["createdAt", "ASC"]],
      attributes: ["createdAt"],
    });
    if (recent.length >= limit) {
      const freeAt = new Date(recent[recent.length - limit].createdAt.getTime() + RATE_WINDOW_MINUTES * 60_000);
      const minutes = Math.max(1, Math.ceil((freeAt.getTime() - now.getTime()) / 60_000));
      return {
        message: `Too many codes were asked for ${what}. Try again in ${minutes} minute${minutes === 1 ? "" : "s"} (after ${freeAt.toISOString().slice(11, 16)} UTC).`,
        retryAfterSeconds: Math.ceil((freeAt.getTime() - now.getTime()) / 1000),
      };
    }
  }
  return null;
}

/** Sends a code (the strategy throws its redirect); records the request and the issued code. */
export async function sendSignInCode(request: Request, { email, redirectTo }: { email: string; redirectTo: string }) {
  await SignInRequest.create({ email, ip: clientIp(request) });
  const session = await getSession(request);
  session.set("redirectTo", safeRedirectTo(redirectTo));
  try {
    await authenticator.authenticate("TOTP", request);
  } catch (thrown) {
    if (!(thrown instanceof Response)) throw thrown;
    const headers = new Headers(thrown.headers);
    const jwe = totpTokenFromCookieHeader(
      headers.getSetCookie().map((c) => c.split(";")[0]).join("; "),
    );
    if (jwe) await SignInCode.create({ tokenHash: tokenHash(jwe), email, usedAt: null });
    headers.append("Set-Cookie", await sessionStorage.commitSession(session));
    throw new Response(null, { status: thrown.status, headers });
  }
}

/** Checks a code (typed, or from the link) against the server-side record before and after the strategy does. */
export async function verifySignInCode(request: Request): Promise<never> {
  const jwe = totpTokenFromCookieHeader(request.headers.get("Cookie"));
  const record = jwe ? await SignInCode.findOne({ where: { tokenHash: tokenHash(jwe) } }) : null;
  if (record?.usedAt) throw await failWith(request, "That code has already been used. Ask for a new one.");
  if (record && record.failedAttempts >= MAX_CODE_ATTEMPTS) {
    throw await failWith(request, "Too many wrong codes. Ask for a new one.");
  }
  try {
    await authenticator.authenticate("TOTP", request);
  } catch (thrown) {
    if (thrown instanceof Response) {
      const location = thrown.headers.get("Location");
      if (record && location === "/sign-in") await record.increment("failedAttempts");
      throw thrown;
    }
    if (thrown instanceof Error) throw await failWith(request, thrown.message);
    throw thrown;
  }
  throw redirect("/");
}

async function failWith(request: Request, message: string) {
  const session = await getSession(request);
  session.flash("flash", message);
  return redirect("/sign-in", { headers: { "Set-Cookie": await sessionStorage.commitSession(session) } });
}

export async function getSessionUser(request: Request): Promise<SessionUser | null> {
  const session = await getSession(request);
  const userId = session.get("userId");
  if (!userId) return null;
  const user = await User.findByPk(userId, { include: [{ model: RoleGrant, as: "roleGrants" }] });
  if (!user) return null;
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    institution: user.institution,
    isMemberInstitution: user.isMemberInstitution,
    roles: (user.roleGrants ?? []).map((grant) => grant.role).sort(),
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

export async function signOut(request: Request) {
  const session = await getSession(request);
  return redirect("/", { headers: { "Set-Cookie": await sessionStorage.destroySession(session) } });
}
