// Submission: a checklist computed on the server, then one transaction that gives the code
// (`014/27A`: the serial per call, given under a lock on the call's row, then the short semester), the state and the
// audit entry and the receipt to the PI and every Co-I (queued in that same transaction; the mail
// worker builds the proposal PDF when it sends, see proposal-receipt.server.ts).
import { Refusal } from "~/lib/forms";
import { QueryTypes, type Transaction } from "sequelize";
import { writeAudit } from "~/lib/audit.server";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { buildProposalPdf } from "~/lib/proposals/pdf.server";
import { receiptMail, type ReceiptPayload } from "~/lib/proposals/receipt.server";
import { ABSTRACT_WORD_LIMIT, codeForFileName, proposalCode, scienceCategoryLabel, wordCount } from "~/lib/proposals/vocabulary";
import { designatedReviewerName, designatedReviewerProblem } from "~/lib/proposals/team.server";
import { selfReferenceCheck } from "~/lib/review/self-reference.server";
import { latestScienceCase } from "~/lib/proposals/science-case.server";
import { Observation, ProposalMember, sequelize, Target } from "~/models/index.server";
import { deadlinePassed } from "~/lib/call-phase";
import { assertPi, getProposalForUser, type Access, type Actor } from "./proposals.server";

export type ChecklistItem = { key: string; label: string; ok: boolean; detail: string; href?: string };

export { proposalCode };

export async function submissionChecklist({ user, proposalId, access: given }: { user: Actor; proposalId: number; access?: Access }) {
  const access = given ?? (await getProposalForUser({ proposalId, user }));
  const { proposal, call } = access;
  const base = `/proposals/${proposalId}`;
  const items: ChecklistItem[] = [];

  const words = wordCount(proposal.abstract);
  const overviewGaps = [
    proposal.title.trim().length < 5 ? "a title" : null,
    words === 0 ? "an abstract" : words > ABSTRACT_WORD_LIMIT ? `an abstract within ${ABSTRACT_WORD_LIMIT} words (it has ${words})` : null,
    !scienceCategoryLabel(proposal.scienceCategory) ? "a science category" : null,
    proposal.isMultiSemester && (proposal.semestersRequested ?? []).length < 2 ? "the semesters of the multi-semester programme" : null,
  ].filter(Boolean);
  items.push({
    key: "overview",
    label: "Summary complete",
    ok: overviewGaps.length === 0,
    detail: overviewGaps.length ? `Missing: ${overviewGaps.join(", ")}.` : `${words} words in the abstract; ${scienceCategoryLabel(proposal.scienceCategory)}.`,
    href: base,
  });

  const targets = await Target.findAll({ where: { proposalId }, attributes: ["id", "name"] });
  items.push({ key: "targets", label: "At least one target", ok: targets.length > 0, detail: targets.length ? `${targets.length} target${targets.length === 1 ? "" : "s"}.` : "No target yet.", href: `${base}/targets` });

  const observed = new Set((await Observation.findAll({ where: { proposalId }, attributes: ["targetId"] })).map((o) => o.targetId));
  const without = targets.filter((t) => !observed.has(t.id));
  items.push({
    key: "observations",
    label: "At least one observation per target",
    ok: targets.length > 0 && without.length === 0,
    detail:
      targets.length === 0
        ? "Add targets first."
        : without.length
          ? `No observation yet for ${without.slice(0, 5).map((t) => t.name).join(", ")}${without.length > 5 ? ` and ${without.length - 5} more` : ""}.`
          : "Every target has an observation.",
    href: `${base}/observations`,
  });

  let requestedHours: number | null = null;
  let requestedHoursBySemester: { semesterCode: string; hours: number; callSemester: boolean }[] = [];
  try {
    const sheet = await computeFeasibilitySheet({ proposalId });
    requestedHours = sheet.requestedHours;
    requestedHoursBySemester = sheet.requestedHoursBySemester;
    const blocking = sheet.problems.filter((p) => p.severity === "blocking");
    const warnings = sheet.problems.length - blocking.length;
    items.push({
      key: "feasibility",
      label: "Feasibility sheet without blocking errors",
      ok: blocking.length === 0,
      detail: blocking.length
        ? `${blocking.length} blocking: ${blocking.slice(0, 3).map((p) => p.message).join(" · ")}${blocking.length > 3 ? " …" : ""}`
        : `${sheet.requestedHoursThisSemester.toFixed(1)} h requested in ${call.semesterCode}${sheet.requestedHours > sheet.requestedHoursThisSemester ? ` and ${(sheet.requestedHours - sheet.requestedHoursThisSemester).toFixed(1)} h in later semesters` : ""}${warnings ? `; ${warnings} warning${warnings === 1 ? "" : "s"} to read` : ""}.`,
      href: `${base}/feasibility`,
    });
  } catch (error) {
    console.error("feasibility sheet failed", error);
    items.push({ key: "feasibility", label: "Feasibility sheet without blocking errors", ok: false, detail: "The feasibility sheet could not be computed; open it to see why.", href: `${base}/feasibility` });
  }

  const scienceCase = await latestScienceCase({ proposalId });
  items.push({
    key: "scienceCase",
    label: `Science case uploaded, at most ${call.pageLimit} pages`,
    ok: Boolean(scienceCase && scienceCase.pageCount <= call.pageLimit),
    detail: !scienceCase
      ? "No science case uploaded yet."
      : scienceCase.pageCount > call.pageLimit
        ? `${scienceCase.filename} has ${scienceCase.pageCount} pages; the limit is ${call.pageLimit}.`
        : `${scienceCase.filename}, ${scienceCase.pageCount} page${scienceCase.pageCount === 1 ? "" : "s"}.`,
    href: `${base}/science-case`,
  });

  if (call.reviewMode === "distributed") {
    const problem = await designatedReviewerProblem({ proposal });
    const name = problem ? null : await designatedReviewerName({ proposal });
    items.push({
      key: "reviewer",
      label: "The team's reviewer chosen",
      ok: problem === null,
      detail: problem ?? `${name} reviews ${call.reviewsPerSubmitter} proposals of ${call.semesterCode} for the team.`,
      href: `${base}/team`,
    });
  }

  const late = deadlinePassed(call);
  items.push({
    key: "deadline",
    label: "Before the deadline",
    ok: !late,
    detail: `${late ? "The deadline passed on" : "Deadline"} ${call.deadlineAt.toISOString().slice(0, 16).replace("T", " ")} UTC.`,
  });

  const ready = proposal.status === "draft" && items.every((i) => i.ok);
  // dual-anonymous calls: where the science case names the team (warnings; they never block)
  const selfReference = scienceCase ? await selfReferenceCheck({ proposalId, call }) : null;
  return { items, ready, requestedHours, requestedHoursBySemester, selfReference, access };
}

export async function submitProposal({ user, proposalId }: { user: Actor; proposalId: number }) {
  const { items, access } = await submissionChecklist({ user, proposalId });
  assertPi(access, "submit the proposal");
  if (access.proposal.status !== "draft") throw new Refusal(`The proposal is already ${access.proposal.status.replace("_", " ")}.`, { status: 409 });
  const missing = items.filter((i) => !i.ok);
  if (missing.length) {
    throw new Refusal(`Not submitted: ${missing.map((i) => `${i.label.toLowerCase()} (${i.detail.replace(/\.$/, "")})`).join("; ")}.`, { status: 409 });
  }

  const submitted = await sequelize.transaction(async (transaction) => {
    // The call's row lock serialises code assignment within a call; the unique (callId, serial) index backs it up.
    await sequelize.query("SELECT id FROM calls WHERE id = :callId FOR UPDATE", { replacements: { callId: access.call.id }, type: QueryTypes.SELECT, transaction });
    const again = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertPi(again, "submit the proposal");
    const { proposal, call } = again;
    if (proposal.status !== "draft") throw new Refusal(`The proposal is already ${proposal.status.replace("_", " ")}.`, { status: 409 });
    if (deadlinePassed(call)) throw new Refusal(`The deadline of call ${call.semesterCode} has passed.`, { status: 409 });
    if (call.reviewMode === "distributed") {
      const problem = await designatedReviewerProblem({ proposal, transaction });
      if (problem) throw new Refusal(`Not submitted: ${problem}`, { status: 409 });
    }
    const keptCode = proposal.code !== null;
    if (!keptCode) {
      const [row] = await sequelize.query<{ maxSerial: number | null }>("SELECT MAX(serial) AS maxSerial FROM proposals WHERE callId = :callId", {
        replacements: { callId: call.id },
        type: QueryTypes.SELECT,
        transaction,
      });
      const serial = Number(row?.maxSerial ?? 0) + 1;
      proposal.serial = serial;
      proposal.code = proposalCode(call.semesterCode, serial);
    }
    proposal.status = "submitted";
    proposal.submittedAt = new Date();
    await proposal.save({ transaction });
    await writeAudit(
      { actorId: user.id, action: "proposal.submitted", entityType: "proposal", entityId: proposalId, proposalId, details: { code: proposal.code, keptCode } },
      transaction,
    );
    const recipients = await queueReceipt({ user, proposalId, code: proposal.code!, title: proposal.title, semesterCode: call.semesterCode, deadlineAt: call.deadlineAt, submittedAt: proposal.submittedAt }, transaction);
    return { code: proposal.code!, title: proposal.title, semesterCode: call.semesterCode, deadlineAt: call.deadlineAt, submittedAt: proposal.submittedAt, recipients };
  });

  // pdfAttached: the worker attaches the PDF when it sends (a link instead if the PDF fails).
  return { ...submitted, pdfAttached: true };
}

/**
 * The receipt is queued in the submission's transaction, so a crash leaves both or neither. It
 * is a mail row the worker renders when it sends: the PDF then shows the committed submission.
 */
async function queueReceipt(
  { user, proposalId, code, title, semesterCode, deadlineAt, submittedAt }: { user: Actor; proposalId: number; code: string; title: string; semesterCode: string; deadlineAt: Date; submittedAt: Date | null },
  transaction: Transaction,
) {
  const members = await ProposalMember.findAll({ where: { proposalId }, transaction });
  const payload: ReceiptPayload = { proposalId, code, title, semesterCode, deadlineAt: deadlineAt.toISOString(), submittedAt: submittedAt?.toISOString() ?? null };
  const fallback = receiptMail(payload, false);
  for (const m of members) await enqueueMail({ to: m.email, ...fallback, kind: "proposal-receipt", payload }, transaction);
  await writeAudit(
    { actorId: user.id, action: "proposal.receipt_queued", entityType: "proposal", entityId: proposalId, proposalId, details: { to: members.map((m) => m.email), pdf: "built when sent" } },
    transaction,
  );
  return members.map((m) => m.email);
}

export async function proposalPdfForUser({ user, proposalId }: { user: Actor; proposalId: number }) {
  const { proposal } = await getProposalForUser({ proposalId, user });
  const bytes = await buildProposalPdf({ proposalId });
  return { bytes, filename: `${proposal.code ? codeForFileName(proposal.code) : `nightshare-draft-${proposal.id}`}.pdf` };
}

