// Sign-in by e-mailed code. remix-auth-totp makes and checks the code; everything that decides
// WHO signs in lives on the server:
// - the library's `_totp` cookie never reaches the browser. Its encrypted part (the JWE) travels in
//   our signed session cookie; its `email` is rebuilt from `sign_in_codes.email`, the address the
//   server mailed the code to, found by the JWE's hash. A request that brings an `_totp` cookie
//   with another address is refused and audited as an attempt.
// - limits are atomic: code requests are counted under a row lock per address and per client IP;
//   each check of a code first reserves one of its attempts with a conditional UPDATE.
import { redirect } from "react-router";
import { TOTPStrategy } from "remix-auth-totp";
import { Op, QueryTypes, Transaction } from "sequelize";
import { RateLimitKey, sequelize, SignInCode, SignInRequest, User } from "~/models/index.server";
import { writeAudit } from "../audit.server";
import { INVALID_EMAIL_MESSAGE, normaliseEmail } from "../email";
import { env } from "../env.server";
import { enqueueMail } from "../mail/queue.server";
import { signInCodeMail } from "../mail/templates.server";
import { claimInvitations } from "../proposals/proposals.server";
import { sameOriginPath } from "../redirect";
import { CODE_ALPHABET, normaliseCode } from "../schemas/auth";
import { getSession, sessionStorage, sha256, signedInCookie, startUserSession } from "./session.server";

export const CODE_LIFETIME_SECONDS = 300;
export const MAX_CODE_ATTEMPTS = 3;
export const RATE_WINDOW_MINUTES = 15;
export const MAX_CODES_PER_ADDRESS = 5;
/** Per client IP: a whole institute may sit behind one NAT address on deadline day. */
export const MAX_CODES_PER_IP = 200;
export const MAGIC_LINK_PATH = "/sign-in/link";

/** The client's address as our HTTP server saw it (it overwrites any header a client sends). */
export function clientIp(request: Request) {
  return request.headers.get("x-nightshare-client-ip") ?? "unknown";
}

export function safeRedirectTo(value: unknown, fallback = "/") {
  return sameOriginPath(value, env.APP_URL, fallback);
}

/** Thrown (not an Error, so the library lets it through) when the library accepted the code. */
class CodeAccepted {}

const strategy = new TOTPStrategy<null>(
  {
    secret: env.TOTP_SECRET,
    emailSentRedirect: "/sign-in",
    successRedirect: "/",
    failureRedirect: "/sign-in",
    magicLinkPath: MAGIC_LINK_PATH,
    totpGeneration: { period: CODE_LIFETIME_SECONDS, maxAttempts: MAX_CODE_ATTEMPTS, charSet: CODE_ALPHABET },
    customErrors: {
      invalidEmail: INVALID_EMAIL_MESSAGE,
      invalidTotp: "That code is not right. Check the e-mail and try again, or ask for a new code.",
      expiredTotp: "That code has expired. Ask for a new one below.",
      missingSessionEmail: "Start again from this browser: ask for a new code.",
      missingSessionTotp: "No code is waiting for this browser: ask for a new one.",
      rateLimitExceeded: "Too many wrong codes. Ask for a new one.",
    },
    sendTOTP: async ({ email, code, magicLink }) => {
      const link = new URL(new URL(magicLink).pathname + new URL(magicLink).search, env.APP_URL).toString();
      await enqueueMail({
        to: email,
        ...signInCodeMail({ code, link, minutes: CODE_LIFETIME_SECONDS / 60 }),
        // A code mail not sent within the code's lifetime is useless: it is given up, not retried.
        expiresAt: new Date(Date.now() + CODE_LIFETIME_SECONDS * 1000),
      });
    },
  },
  async () => {
    throw new CodeAccepted();
  },
);

function setCookiesOf(response: Response) {
  return response.headers.getSetCookie().map((c) => c.split(";")[0]);
}

/** The `_totp` cookie's fields, from a Cookie or Set-Cookie list. */
function totpFields(pairs: string[]) {
  const pair = pairs.find((p) => p.trim().startsWith("_totp="));
  if (!pair) return null;
  let value = pair.trim().slice("_totp=".length);
  if (value.startsWith('"') && value.endsWith('"')) value = value.slice(1, -1);
  try {
    const params = new URLSearchParams(value);
    const totp = params.get("totp");
    return { email: params.get("email"), error: params.get("error"), jwe: totp ? (JSON.parse(totp).jwe as string | undefined) ?? null : null };
  } catch {
    return { email: null, error: null, jwe: null };
  }
}

const CLEAR_TOTP_COOKIE = "_totp=; Path=/; Max-Age=0; HttpOnly; SameSite=Lax";

/** A request for the library with just the fields it reads; its cookie is built by the server. */
function libraryRequest(request: Request, { body, totp }: { body?: Record<string, string>; totp?: { email: string; jwe: string } }) {
  const headers = new Headers();
  for (const name of ["x-nightshare-client-ip", "host"]) {
    const value = request.headers.get(name);
    if (value) headers.set(name, value);
  }
  if (totp) {
    const params = new URLSearchParams({ email: totp.email, totp: JSON.stringify({ jwe: totp.jwe, attempts: 0 }) });
    headers.set("Cookie", `_totp=${params.toString()}`);
  }
  if (!body) return new Request(request.url, { method: "GET", headers });
  headers.set("Content-Type", "application/x-www-form-urlencoded");
  return new Request(request.url, { method: "POST", headers, body: new URLSearchParams(body) });
}

type Limited = { message: string; retryAfterSeconds: number };

/**
 * Counts one code request for this address and client IP, or answers why not. The lock rows of
 * both keys are taken FOR UPDATE (in key order, so two requests never deadlock) before counting,
 * so a parallel burst is counted one request at a time.
 */
export async function reserveCodeRequest({ email, ip, now = new Date() }: { email: string; ip: string; now?: Date }): Promise<Limited | null> {
  const keys = [`email:${email}`, `ip:${ip}`].map((k) => k.slice(0, 320)).sort();
  await RateLimitKey.bulkCreate(keys.map((lockKey) => ({ lockKey })), { ignoreDuplicates: true });
  const since = new Date(now.getTime() - RATE_WINDOW_MINUTES * 60_000);
  const attempt = () =>
    sequelize.transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }, async (transaction) => {
      await sequelize.query("SELECT lockKey FROM rate_limit_keys WHERE lockKey IN (:keys) ORDER BY lockKey FOR UPDATE", {
        replacements: { keys },
        type: QueryTypes.SELECT,
        transaction,
      });
      for (const [where, limit, what] of [
        [{ email }, MAX_CODES_PER_ADDRESS, "this address"],
        [{ ip }, MAX_CODES_PER_IP, "your network address"],
      ] as const) {
        const recent = await SignInRequest.findAll({
          where: { ...where, createdAt: { [Op.gt]: since } },
          order: [["createdAt", "DESC"]],
          attributes: ["createdAt"],
          limit,
          transaction,
        });
        if (recent.length >= limit) {
          const freeAt = new Date(recent[limit - 1].createdAt.getTime() + RATE_WINDOW_MINUTES * 60_000);
          const minutes = Math.max(1, Math.ceil((freeAt.getTime() - now.getTime()) / 60_000));
          return {
            message: `Too many codes were asked for ${what}. Try again in ${minutes} minute${minutes === 1 ? "" : "s"} (after ${freeAt.toISOString().slice(11, 16)} UTC).`,
            retryAfterSeconds: Math.max(1, Math.ceil((freeAt.getTime() - now.getTime()) / 1000)),
          };
        }
      }
      await SignInRequest.create({ email, ip, createdAt: now }, { transaction });
      return null;
    });
  try {
    return await attempt();
  } catch (error) {
    // A lock wait that ended in a deadlock report is safe to run once more.
    if ((error as { parent?: { errno?: number } }).parent?.errno === 1213) return attempt();
    throw error;
  }
}

/** Mails a code (after the limits) and answers the redirect to the code step. */
export async function sendSignInCode(request: Request, { email, redirectTo }: { email: string; redirectTo: string }): Promise<Limited | never> {
  const limited = await reserveCodeRequest({ email, ip: clientIp(request) });
  if (limited) return limited;
  const session = await getSession(request);
  let jwe: string | null = null;
  let error: string | null = null;
  try {
    await strategy.authenticate(libraryRequest(request, { body: { email } }));
  } catch (thrown) {
    if (!(thrown instanceof Response)) throw thrown;
    const fields = totpFields(setCookiesOf(thrown));
    jwe = fields?.jwe ?? null;
    error = fields?.error ?? null;
  }
  if (!jwe) throw await failWith(request, error ?? "The code could not be sent. Try again.");
  await SignInCode.create({ tokenHash: sha256(jwe), email, usedAt: null });
  session.set("pendingCode", jwe);
  session.set("redirectTo", safeRedirectTo(redirectTo));
  const headers = new Headers();
  headers.append("Set-Cookie", await sessionStorage.commitSession(session));
  headers.append("Set-Cookie", CLEAR_TOTP_COOKIE);
  throw redirect("/sign-in", { headers });
}

/** The address and state of the code waiting in this browser, from the server's record. */
export async function pendingCodeFor(request: Request) {
  const session = await getSession(request);
  const jwe = session.get("pendingCode");
  if (!jwe) return null;
  const record = await SignInCode.findOne({ where: { tokenHash: sha256(jwe) } });
  if (!record) return null;
  const expired = Date.now() - record.createdAt.getTime() > CODE_LIFETIME_SECONDS * 1000;
  return { email: record.email, usable: !record.usedAt && record.attempts < MAX_CODE_ATTEMPTS && !expired };
}

/**
 * Checks a typed code (`code`) or the one-click link (a GET with `t=`) and signs in the address
 * the code was issued for. Every outcome is a redirect.
 */
export async function verifySignInCode(request: Request, { code }: { code?: string } = {}): Promise<never> {
  const session = await getSession(request);
  const jwe = session.get("pendingCode");
  if (!jwe) throw await failWith(request, "No code is waiting for this browser: ask for a new one. A code works only in the browser that asked for it.");
  const record = await SignInCode.findOne({ where: { tokenHash: sha256(jwe) } });
  if (!record) throw await failWith(request, "No code is waiting for this browser: ask for a new one.");

  const claimed = normaliseEmail(totpFields((request.headers.get("Cookie") ?? "").split(";"))?.email ?? "") || undefined;
  if (claimed && claimed !== record.email) {
    await SignInCode.update({ attempts: MAX_CODE_ATTEMPTS }, { where: { id: record.id } });
    await writeAudit({
      actorId: null,
      action: "sign_in.address_mismatch",
      entityType: "sign_in_code",
      entityId: record.id,
      details: { issuedFor: record.email, claimed: claimed.slice(0, 254), ip: clientIp(request) },
    });
    throw await failWith(request, "This code was not issued for that address, so it no longer works. Ask for a new one.");
  }
  if (record.usedAt) throw await failWith(request, "That code has already been used. Ask for a new one.");

  // Reserve one attempt before the code is checked: a parallel burst gets at most MAX_CODE_ATTEMPTS checks.
  const [reserved] = await SignInCode.update(
    { attempts: sequelize.literal("attempts + 1") as unknown as number },
    { where: { id: record.id, usedAt: null, attempts: { [Op.lt]: MAX_CODE_ATTEMPTS } } },
  );
  if (reserved !== 1) {
    const now = await SignInCode.findByPk(record.id);
    throw await failWith(request, now?.usedAt ? "That code has already been used. Ask for a new one." : "Too many wrong codes. Ask for a new one.");
  }

  try {
    const totp = { email: record.email, jwe };
    await strategy.authenticate(libraryRequest(request, code === undefined ? { totp } : { totp, body: { code: normaliseCode(code) } }));
  } catch (thrown) {
    if (thrown instanceof CodeAccepted) return finishSignIn(request, record);
    if (thrown instanceof Response) {
      const error = totpFields(setCookiesOf(thrown))?.error;
      throw await failWith(request, error ?? "That code is not right. Ask for a new one.");
    }
    throw thrown;
  }
  throw await failWith(request, "Enter the code from the e-mail.");
}

async function finishSignIn(request: Request, record: SignInCode): Promise<never> {
  // Single use, atomically: a second request with the same code finds usedAt set.
  const [used] = await SignInCode.update({ usedAt: new Date() }, { where: { id: record.id, usedAt: null } });
  if (used !== 1) throw await failWith(request, "That code has already been used. Ask for a new one.");
  const email = record.email;
  const [user, created] = await User.findOrCreate({
    where: { email },
    defaults: { email, name: null, institution: null, lastSignInAt: new Date() },
  });
  if (!created) await user.update({ lastSignInAt: new Date() });
  // Co-I invitations to this address become the user's here, once, not on every read.
  await claimInvitations({ user });
  const token = await startUserSession(user.id);
  await writeAudit({ actorId: user.id, action: created ? "user.created" : "user.signed_in", entityType: "user", entityId: user.id, details: { ip: clientIp(request) } });
  const session = await getSession(request);
  const redirectTo = safeRedirectTo(session.get("redirectTo"));
  const headers = new Headers();
  headers.append("Set-Cookie", await signedInCookie(token));
  headers.append("Set-Cookie", CLEAR_TOTP_COOKIE);
  throw redirect(user.name ? redirectTo : `/welcome?redirectTo=${encodeURIComponent(redirectTo)}`, { headers });
}

async function failWith(request: Request, message: string) {
  const session = await getSession(request);
  session.flash("flash", message);
  const headers = new Headers();
  headers.append("Set-Cookie", await sessionStorage.commitSession(session));
  headers.append("Set-Cookie", CLEAR_TOTP_COOKIE);
  return redirect("/sign-in", { headers });
}

/** Forgets the pending code of this browser ("Use another address"). */
export async function restartSignIn(request: Request): Promise<never> {
  const session = await getSession(request);
  session.unset("pendingCode");
  const headers = new Headers();
  headers.append("Set-Cookie", await sessionStorage.commitSession(session));
  headers.append("Set-Cookie", CLEAR_TOTP_COOKIE);
  throw redirect("/sign-in", { headers });
}
