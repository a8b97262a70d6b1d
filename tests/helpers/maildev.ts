import { testEnv } from "./env";

export interface CaughtMail {
  id: string;
  subject: string;
  text: string;
  html?: string;
  to: { address: string }[];
  attachments?: { fileName: string; contentType: string; length: number; generatedFileName: string }[];
  /** the Date header (whole seconds; may be missing from the listing) */
  date?: string;
  /** when the mail catcher received it (milliseconds) */
  time?: string;
}

/** When a message arrived: the catcher's receive time, else its Date header. */
function arrival(m: CaughtMail) {
  return new Date(m.time ?? m.date ?? 0).getTime();
}

export async function allMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${testEnv.maildevUrl}/api/email`);
  return (await res.json()) as CaughtMail[];
}

export async function clearMail() {
  await fetch(`${testEnv.maildevUrl}/api/email/all`, { method: "DELETE" });
}

/** The ids of the messages caught so far: pass them as `exclude` to wait for a newer one. */
export async function mailIds(): Promise<Set<string>> {
  return new Set((await allMail()).map((m) => m.id));
}

export type MailWait = {
  /** only messages that arrived at or after this time (by the second when only the Date header is known) */
  since?: Date;
  /** never these messages (e.g. `await mailIds()` taken before the action that sends the mail) */
  exclude?: Set<string>;
  /** pause between two looks at the mail catcher */
  pollMs?: number;
};

/**
 * Waits (the queue worker sends within a few seconds) for the newest message to `address`
 * matching `subject`, looking every `pollMs`. With `since` or `exclude`, an older message that
 * matches is never taken: the wait goes on until a new one arrives or the time is up.
 */
export async function waitForMail(address: string, subject: RegExp = /./, timeoutMs = 20_000, { since, exclude, pollMs = 250 }: MailWait = {}): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs;
  const after = (m: CaughtMail) => !since || (m.time ? arrival(m) >= since.getTime() : arrival(m) >= Math.floor(since.getTime() / 1000) * 1000);
  for (;;) {
    const match = (await allMail())
      .filter(
        (m) =>
          m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()) &&
          subject.test(m.subject) &&
          !exclude?.has(m.id) &&
          after(m),
      )
      .sort((a, b) => arrival(b) - arrival(a))[0];
    if (match) return match;
    if (Date.now() >= until) break;
    await new Promise((r) => setTimeout(r, pollMs));
  }
  throw new Error(`No mail to ${address} matching ${subject}${since ? ` since ${since.toISOString()}` : ""}${exclude ? ` apart from ${exclude.size} older ones` : ""} within ${timeoutMs} ms`);
}

export function codeFrom(mail: CaughtMail) {
  const match = mail.text.match(/sign-in code is ([A-Za-z0-9]{6})/);
  if (!match) throw new Error(`No code in: ${mail.text}`);
  return match[1];
}

export function linkFrom(mail: CaughtMail) {
  const match = mail.text.match(/(https?:\/\/\S+\/sign-in\/link\?t=\S+)/);
  if (!match) throw new Error(`No link in: ${mail.text}`);
  return match[1];
}
