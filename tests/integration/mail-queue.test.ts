import nodemailer, { type SendMailOptions, type Transporter } from "nodemailer";
import { SMTPServer } from "smtp-server";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { drainMailQueue, enqueueMail, messageIdFor, retryDelayMs } from "~/lib/mail/queue.server";
import { OutgoingMail, sequelize } from "~/models/index.server";
import { ensureDatabase } from "../helpers/db";
import { testEnv } from "../helpers/env";
import { allMail } from "../helpers/maildev";

// A real SMTP server whose mood we set: refusing (as a relay that is down or full) or accepting.
let accepting = false;
const received: string[] = [];
const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  onData(stream, session, callback) {
    let body = "";
    stream.on("data", (chunk) => (body += chunk));
    stream.on("end", () => {
      if (!accepting) {
        const error = Object.assign(new Error("451 mailbox unavailable, try later"), { responseCode: 451 });
        return callback(error);
      }
      received.push(body);
      callback();
    });
  },
});
let transport: Transporter;

/** The raw message with quoted-printable soft breaks and escapes undone. */
const decoded = (body: string) => body.replace(/=\r?\n/g, "").replace(/=([0-9A-F]{2})/g, (_, h: string) => String.fromCharCode(parseInt(h, 16)));

async function dueNow() {
  await OutgoingMail.update({ nextAttemptAt: new Date(Date.now() - 1000) }, { where: { status: "pending" } });
}

describe("the outgoing-mail queue", () => {
  beforeAll(async () => {
    await ensureDatabase();
    await new Promise<void>((resolve) => smtp.listen(0, "127.0.0.1", resolve));
    const { port } = smtp.server.address() as AddressInfo;
    transport = nodemailer.createTransport({ host: "127.0.0.1", port, secure: false, ignoreTLS: true });
  });
  afterAll(async () => {
    await new Promise<void>((resolve) => smtp.close(() => resolve()));
  });
  beforeEach(async () => {
    await OutgoingMail.destroy({ where: {} });
    received.length = 0;
  });

  const send = (m: SendMailOptions) => transport.sendMail(m);

  it("keeps messages while the relay refuses, backs off, and delivers each once when it accepts", async () => {
    accepting = false;
    for (let i = 1; i <= 3; i++) await enqueueMail({ to: `queue-${i}@test.example`, subject: `Queued ${i}`, text: `Body ${i}` });
    const first = await drainMailQueue({ send });
    expect(first).toEqual({ sent: 0, failed: 3 });
    const pending = await OutgoingMail.findAll({ order: [["id", "ASC"]] });
    for (const mail of pending) {
      expect(mail.status).toBe("pending");
      expect(mail.attempts).toBe(1);
      expect(mail.lastError).toMatch(/451/);
      expect(mail.nextAttemptAt.getTime()).toBeGreaterThan(Date.now());
    }
    // Not due yet: nothing is tried again before the back-off has passed.
    expect(await drainMailQueue({ send })).toEqual({ sent: 0, failed: 0 });

    accepting = true;
    await dueNow();
    expect(await drainMailQueue({ send })).toEqual({ sent: 3, failed: 0 });
    expect(received).toHaveLength(3);
    const sent = await OutgoingMail.findAll();
    expect(sent.every((m) => m.status === "sent" && m.attempts === 2 && m.sentAt)).toBe(true);
    // Draining again sends nothing twice.
    await dueNow();
    expect(await drainMailQueue({ send })).toEqual({ sent: 0, failed: 0 });
    expect(received).toHaveLength(3);
  });

  it("never sends a message twice when several workers drain at once", async () => {
    accepting = true;
    for (let i = 0; i < 12; i++) await enqueueMail({ to: `parallel-${i}@test.example`, subject: `Parallel ${i}`, text: "x" });
    const results = await Promise.all([drainMailQueue({ send }), drainMailQueue({ send }), drainMailQueue({ send })]);
    expect(results.reduce((n, r) => n + r.sent, 0)).toBe(12);
    expect(received).toHaveLength(12);
    expect(new Set(received.map((b) => b.match(/Subject: (.*)/)?.[1])).size).toBe(12);
  });

  it("enqueues inside a transaction: a rolled-back change leaves no mail behind", async () => {
    await sequelize
      .transaction(async (transaction) => {
        await enqueueMail({ to: "rollback@test.example", subject: "Never", text: "x" }, transaction);
        throw new Error("roll back");
      })
      .catch(() => undefined);
    expect(await OutgoingMail.count({ where: { toAddress: "rollback@test.example" } })).toBe(0);
  });

  it("carries attachments through", async () => {
    accepting = true;
    await enqueueMail({
      to: "attach@test.example",
      subject: "With file",
      text: "see attached",
      attachments: [{ filename: "note.txt", contentType: "text/plain", content: Buffer.from("hello").toString("base64") }],
    });
    await drainMailQueue({ send });
    expect(received[0]).toContain('filename=note.txt');
  });

  it("gives every message a Message-ID derived from its row, the same when it is sent again", async () => {
    accepting = true;
    const row = await enqueueMail({ to: "message-id@test.example", subject: "Once or twice", text: "x" });
    await drainMailQueue({ send });
    const header = (body: string) => body.match(/^Message-ID: *(.*)$/im)?.[1]?.trim();
    const host = new URL(process.env.APP_URL!).hostname;
    // The form, written out here: <outgoing-mail-<id>.<16 hex>@<APP_URL host>>.
    expect(header(received[0])).toMatch(new RegExp(`^<outgoing-mail-${row.id}\\.[0-9a-f]{16}@${host.replace(/\./g, "\\.")}>$`));
    await row.reload();
    expect(header(received[0])).toBe(messageIdFor(row));
    expect(row.messageId).toBe(messageIdFor(row));
    // A crash after the relay accepted it and before it was marked sent: the row is sent again.
    await row.update({ status: "pending", nextAttemptAt: new Date(Date.now() - 1000) });
    expect(await drainMailQueue({ send })).toEqual({ sent: 1, failed: 0 });
    expect(received).toHaveLength(2);
    expect(header(received[1])).toBe(header(received[0]));
    // Another row has another id.
    const other = await enqueueMail({ to: "message-id@test.example", subject: "Another", text: "y" });
    await drainMailQueue({ send });
    expect(header(received[2])).toBe(messageIdFor(other));
    expect(header(received[2])).not.toBe(header(received[0]));
  });

  it("the Message-ID seen in the mail catcher is the row's", async () => {
    const subject = `Seen in maildev ${Date.now()}`;
    const row = await enqueueMail({ to: "maildev-id@test.example", subject, text: "x" });
    expect(await drainMailQueue()).toEqual({ sent: 1, failed: 0 }); // the app's transport: the run's maildev
    const caught = (await allMail()).find((m) => m.subject === subject)!;
    expect(caught).toBeDefined();
    const source = await (await fetch(`${testEnv.maildevUrl}/api/email/${caught.id}/source`)).text();
    expect(source.match(/^Message-ID: *(.*)$/im)?.[1]?.trim()).toBe(messageIdFor(await row.reload()));
  });

  it("a receipt whose PDF cannot be built still goes out, with the download link", async () => {
    accepting = true;
    const payload = { proposalId: 999_999_999, code: "NS-2999A-001", title: "Gone", semesterCode: "2999A", deadlineAt: new Date().toISOString(), submittedAt: new Date().toISOString() };
    await enqueueMail({ to: "receipt-fallback@test.example", subject: "stored subject", text: "stored text", kind: "proposal-receipt", payload });
    expect(await drainMailQueue({ send })).toEqual({ sent: 1, failed: 0 });
    expect(received[0]).toContain("Subject: Nightshare receipt: NS-2999A-001 submitted");
    expect(decoded(received[0])).toContain("The PDF could not be attached this time");
    expect(decoded(received[0])).toContain("/proposals/999999999/pdf");
    expect(received[0]).not.toContain("application/pdf");
  });

  it("backs off exponentially, capped at 15 minutes", () => {
    expect(retryDelayMs(1)).toBe(5_000);
    expect(retryDelayMs(2)).toBe(10_000);
    expect(retryDelayMs(5)).toBe(80_000);
    expect(retryDelayMs(30)).toBe(15 * 60_000);
  });
});
