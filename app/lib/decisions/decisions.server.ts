// Reading decisions: the office's list for a call (outcome, preview, sending state), the PI's
// view of their own proposal's decision, and the templates the office edits.
import { Refusal } from "~/lib/forms";
import { writeAudit } from "~/lib/audit.server";
import { getProposalForUser, type Actor } from "~/lib/proposals/proposals.server";
import { DecisionBatch, DecisionLetter, DecisionTemplate, sequelize } from "~/models/index.server";
import { decidedProposals, lettersFacts, lockedCall, templatesFor } from "./facts.server";
import { batchProgress, letterMailStates } from "./send.server";
import { composeLetter, templateProblems } from "./template";
import type { DecisionOutcome, LetterFacts } from "./vocabulary";

export type DecisionRow = {
  proposalId: number;
  code: string;
  title: string;
  outcome: DecisionOutcome;
  facts: LetterFacts;
  letter: { subject: string; body: string };
  sent: null | { sentAt: string; total: number; queued: number; sent: number; failed: number; retrying: number; lastSentAt: string | null; resends: number };
};

/** The office's decisions of a call; `locked: false` (and no rows) until the allocation is locked. */
export async function callDecisions({ callId }: { callId: number }) {
  const { call, lockedAt } = await lockedCall({ callId });
  const base = { call: { id: call.id, semesterCode: call.semesterCode, title: call.title }, lockedAt: lockedAt?.toISOString() ?? null };
  if (!lockedAt) return { ...base, locked: false as const, rows: [] as DecisionRow[], latestBatch: null };
  const proposals = await decidedProposals({ callId });
  const [facts, templates, letters, last] = await Promise.all([
    lettersFacts({ call, proposals }),
    templatesFor(),
    DecisionLetter.findAll({ where: { callId } }),
    DecisionBatch.findOne({ where: { callId }, order: [["id", "DESC"]] }),
  ]);
  const states = await letterMailStates({ letterIds: letters.map((l) => l.id) });
  const rows: DecisionRow[] = proposals.map((p) => {
    const letter = letters.find((l) => l.proposalId === p.id);
    const f = letter ? letter.facts : facts.get(p.id)!;
    const state = letter ? states.get(letter.id) : undefined;
    return {
      proposalId: p.id,
      code: f.code,
      title: p.title,
      outcome: letter?.outcome ?? (p.status as DecisionOutcome),
      facts: f,
      letter: letter ? { subject: letter.subject, body: letter.body } : composeLetter(templates[p.status as DecisionOutcome], f),
      sent: letter && state ? { sentAt: letter.sentAt.toISOString(), ...state } : letter ? { sentAt: letter.sentAt.toISOString(), total: 0, queued: 0, sent: 0, failed: 0, retrying: 0, lastSentAt: null, resends: 0 } : null,
    };
  });
  return { ...base, locked: true as const, rows, latestBatch: last ? await batchProgress({ id: last.id }) : null };
}

/** The decision as the team sees it (PI and Co-Is), or null before the letter is sent. */
export async function decisionForUser({ user, proposalId }: { user: Actor; proposalId: number }) {
  const access = await getProposalForUser({ proposalId, user });
  const letter = await DecisionLetter.findOne({ where: { proposalId } });
  if (!letter) return { access, letter: null };
  return { access, letter: { subject: letter.subject, body: letter.body, facts: letter.facts, sentAt: letter.sentAt.toISOString(), outcome: letter.outcome } };
}

export async function letterRowForUser({ user, proposalId }: { user: Actor; proposalId: number }) {
  await getProposalForUser({ proposalId, user });
  return DecisionLetter.findOne({ where: { proposalId } });
}

/** Saves the office's template for an outcome; refused (400, naming the placeholder) when it has problems. */
export async function saveTemplate({ actor, outcome, subject, body }: { actor: { id: number }; outcome: DecisionOutcome; subject: string; body: string }) {
  for (const [field, text] of [["subject", subject], ["body", body]] as const) {
    const problems = templateProblems(text);
    if (problems.length) throw new Refusal(problems.join(" "), { status: 400, field: field });
  }
  return sequelize.transaction(async (transaction) => {
    const existing = await DecisionTemplate.findOne({ where: { outcome }, transaction, lock: transaction.LOCK.UPDATE });
    if (existing) await existing.update({ subject, body, updatedById: actor.id }, { transaction });
    else await DecisionTemplate.create({ outcome, subject, body, updatedById: actor.id }, { transaction });
    await writeAudit({ actorId: actor.id, action: "decision.template_saved", entityType: "decision_template", details: { outcome } }, transaction);
    return { outcome };
  });
}
