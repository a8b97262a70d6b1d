// Demo charges: on the running semester's accepted programmes whose PI is outside the consortium,
// the access fee (raised here with raiseAccessFee, as the decisions step does; a no-op when that
// step already raised it). The first such programme's fee is paid (an invented card payment a few
// days ago, its receipt queued for the mail catcher); the second's waits on an open payment page
// (the fake keeps no state across restarts, so paying it opens a new page).
// Idempotent: a charge that is no longer "raised", or already had a payment page, is left alone.
import { Op, type Sequelize } from "sequelize";
import { writeAudit } from "~/lib/audit.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { raiseAccessFee } from "~/lib/payments/charges.server";
import { chargeReceiptMail, receiptPayloadOf } from "~/lib/payments/receipt.server";
import { Call, CallAllocation, type Charge, Proposal } from "~/models/index.server";
import { demoCallPlan } from "./20261201000100-demo-observatory";

const DAY = 86_400_000;

export async function up({ context: sequelize }: { context: Sequelize }) {
  const running = await Call.findOne({ where: { semesterCode: demoCallPlan(new Date()).running.semesterCode } });
  if (!running) return;
  const accepted = await Proposal.findAll({ where: { callId: running.id, status: "accepted", serial: { [Op.ne]: null } }, order: [["serial", "ASC"]] });
  const charges: { charge: Charge; proposal: Proposal }[] = [];
  for (const proposal of accepted) {
    const charge = await sequelize.transaction((transaction) => raiseAccessFee({ proposalId: proposal.id, transaction }));
    if (charge) charges.push({ charge, proposal });
    if (charges.length === 2) break;
  }
  const [paid, pending] = charges;
  const now = Date.now();
  // raised when the decisions went out: the allocation's lock (the seed's own time otherwise)
  const lock = await CallAllocation.findOne({ where: { callId: running.id } });
  const raisedAt = lock?.lockedAt && lock.lockedAt.getTime() < now - 4 * DAY ? lock.lockedAt : null;
  if (paid && paid.charge.state === "raised" && !paid.charge.checkoutSessionId) {
    await sequelize.transaction(async (transaction) => {
      if (raisedAt) await sequelize.query("UPDATE charges SET createdAt = ? WHERE id IN (?)", { replacements: [raisedAt, charges.map((c) => c.charge.id)], transaction });
      const sessionId = `cs_test_demo_${String(paid.charge.id).padStart(6, "0")}`;
      const eventId = `evt_demo_${String(paid.charge.id).padStart(6, "0")}`;
      await paid.charge.update({ state: "paid", checkoutSessionId: sessionId, checkoutExpiresAt: new Date(now - 3 * DAY + 3_600_000), paidAt: new Date(now - 3 * DAY + 600_000), paymentEventId: eventId }, { transaction });
      await writeAudit({ actorId: null, action: "charge.paid", entityType: "charge", entityId: paid.charge.id, proposalId: paid.proposal.id, details: { eventId, checkoutSessionId: sessionId, amountCents: paid.charge.amountCents, currency: paid.charge.currency, demo: true } }, transaction);
      const payload = await receiptPayloadOf({ charge: paid.charge, proposal: paid.proposal, transaction });
      const mail = chargeReceiptMail(payload, false);
      await enqueueMail({ to: payload.piEmail, subject: mail.subject, text: mail.text, html: mail.html, kind: "charge-receipt", payload: payload as unknown as Record<string, unknown> }, transaction);
    });
  }
  if (pending && pending.charge.state === "raised" && !pending.charge.checkoutSessionId) {
    await pending.charge.update({ state: "awaiting_payment", checkoutSessionId: `cs_test_demo_${String(pending.charge.id).padStart(6, "0")}`, checkoutExpiresAt: new Date(now + 23 * 3_600_000) });
  }
}

export async function down() {}
