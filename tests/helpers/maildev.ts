import { testEnv } from "./env";

export interface CaughtMail {
  id: string;
  subject: string;
  text: string;
  html?: string;
  to: { address: string }[];
  attachments?: { fileName: string; contentType: string; length: number; generatedFileName: string }[];
  date: string;
}

export async function allMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${testEnv.maildevUrl}/api/email`);
  return (await res.json()) as CaughtMail[];
}

export async function clearMail() {
  await fetch(`${testEnv.maildevUrl}/api/email/all`, { method: "DELETE" });
}

/** Waits (the queue worker sends within a few seconds) for a message to `address` matching `subject`. */
export async function waitForMail(address: string, subject: RegExp = /./, timeoutMs = 20_000): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const match = (await allMail())
      .filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()) && subject.test(m.subject))
      .sort((a, b) => b.date.localeCompare(a.date))[0];
    if (match) return match;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`No mail to ${address} matching ${subject} within ${timeoutMs} ms`);
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
