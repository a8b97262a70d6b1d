// A mail-catcher outage in the middle of a batch: the letters stay queued, the batch's progress
// shows them retrying, and it completes when the relay is back. Driven through the domain
// functions and the queue's own drain (no app worker in this file), the relay "down" as a
// loopback port nobody listens on, then the run's maildev.
import net from "node:net";
import nodemailer from "nodemailer";
import { beforeAll, describe, expect, it } from "vitest";
import { batchProgress, sendDecisions } from "~/lib/decisions/send.server";
import { drainMailQueue } from "~/lib/mail/queue.server";
import { DecisionMail, OutgoingMail } from "~/models/index.server";
import { ensureDatabase } from "../helpers/db";
import { allMail } from "../helpers/maildev";
import { decidedCall } from "./decisions-fixtures";

async function closedPort() {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  const { port } = server.address() as net.AddressInfo;
  await new Promise<void>((r) => server.close(() => r()));
  return port;
}

let f: Awaited<ReturnType<typeof decidedCall>>;
beforeAll(async () => {
  await ensureDatabase();
  await OutgoingMail.update({ status: "failed" }, { where: { status: "pending" } }); // other files' leftovers are not this batch's
  f = await decidedCall();
});

describe("a mail-catcher outage mid-batch", () => {
  it("shows retrying while the relay is down and completes when it is back, losing nothing", async () => {
    const { batch } = await sendDecisions({ actor: f.admin.user, callId: f.call.id });
    expect(batch).toMatchObject({ total: 4, queued: 4, sent: 0, done: false, percent: 0 });
    const ids = (await DecisionMail.findAll({ where: { batchId: batch!.id } })).map((m) => m.outgoingMailId);

    // two letters go out, then the relay goes away
    const up = await drainMailQueue({ limit: 2 });
    expect(up).toEqual({ sent: 2, failed: 0 });
    const down = nodemailer.createTransport({ host: "127.0.0.1", port: await closedPort(), secure: false, ignoreTLS: true, connectionTimeout: 2_000 });
    expect(await drainMailQueue({ send: (m) => down.sendMail(m) })).toEqual({ sent: 0, failed: 2 });
    const during = await batchProgress({ id: batch!.id });
    expect(during).toMatchObject({ total: 4, sent: 2, retrying: 2, queued: 0, failed: 0, done: false, percent: 50 });
    expect(during!.lastError).toMatch(/ECONNREFUSED/);
    const rows = await OutgoingMail.findAll({ where: { id: ids } });
    expect(rows.filter((r) => r.status === "pending" && r.attempts === 1 && r.nextAttemptAt.getTime() > Date.now())).toHaveLength(2);

    // back: the retries fall due and go to the run's maildev
    await OutgoingMail.update({ nextAttemptAt: new Date(Date.now() - 1000) }, { where: { id: ids, status: "pending" } });
    expect(await drainMailQueue()).toEqual({ sent: 2, failed: 0 });
    expect(await batchProgress({ id: batch!.id })).toMatchObject({ total: 4, sent: 4, retrying: 0, failed: 0, done: true, percent: 100 });
    const caught = await allMail();
    for (const p of f.proposals) expect(caught.filter((m) => m.to.some((t) => t.address === p.pi.email))).toHaveLength(1);
    expect(caught.filter((m) => m.to.some((t) => t.address === f.coi.email))).toHaveLength(1);
  });
});
