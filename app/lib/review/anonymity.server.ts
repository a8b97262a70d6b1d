// Dual-anonymous review (a call option): the reviewers of such a call never see the team's names,
// institutions or e-mails; the chair sees them only after every grade is in and the teams are
// revealed (audited). The conflict rules keep reading the real team on the server (facts.server.ts);
// only what is shown is cut here.
import { Refusal } from "~/lib/forms";
import { PDFDict, PDFDocument, PDFName } from "pdf-lib";
import type { Transaction } from "sequelize";
import type { SessionUser } from "~/lib/auth/auth.server";
import { writeAudit } from "~/lib/audit.server";
import { HIDDEN_TEAM } from "~/lib/domain";
import { Call, CallReview, ReviewAssignment, sequelize } from "~/models/index.server";
import { callNotFound } from "./chair.server";
import type { Conflict } from "./conflicts";

export { HIDDEN_TEAM };

type CallLike = Pick<Call, "teamVisibility">;
type ReviewLike = Pick<CallReview, "teamsRevealedAt"> | null | undefined;

/** Whether `as` may not see this call's teams: reviewers of a dual-anonymous call never; its chair until the reveal. */
export function teamHidden(call: CallLike, review: ReviewLike, as: "chair" | "reviewer"): boolean {
  if (call.teamVisibility !== "dual_anonymous") return false;
  return as === "reviewer" || !review?.teamsRevealedAt;
}

/** For the committee pages and exports of a call: is the team hidden from its chair now? */
export async function teamsHiddenFromChair(callId: number, transaction?: Transaction): Promise<boolean> {
  const call = await Call.findByPk(callId, { attributes: ["id", "teamVisibility"], transaction });
  if (!call || call.teamVisibility !== "dual_anonymous") return false;
  const review = await CallReview.findOne({ where: { callId }, attributes: ["id", "teamsRevealedAt"], transaction });
  return !review?.teamsRevealedAt;
}

/** The ranking board's rows (and its CSV) without the PI's institution until the reveal. */
export async function blankTeamsUntilRevealed<R extends { piInstitution: string | null }>(callId: number, rows: R[]): Promise<R[]> {
  if (await teamsHiddenFromChair(callId)) for (const row of rows) row.piInstitution = HIDDEN_TEAM;
  return rows;
}

/** A conflict's reason as the chair may read it before the reveal: the rule, without names or institutions. */
export function conflictReasonWithoutTeam(c: Pick<Conflict, "rule" | "reason">): string {
  switch (c.rule) {
    case "team":
      return "is a team member";
    case "institution":
      return "shares an institution with a team member";
    case "competitor":
      return "is on the team of a competing proposal in the same category";
    default:
      return c.reason; // the reviewer's own words
  }
}

export type TeamRevealState = {
  dualAnonymous: boolean;
  revealedAt: string | null;
  /** submitted grades / assignments that need one (committed, not conflicted) */
  submitted: number;
  expected: number;
  canReveal: boolean;
};

async function gradesOf(callId: number, transaction?: Transaction) {
  const rows = await ReviewAssignment.findAll({ where: { callId }, attributes: ["id", "status", "committedAt"], transaction });
  const expected = rows.filter((a) => a.status !== "conflict" && a.committedAt !== null);
  return { expected: expected.length, submitted: expected.filter((a) => a.status === "submitted").length, uncommitted: rows.filter((a) => a.status !== "conflict" && a.committedAt === null).length };
}

export async function teamRevealState({ callId }: { callId: number }): Promise<TeamRevealState> {
  const call = await Call.findByPk(callId, { attributes: ["id", "teamVisibility"] });
  if (!call) callNotFound();
  const review = await CallReview.findOne({ where: { callId } });
  const grades = await gradesOf(callId);
  const dualAnonymous = call.teamVisibility === "dual_anonymous";
  const revealedAt = review?.teamsRevealedAt?.toISOString() ?? null;
  return { dualAnonymous, revealedAt, submitted: grades.submitted, expected: grades.expected, canReveal: dualAnonymous && !revealedAt && grades.expected > 0 && grades.submitted === grades.expected && grades.uncommitted === 0 };
}

/** The chair reveals a dual-anonymous call's teams: only once every assigned grade is submitted (409 otherwise); audited. */
export async function revealTeams({ actor, callId, now = new Date() }: { actor: Pick<SessionUser, "id">; callId: number; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const call = await Call.findByPk(callId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!call) callNotFound();
    if (call.teamVisibility !== "dual_anonymous") throw new Refusal(`Call ${call.semesterCode} is not dual-anonymous: its teams are not hidden.`, { status: 409, field: "form" });
    const review = await CallReview.findOne({ where: { callId }, transaction, lock: transaction.LOCK.UPDATE });
    if (review?.teamsRevealedAt) return { revealedAt: review.teamsRevealedAt.toISOString(), already: true };
    const grades = await gradesOf(callId, transaction);
    if (!review?.committedAt || grades.expected === 0) throw new Refusal(`The teams of ${call.semesterCode} can be revealed once the assignment is committed and every grade is in.`, { status: 409, field: "form" });
    if (grades.uncommitted > 0 || grades.submitted < grades.expected) {
      const missing = grades.expected - grades.submitted + grades.uncommitted;
      throw new Refusal(`${missing} of ${grades.expected + grades.uncommitted} grades are not in yet: the teams of ${call.semesterCode} stay hidden until every review is submitted.`, { status: 409, field: "form" });
    }
    await review.update({ teamsRevealedAt: now }, { transaction });
    await writeAudit({ actorId: actor.id, action: "review.teams_revealed", entityType: "call", entityId: callId, details: { semesterCode: call.semesterCode, grades: grades.submitted } }, transaction);
    return { revealedAt: now.toISOString(), already: false };
  });
}

/**
 * The science case as a reviewer of a dual-anonymous call gets it: the same pages, without the
 * document information (Author, Creator …) and the XMP metadata, where word processors put the
 * writer's name. What the pages say is the PI's to check (the warnings before the deadline).
 */
export async function withoutAuthorship(bytes: Uint8Array): Promise<Uint8Array> {
  const doc = await PDFDocument.load(bytes, { updateMetadata: false });
  const info = doc.context.trailerInfo.Info;
  if (info) {
    const dict = doc.context.lookup(info);
    if (dict instanceof PDFDict) for (const key of dict.keys()) dict.delete(key);
  }
  doc.catalog.delete(PDFName.of("Metadata"));
  return doc.save({ useObjectStreams: false });
}
