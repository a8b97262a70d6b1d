import nodemailer, { type SendMailOptions, type Transporter } from "nodemailer";
import { SMTPServer } from "smtp-server";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { drainMailQueue, enqueueMail, retryDelayMs } from "~/lib/mail-queue.server";
import { OutgoingMail, sequelize } from "~/models/index.server";
import { ensureDatabase } from "../helpers/db";

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

  it("backs off exponentially, capped at 15 minutes", () => {
    expect(retryDelayMs(1)).toBe(5_000);
    expect(retryDelayMs(2)).toBe(10_000);
    expect(retryDelayMs(5)).toBe(80_000);
    expect(retryDelayMs(30)).toBe(15 * 60_000);
  });
});
