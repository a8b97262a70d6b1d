import { createHash } from "node:crypto";
import nodemailer, { type SendMailOptions } from "nodemailer";
import { QueryTypes, type Transaction } from "sequelize";
import { OutgoingMail, sequelize } from "~/models/index.server";
import type { MailAttachment, MailKind } from "~/models/OutgoingMail";
import { env } from "../env.server";
import { renderQueuedMail } from "./renderers.server";

export const MAX_MAIL_ATTEMPTS = 12;

// Pooled: a drain reuses one SMTP connection instead of a handshake per message (`npm run bench -- decisions`).
const transport = nodemailer.createTransport({
  pool: true,
  maxConnections: 1,
  host: env.SMTP_HOST,
  port: env.SMTP_PORT,
  secure: env.SMTP_PORT === 465,
  auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASSWORD } : undefined,
  connectionTimeout: 5_000,
  greetingTimeout: 5_000,
  socketTimeout: 10_000,
  tls: { rejectUnauthorized: env.NODE_ENV === "production" && env.SMTP_HOST !== "127.0.0.1" },
});

export function mailTransport() {
  return transport;
}

/**
 * Queues a message; it is sent by the worker, so a mail outage never loses it. With `kind`, the
 * worker renders the message when it sends (see mail-renderers.server.ts); subject and text are
 * then what goes out if that rendering fails.
 */
export async function enqueueMail(
  message: { to: string; subject: string; text: string; html?: string; attachments?: MailAttachment[]; kind?: MailKind; payload?: Record<string, unknown>; expiresAt?: Date },
  transaction?: Transaction,
) {
  const row = await OutgoingMail.create(
    {
      toAddress: message.to,
      subject: message.subject,
      textBody: message.text,
      htmlBody: message.html ?? null,
      attachments: message.attachments ?? null,
      kind: message.kind ?? null,
      payload: message.payload ?? null,
      nextAttemptAt: new Date(),
      lastError: null,
      messageId: null,
      sentAt: null,
      expiresAt: message.expiresAt ?? null,
    },
    { transaction },
  );
  if (!transaction) kickWorker();
  else transaction.afterCommit(kickWorker);
  return row;
}

/** Back-off after the n-th failed attempt: 5 s, 10 s, 20 s … capped at 15 minutes. */
export function retryDelayMs(attempts: number) {
  return Math.min(5_000 * 2 ** Math.max(0, attempts - 1), 15 * 60_000);
}

/**
 * The Message-ID of a queued row, the same on every attempt: a message sent again after a crash
 * (accepted by the relay, not yet marked sent) is then recognisably the same message.
 */
export function messageIdFor(mail: { id: number; createdAt: Date }) {
  const hash = createHash("sha256").update(`nightshare-outgoing-mail|${mail.id}|${mail.createdAt.getTime()}`).digest("hex").slice(0, 16);
  return `<outgoing-mail-${mail.id}.${hash}@${new URL(env.APP_URL).hostname}>`;
}

/**
 * Sends the messages that are due, one row at a time. Each row is locked with
 * SKIP LOCKED inside its own transaction, so several app processes never send it twice.
 */
export async function drainMailQueue({ limit = 50, send = (m: SendMailOptions): Promise<{ messageId?: string }> => transport.sendMail(m) } = {}) {
  let sent = 0;
  let failed = 0;
  const memo = new Map<string, unknown>(); // shared by the renderers within one drain (one PDF per proposal)
  for (let i = 0; i < limit; i++) {
    const outcome = await sequelize.transaction(async (transaction) => {
      const rows = await sequelize.query<{ id: number }>(
        "SELECT id FROM outgoing_mail WHERE status = 'pending' AND nextAttemptAt <= NOW(3) ORDER BY nextAttemptAt, id LIMIT 1 FOR UPDATE SKIP LOCKED",
        { type: QueryTypes.SELECT, transaction },
      );
      if (rows.length === 0) return "empty" as const;
      const mail = await OutgoingMail.findByPk(rows[0].id, { transaction });
      if (!mail) return "empty" as const;
      if (mail.expiresAt && mail.expiresAt.getTime() <= Date.now()) {
        await mail.update({ status: "failed", lastError: `expired at ${mail.expiresAt.toISOString()} before it could be sent` }, { transaction });
        return "failed" as const;
      }
      try {
        const content = await renderQueuedMail(mail, memo);
        const messageId = messageIdFor(mail);
        const info = await send({
          from: env.MAIL_FROM,
          to: mail.toAddress,
          messageId,
          subject: content.subject,
          text: content.text,
          html: content.html ?? undefined,
          attachments: content.attachments.map((a) => ({
            filename: a.filename,
            contentType: a.contentType,
            content: Buffer.from(a.content, "base64"),
          })),
        });
        await mail.update({ status: "sent", sentAt: new Date(), attempts: mail.attempts + 1, messageId: info?.messageId ?? messageId, lastError: null }, { transaction });
        return "sent" as const;
      } catch (error) {
        const attempts = mail.attempts + 1;
        const nextAttemptAt = new Date(Date.now() + retryDelayMs(attempts));
        // A message with a lifetime (a sign-in code) is given up rather than retried past it.
        const expires = mail.expiresAt !== null && nextAttemptAt.getTime() >= mail.expiresAt.getTime();
        await mail.update(
          {
            attempts,
            lastError: (error instanceof Error ? error.message : String(error)) + (expires ? " (given up: it would arrive after it expires)" : ""),
            status: attempts >= MAX_MAIL_ATTEMPTS || expires ? "failed" : "pending",
            nextAttemptAt,
          },
          { transaction },
        );
        return "failed" as const;
      }
    });
    if (outcome === "empty") break;
    if (outcome === "sent") sent++;
    else failed++;
  }
  return { sent, failed };
}

let timer: NodeJS.Timeout | null = null;
let running = false;
let stopped = true;

async function tick() {
  if (running || stopped) return;
  running = true;
  try {
    await drainMailQueue();
  } catch (error) {
    console.error("[mail] queue drain failed:", error instanceof Error ? error.message : error);
  } finally {
    running = false;
  }
}

function kickWorker() {
  if (!stopped) setImmediate(tick);
}

export function startMailWorker(intervalMs = 2_000) {
  if (!stopped) return;
  stopped = false;
  timer = setInterval(tick, intervalMs);
  timer.unref();
  setImmediate(tick);
}

export function stopMailWorker() {
  stopped = true;
  if (timer) clearInterval(timer);
  timer = null;
}

