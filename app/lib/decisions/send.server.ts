// Sending a call's decisions. "Send all" takes each decided proposal whose letter is not sent and,
// in one transaction per proposal (its row locked): raises the access fee, writes the letter as
// filled from the office's template, queues it to the PI and every Co-I through the outgoing-mail
// queue, records `decisionSentAt` and the audit entry. A second "send all" finds nothing unsent
// and queues nothing; a single letter is re-sent only on purpose (audited). The batch's progress
// is the state of the mails it queued, so a mail-catcher outage shows as retrying, never as lost.
import { Refusal } from "~/lib/forms";
import { QueryTypes } from "sequelize";
import { writeAudit } from "~/lib/audit.server";
import { env } from "~/lib/env.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { raiseAccessFee } from "~/lib/payments/charges.server";
import { CallAllocation, DecisionBatch, DecisionLetter, DecisionMail, Proposal, ProposalMember, User, sequelize } from "~/models/index.server";
import type { Transaction } from "sequelize";
import { decidedProposals, lettersFacts, notLockedRefusal, requireLocked, templatesFor } from "./facts.server";
import { composeLetter } from "./template";
import type { BatchProgress, DecisionOutcome } from "./vocabulary";

type Actor = { id: number };

/** Addresses a letter goes to: the PI first, then the Co-Is (claimed accounts or invited addresses). */
async function recipients(proposal: Proposal, transaction: Transaction) {
  const members = await ProposalMember.findAll({ where: { proposalId: proposal.id }, include: [{ model: User, as: "user", attributes: ["email"] }], order: [["id", "ASC"]], transaction });
  const ordered = [...members.filter((m) => m.role === "pi"), ...members.filter((m) => m.role !== "pi")];
  const seen = new Set<string>();
  const out: string[] = [];
  for (const m of ordered) {
    const address = m.user?.email ?? m.email;
    if (!seen.has(address.toLowerCase())) {
      seen.add(address.toLowerCase());
      out.push(address);
    }
  }
  return out;
}

export function decisionPageUrl(proposalId: number) {
  return new URL(`/proposals/${proposalId}/decision`, env.APP_URL).toString();
}

/** The text that goes out if the PDF cannot be rendered when the worker sends: the letter and a link. */
function storedText(letter: { body: string; proposalId: number }) {
  return `${letter.body}\n\nThe letter as a PDF, the allocated hours and the comments are on the proposal's decision page: ${decisionPageUrl(letter.proposalId)}`;
}

async function queueLetter(letter: DecisionLetter, batchId: number, proposal: Proposal, transaction: Transaction) {
  const to = await recipients(proposal, transaction);
  for (const address of to) {
    const mail = await enqueueMail(
      { to: address, subject: letter.subject, text: storedText({ body: letter.body, proposalId: proposal.id }), kind: "decision-letter", payload: { letterId: letter.id } },
      transaction,
    );
    await DecisionMail.create({ batchId, letterId: letter.id, outgoingMailId: mail.id, toAddress: address }, { transaction });
  }
  return to.length;
}

/** Send all: queues every unsent letter of the call's locked allocation; `{ batch, letters }`. */
export async function sendDecisions({ actor, callId, now = new Date() }: { actor: Actor; callId: number; now?: Date }) {
  const { call } = await requireLocked({ callId });
  const unsent = (await decidedProposals({ callId })).filter((p) => !p.decisionSentAt);
  if (unsent.length === 0) {
    const last = await DecisionBatch.findOne({ where: { callId }, order: [["id", "DESC"]] });
    return { batch: last ? await batchProgress({ id: last.id }) : null, letters: 0, mails: 0 };
  }
  const batch = await DecisionBatch.create({ callId, kind: "all", createdById: actor.id });
  const templates = await templatesFor();
  let letters = 0;
  let mails = 0;
  try {
    for (const candidate of unsent) {
      const queued = await sequelize.transaction(async (transaction) => {
        const allocation = await CallAllocation.findOne({ where: { callId }, transaction, lock: transaction.LOCK.SHARE });
        if (!allocation?.lockedAt) throw notLockedRefusal(); // unlocked meanwhile: stop here, what was sent stays sent
        const proposal = await Proposal.findByPk(candidate.id, { transaction, lock: transaction.LOCK.UPDATE });
        if (!proposal || proposal.decisionSentAt || !["accepted", "waitlisted", "declined"].includes(proposal.status)) return null; // another "send all" got here first
        const charge = proposal.status === "accepted" ? await raiseAccessFee({ proposalId: proposal.id, transaction }) : null;
        const facts = (await lettersFacts({ call, proposals: [proposal], charges: new Map([[proposal.id, charge]]), now, transaction })).get(proposal.id)!;
        const outcome = proposal.status as DecisionOutcome;
        const text = composeLetter(templates[outcome], facts);
        const letter = await DecisionLetter.create(
          { proposalId: proposal.id, callId, batchId: batch.id, outcome, subject: text.subject, body: text.body, facts, chargeId: charge?.id ?? null, sentAt: now, sentById: actor.id },
          { transaction },
        );
        const count = await queueLetter(letter, batch.id, proposal, transaction);
        await proposal.update({ decisionSentAt: now }, { transaction });
        await writeAudit(
          {
            actorId: actor.id,
            action: "decision.sent",
            entityType: "proposal",
            entityId: proposal.id,
            proposalId: proposal.id,
            details: { outcome, batchId: batch.id, letterId: letter.id, recipients: count, chargeId: charge?.id ?? null, amountCents: charge?.amountCents ?? null },
          },
          transaction,
        );
        return count;
      });
      if (queued !== null) {
        letters += 1;
        mails += queued;
      }
    }
  } finally {
    await batch.update({ letters }); // also when a refusal stopped it half-way: what was queued stays queued
  }
  return { batch: await batchProgress({ id: batch.id }), letters, mails };
}

/** Sends one proposal's letter again, as it was sent (same text and facts), to its team of today; audited. */
export async function resendLetter({ actor, callId, proposalId, reason }: { actor: Actor; callId: number; proposalId: number; reason: string }) {
  await requireLocked({ callId });
  return sequelize.transaction(async (transaction) => {
    const proposal = await Proposal.findOne({ where: { id: proposalId, callId }, transaction, lock: transaction.LOCK.UPDATE });
    const letter = proposal ? await DecisionLetter.findOne({ where: { proposalId }, transaction }) : null;
    if (!proposal || !letter) throw new Refusal("This proposal's decision has not been sent yet; use Send all.", { status: 409, field: "proposalId" });
    const batch = await DecisionBatch.create({ callId, kind: "resend", createdById: actor.id, letters: 1 }, { transaction });
    const count = await queueLetter(letter, batch.id, proposal, transaction);
    await writeAudit(
      { actorId: actor.id, action: "decision.resent", entityType: "proposal", entityId: proposalId, proposalId, details: { batchId: batch.id, letterId: letter.id, recipients: count, reason } },
      transaction,
    );
    return { batchId: batch.id, mails: count };
  });
}

type MailRow = { status: "pending" | "sent" | "failed"; attempts: number; lastError: string | null };

export function progressOf(rows: MailRow[]) {
  const queued = rows.filter((r) => r.status === "pending" && r.attempts === 0).length;
  const retrying = rows.filter((r) => r.status === "pending" && r.attempts > 0).length;
  const sent = rows.filter((r) => r.status === "sent").length;
  const failed = rows.filter((r) => r.status === "failed").length;
  const total = rows.length;
  return { total, queued, retrying, sent, failed, done: queued + retrying === 0, percent: total === 0 ? 100 : Math.floor(((sent + failed) / total) * 100) };
}

export async function batchProgress({ id }: { id: number }): Promise<BatchProgress | null> {
  const batch = await DecisionBatch.findByPk(id);
  if (!batch) return null;
  const rows = await sequelize.query<MailRow>(
    "SELECT om.status, om.attempts, om.lastError FROM decision_mails dm JOIN outgoing_mail om ON om.id = dm.outgoingMailId WHERE dm.batchId = ? ORDER BY om.id",
    { replacements: [id], type: QueryTypes.SELECT },
  );
  const lastError =
    rows
      .filter((r) => r.status !== "sent" && r.lastError)
      .map((r) => r.lastError)
      .pop() ?? null;
  return { id: batch.id, callId: batch.callId as number, kind: batch.kind, letters: batch.letters, ...progressOf(rows), lastError, createdAt: batch.createdAt.toISOString() };
}

/** The latest state of each letter's mails (by letter id): what the office sees per proposal. */
export async function letterMailStates({ letterIds }: { letterIds: number[] }) {
  if (letterIds.length === 0) return new Map<number, ReturnType<typeof progressOf> & { lastSentAt: string | null; resends: number }>();
  const rows = await sequelize.query<MailRow & { letterId: number; batchId: number; sentAt: Date | null; kind: string }>(
    "SELECT dm.letterId, dm.batchId, db.kind, om.status, om.attempts, om.lastError, om.sentAt FROM decision_mails dm JOIN outgoing_mail om ON om.id = dm.outgoingMailId JOIN decision_batches db ON db.id = dm.batchId WHERE dm.letterId IN (?) ORDER BY dm.id",
    { replacements: [letterIds], type: QueryTypes.SELECT },
  );
  const out = new Map<number, ReturnType<typeof progressOf> & { lastSentAt: string | null; resends: number }>();
  for (const id of letterIds) {
    const mine = rows.filter((r) => r.letterId === id);
    const lastBatch = Math.max(0, ...mine.map((r) => r.batchId));
    const latest = mine.filter((r) => r.batchId === lastBatch);
    const sentTimes = mine.map((r) => (r.sentAt ? new Date(r.sentAt).getTime() : 0)).filter(Boolean);
    out.set(id, {
      ...progressOf(latest),
      lastSentAt: sentTimes.length ? new Date(Math.max(...sentTimes)).toISOString() : null,
      resends: new Set(mine.filter((r) => r.kind === "resend").map((r) => r.batchId)).size,
    });
  }
  return out;
}
