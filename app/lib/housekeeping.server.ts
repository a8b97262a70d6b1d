// Rows that only ever grow unless someone removes them: sessions past their idle or absolute
// limit (a cookie that is never seen again is never checked) and sign-in requests older than any
// rate window. Run now and then from the server process, never on a request.
import { Op } from "sequelize";
import { SignInRequest } from "~/models/index.server";
import { pruneSessions } from "./auth/session.server";

const EVERY_MS = 60 * 60_000;
/** Sign-in requests are counted over 15 minutes; a day of them is kept for the audit trail of abuse. */
const KEEP_SIGN_IN_REQUESTS_MS = 24 * 60 * 60_000;

export async function sweep(now = new Date()) {
  const sessions = await pruneSessions(now);
  const signInRequests = await SignInRequest.destroy({ where: { createdAt: { [Op.lt]: new Date(now.getTime() - KEEP_SIGN_IN_REQUESTS_MS) } } });
  return { sessions, signInRequests };
}

let timer: NodeJS.Timeout | null = null;

export function startHousekeeping() {
  if (timer) return;
  const run = () => void sweep().catch((error) => console.error("[housekeeping]", error));
  timer = setInterval(run, EVERY_MS);
  timer.unref();
  setTimeout(run, 30_000).unref();
}
