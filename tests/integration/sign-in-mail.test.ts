import { Op } from "sequelize";
import { beforeAll, describe, expect, it } from "vitest";
import { drainMailQueue, enqueueMail } from "~/lib/mail/queue.server";
import { OutgoingMail } from "~/models/index.server";
import { ensureDatabase } from "../helpers/db";

// A relay that refuses everything, as one that is down.
const refuse = async () => {
  throw new Error("421 service not available");
};

/** Makes this file's pending messages due now and drains the queue once. */
async function attemptNow(ids: number[]) {
  await OutgoingMail.update({ nextAttemptAt: new Date(Date.now() - 1000) }, { where: { id: { [Op.in]: ids }, status: "pending" } });
  await drainMailQueue({ send: refuse });
}

describe("sign-in code mails are retried only within the code's lifetime", () => {
  beforeAll(async () => {
    await ensureDatabase();
    // Nothing else of the shared database is drained by this file's failing relay.
    await OutgoingMail.update({ nextAttemptAt: new Date(Date.now() + 3600_000) }, { where: { status: "pending" } });
  });

  it("gives a code mail up instead of scheduling a retry after it expires; other mail keeps trying", async () => {
    const code = await enqueueMail({ to: "lifetime@test.example", subject: "Your Nightshare sign-in code", text: "x", expiresAt: new Date(Date.now() + 5 * 60_000) });
    const other = await enqueueMail({ to: "lifetime@test.example", subject: "Invitation", text: "y" });
    for (let i = 0; i < 8; i++) {
      await attemptNow([code.id, other.id]);
      const row = (await OutgoingMail.findByPk(code.id))!;
      if (row.status !== "pending") continue;
      // Never a retry scheduled past the code's end.
      expect(row.nextAttemptAt.getTime()).toBeLessThan(row.expiresAt!.getTime());
      // Let the wait pass: the code's remaining life shrinks by the back-off just scheduled.
      const wait = row.nextAttemptAt.getTime() - Date.now();
      await row.update({ expiresAt: new Date(row.expiresAt!.getTime() - wait) });
    }
    const gaveUp = (await OutgoingMail.findByPk(code.id))!;
    expect(gaveUp.status).toBe("failed");
    expect(gaveUp.lastError).toMatch(/given up/);
    // 5 s, 10 s, 20 s, 40 s, 80 s (sum 155 s) fit in 5 minutes; the 6th failure would wait 160 s more: given up.
    expect(gaveUp.attempts).toBe(6);
    const kept = (await OutgoingMail.findByPk(other.id))!;
    expect(kept.status).toBe("pending");
    expect(kept.attempts).toBe(8);
  });

  it("does not send a code mail that expired while it waited", async () => {
    const stale = await enqueueMail({ to: "stale@test.example", subject: "Your Nightshare sign-in code", text: "x", expiresAt: new Date(Date.now() - 1000) });
    let sent = 0;
    await OutgoingMail.update({ nextAttemptAt: new Date(Date.now() - 1000) }, { where: { id: stale.id } });
    await drainMailQueue({ send: async () => ((sent += 1), { messageId: "x" }) });
    const row = (await OutgoingMail.findByPk(stale.id))!;
    expect(row.status).toBe("failed");
    expect(row.lastError).toMatch(/expired/);
    expect(sent).toBe(0);
  });
});
