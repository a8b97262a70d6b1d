// The reviewer's side: their assignments, the read-only proposal, the grade, conflicts. A
// reviewer sees a proposal only through a committed assignment of theirs that is not conflicted
// (declared or found by the rules now); for anything else the proposal does not exist (404).
import { Refusal } from "~/lib/forms";
import { Op, type Transaction } from "sequelize";
import { requireRole, requireUser, type SessionUser } from "~/lib/auth/auth.server";
import { writeAudit } from "~/lib/audit.server";
import { env } from "~/lib/env.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { plainMail } from "~/lib/mail/templates.server";
import { notFound } from "~/lib/proposals/proposals.server";
import type { GradeValues } from "~/lib/schemas/review";
import { Call, CallReview, Proposal, ReviewAssignment, ReviewerProfile, sequelize } from "~/models/index.server";
import { chairsOf, reviewDeadlineText } from "./chair.server";
import { pairConflict } from "./facts.server";
import type { ReviewStatus } from "./vocabulary";

export type Reviewer = Pick<SessionUser, "id" | "email" | "roles">;

function isReviewer(user: Reviewer) {
  return user.roles.includes("reviewer");
}

/**
 * Whether this user reaches the desk for an assignment of this call: the reviewer role, or a
 * distributed call (its reviewers are the submitters, who need no role; the assignment is the access).
 */
function deskOpenFor(user: Reviewer, call: Pick<Call, "reviewMode">) {
  return isReviewer(user) || call.reviewMode === "distributed";
}

/** The desk's guard: the reviewer role, or a committed assignment in a distributed call; else the role's 403. */
export async function requireDeskUser(request: Request) {
  const user = await requireUser(request);
  if (isReviewer(user)) return user;
  const distributed = await ReviewAssignment.count({
    where: { reviewerId: user.id, committedAt: { [Op.ne]: null } },
    include: [{ model: Call, as: "call", where: { reviewMode: "distributed" }, required: true }],
  });
  if (distributed > 0) return user;
  return requireRole(request, "reviewer");
}

/** The last moment this review may change: the call's review deadline, or the chair's reopening. */
export function editableUntil(review: CallReview | null, a: Pick<ReviewAssignment, "reopenedUntil">): Date | null {
  const deadline = review?.reviewDeadlineAt ?? null;
  const reopened = a.reopenedUntil ?? null;
  if (!deadline) return reopened;
  if (!reopened) return deadline;
  return reopened > deadline ? reopened : deadline;
}

/** The reviewer's own assignment by id, or 404 (also after a declared conflict). */
async function myAssignment({ user, assignmentId, transaction, lock = false }: { user: Reviewer; assignmentId: number; transaction?: Transaction; lock?: boolean }) {
  if (!Number.isSafeInteger(assignmentId) || assignmentId <= 0) notFound();
  const a = await ReviewAssignment.findOne({
    where: { id: assignmentId, reviewerId: user.id, committedAt: { [Op.ne]: null }, status: { [Op.ne]: "conflict" } },
    transaction,
    lock: lock && transaction ? transaction.LOCK.UPDATE : undefined,
  });
  if (!a) notFound();
  const proposal = await Proposal.findByPk(a.proposalId as number, { transaction });
  if (!proposal || proposal.status === "withdrawn" || proposal.status === "draft") notFound();
  if (await pairConflict({ callId: a.callId as number, proposalId: proposal.id, reviewerId: user.id, transaction })) notFound();
  const [call, review] = await Promise.all([Call.findByPk(a.callId as number, { transaction }), CallReview.findOne({ where: { callId: a.callId }, transaction })]);
  if (!call || !deskOpenFor(user, call)) notFound();
  return { assignment: a, proposal, call, review };
}

/** The reviewer's assignment for a proposal (the desk's pages are addressed by proposal). */
export async function assignmentForProposal({ user, proposalId }: { user: Reviewer; proposalId: number }) {
  if (!Number.isSafeInteger(proposalId) || proposalId <= 0) notFound();
  const a = await ReviewAssignment.findOne({ where: { proposalId, reviewerId: user.id, committedAt: { [Op.ne]: null }, status: { [Op.ne]: "conflict" } } });
  if (!a) notFound();
  return myAssignment({ user, assignmentId: a.id });
}

export type DeskRow = {
  assignmentId: number;
  proposalId: number;
  code: string | null;
  title: string;
  category: string | null;
  status: ReviewStatus;
  semesterCode: string;
  reviewDeadlineAt: string | null;
  editableUntil: string | null;
};

/** The reviewer's committed assignments (conflicts declared stay listed, without a link). */
export async function listMyAssignments({ user }: { user: Reviewer }): Promise<DeskRow[]> {
  const rows = await ReviewAssignment.findAll({
    where: { reviewerId: user.id, committedAt: { [Op.ne]: null } },
    // without the reviewer role, only a distributed call's assignments reach the desk
    include: [{ model: Proposal, as: "proposal" }, { model: Call, as: "call", ...(isReviewer(user) ? {} : { where: { reviewMode: "distributed" }, required: true }) }],
    order: [["id", "ASC"]],
  });
  const reviews = await CallReview.findAll({ where: { callId: [...new Set(rows.map((r) => r.callId as number))] } });
  const out: DeskRow[] = [];
  for (const a of rows) {
    const p = a.proposal;
    if (!p || p.status === "withdrawn" || p.status === "draft") continue;
    // a pair that the rules now find conflicted is gone from the desk, like a declared one is unreachable
    if (a.status !== "conflict" && (await pairConflict({ callId: a.callId as number, proposalId: p.id, reviewerId: user.id }))) continue;
    const review = reviews.find((r) => r.callId === a.callId) ?? null;
    out.push({
      assignmentId: a.id,
      proposalId: p.id,
      code: p.code,
      title: p.title,
      category: p.scienceCategory,
      status: a.status,
      semesterCode: (a as ReviewAssignment & { call?: Call }).call?.semesterCode ?? "",
      reviewDeadlineAt: review?.reviewDeadlineAt?.toISOString() ?? null,
      editableUntil: editableUntil(review, a)?.toISOString() ?? null,
    });
  }
  return out;
}

export function gradeOf(a: ReviewAssignment) {
  return {
    science: a.science,
    feasibility: a.feasibility,
    legacy: a.legacy,
    overall: a.overall,
    commentToPi: a.commentToPi ?? "",
    commentToCommittee: a.commentToCommittee ?? "",
  };
}

/** What the desk's proposal page needs about the review itself. */
export async function reviewForProposal({ user, proposalId, now = new Date() }: { user: Reviewer; proposalId: number; now?: Date }) {
  const { assignment, proposal, call, review } = await assignmentForProposal({ user, proposalId });
  const until = editableUntil(review, assignment);
  return {
    assignmentId: assignment.id,
    status: assignment.status as ReviewStatus,
    grade: gradeOf(assignment),
    submittedAt: assignment.submittedAt?.toISOString() ?? null,
    reviewDeadlineAt: review?.reviewDeadlineAt?.toISOString() ?? null,
    editableUntil: until?.toISOString() ?? null,
    open: until !== null && now < until,
    proposal,
    call,
  };
}

function assertOpen(review: CallReview | null, a: ReviewAssignment, now: Date) {
  const until = editableUntil(review, a);
  if (!until) throw new Refusal("The chair has not set the review deadline yet.", { status: 409, field: "form" });
  if (now >= until) throw new Refusal(`The review deadline passed on ${reviewDeadlineText(until)}; only the chair can reopen this review.`, { status: 400, field: "form" });
}

/** Saves the grade as a draft, or submits it (the schema has checked the values). */
export async function saveGrade({ user, assignmentId, values, now = new Date() }: { user: Reviewer; assignmentId: number; values: GradeValues; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const { assignment: a, review } = await myAssignment({ user, assignmentId, transaction, lock: true });
    assertOpen(review, a, now);
    const from = a.status;
    const status: ReviewStatus = values.submit ? "submitted" : "draft";
    await a.update(
      {
        science: values.science,
        feasibility: values.feasibility,
        legacy: values.legacy,
        overall: values.overall,
        commentToPi: values.commentToPi,
        commentToCommittee: values.commentToCommittee || null,
        status,
        submittedAt: values.submit ? now : a.submittedAt,
      },
      { transaction },
    );
    await writeAudit(
      {
        actorId: user.id,
        action: values.submit ? "review.submitted" : "review.draft_saved",
        entityType: "review_assignment",
        entityId: a.id,
        proposalId: a.proposalId as number,
        details: { from, science: values.science, feasibility: values.feasibility, legacy: values.legacy, overall: values.overall },
      },
      transaction,
    );
    return { status, assignmentId: a.id };
  });
}

/** A submitted review back to draft, before the deadline. */
export async function reopenMyReview({ user, assignmentId, now = new Date() }: { user: Reviewer; assignmentId: number; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const { assignment: a, review } = await myAssignment({ user, assignmentId, transaction, lock: true });
    assertOpen(review, a, now);
    if (a.status !== "submitted") throw new Refusal("Only a submitted review can be reopened.", { status: 409, field: "form" });
    await a.update({ status: "draft" }, { transaction });
    await writeAudit({ actorId: user.id, action: "review.reopened", entityType: "review_assignment", entityId: a.id, proposalId: a.proposalId as number, details: {} }, transaction);
  });
}

/** Declares a conflict: the assignment is released, the chairs are told, the proposal disappears from the desk. */
export async function declareConflict({ user, assignmentId, reason }: { user: Reviewer; assignmentId: number; reason: string }) {
  return sequelize.transaction(async (transaction) => {
    const { assignment: a, proposal, call } = await myAssignment({ user, assignmentId, transaction, lock: true });
    const from = a.status;
    await a.update({ status: "conflict", conflictReason: reason }, { transaction });
    for (const chair of await chairsOf(transaction)) {
      await enqueueMail(
        {
          to: chair.email,
          ...plainMail({
            subject: `Nightshare: conflict declared on ${proposal.code ?? `proposal ${proposal.id}`} (${call.semesterCode})`,
            paragraphs: [
              `${user.email} declared a conflict of interest on ${proposal.code ?? ""} — ${proposal.title}.`,
              `Reason given: ${reason}`,
              "The assignment is released; assign another reviewer on the call's assignment page.",
            ],
            button: { label: "Open the assignments", href: new URL(`/committee/${call.id}/assignments`, env.APP_URL).toString() },
          }),
        },
        transaction,
      );
    }
    await writeAudit({ actorId: user.id, action: "review.conflict_declared", entityType: "review_assignment", entityId: a.id, proposalId: proposal.id, details: { from, reason } }, transaction);
  });
}

/** The categories the reviewer knows (their settings page). */
export async function myCategories({ user }: { user: Reviewer }) {
  const profile = await ReviewerProfile.findOne({ where: { userId: user.id } });
  return (profile?.categories ?? []) as string[];
}

export async function saveMyCategories({ user, categories }: { user: Reviewer; categories: string[] }) {
  return sequelize.transaction(async (transaction) => {
    const [profile, created] = await ReviewerProfile.findOrCreate({ where: { userId: user.id }, defaults: { userId: user.id, categories }, transaction });
    const before = created ? [] : profile.categories;
    if (!created) await profile.update({ categories }, { transaction });
    await writeAudit({ actorId: user.id, action: "reviewer.categories_saved", entityType: "user", entityId: user.id, details: { before, categories } }, transaction);
  });
}
