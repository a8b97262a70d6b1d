// The chair's side of the review: starting it, the panel and deadline, the assignment (suggested,
// edited, committed), progress, reminders, reassignment and reopening. Every function is for a
// caller who holds the chair role (the routes check it first); every state change and its audit
// entry share one transaction.
import { Refusal } from "~/lib/forms";
import { Op, type Transaction } from "sequelize";
import type { SessionUser } from "~/lib/auth/auth.server";
import { writeAudit } from "~/lib/audit.server";
import { env } from "~/lib/env.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { plainMail } from "~/lib/mail/templates.server";
import { deadlinePassed } from "~/lib/call-phase";
import { closedCallsWhere } from "~/lib/call-phase.server";
import { Call, CallReview, Proposal, ReviewAssignment, ReviewPanelMember, RoleGrant, sequelize, User } from "~/models/index.server";
import { conflictReasonWithoutTeam, HIDDEN_TEAM, teamHidden } from "./anonymity.server";
import { chairConflicts, CONFLICT_WITHHELD, refuseConflicted } from "./chair-conflicts.server";
import { pairKey, type Conflict } from "./conflicts";
import { callFacts, type CallFacts } from "./facts.server";
import { suggestAssignments } from "./suggest";
import { CHAIR_REOPEN_DAYS, DEFAULT_PER_PROPOSAL, type ReviewStatus } from "./vocabulary";

export type Chair = Pick<SessionUser, "id" | "email" | "roles">;

/** No call has this id: a 404 refusal. */
export function callNotFound(): never {
  throw new Refusal("There is no call at this address.", { status: 404, field: "callId" });
}

export function reviewDeadlineText(at: Date | null) {
  return at ? `${at.toISOString().slice(0, 16).replace("T", " ")} UTC` : "not set yet";
}

async function factsOrNotFound(callId: number, transaction?: Transaction): Promise<CallFacts> {
  const facts = await callFacts({ callId, transaction });
  if (!facts) callNotFound();
  return facts;
}

/** Calls whose deadline has passed, newest first, with what their review has reached. */
export async function reviewCalls({ now = new Date() }: { now?: Date } = {}) {
  const calls = await Call.findAll({ where: closedCallsWhere(now), include: [{ model: CallReview, as: "review" }], order: [["deadlineAt", "DESC"]] });
  const counts = await Proposal.findAll({
    where: { callId: calls.map((c) => c.id) },
    attributes: ["callId", "status", [sequelize.fn("COUNT", sequelize.col("id")), "n"]],
    group: ["callId", "status"],
    raw: true,
  }) as unknown as { callId: number; status: string; n: number }[];
  return calls.map((c) => {
    const review = (c as Call & { review?: CallReview | null }).review ?? null;
    const of = (status: string) => Number(counts.find((x) => x.callId === c.id && x.status === status)?.n ?? 0);
    return {
      id: c.id,
      semesterCode: c.semesterCode,
      title: c.title,
      deadlineAt: c.deadlineAt.toISOString(),
      submitted: of("submitted"),
      inReview: of("in_review"),
      reviewDeadlineAt: review?.reviewDeadlineAt?.toISOString() ?? null,
      startedAt: review?.startedAt?.toISOString() ?? null,
      committedAt: review?.committedAt?.toISOString() ?? null,
    };
  });
}

/** Puts the call's submitted proposals in review (withdrawn and drafts stay out); returns how many moved. */
export async function startReview({ actor, callId, now = new Date() }: { actor: Chair; callId: number; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const call = await Call.findByPk(callId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!call) callNotFound();
    if (!deadlinePassed(call, now)) throw new Refusal(`The deadline of call ${call.semesterCode} has not passed yet; proposals can be put in review after it.`, { status: 409 });
    const [moved] = await Proposal.update({ status: "in_review" }, { where: { callId, status: "submitted" }, transaction });
    const [review] = await CallReview.findOrCreate({ where: { callId }, defaults: { callId, reviewDeadlineAt: null, perProposal: DEFAULT_PER_PROPOSAL }, transaction });
    if (!review.startedAt) await review.update({ startedAt: now }, { transaction });
    const panel = call.reviewMode === "distributed" ? await seatDesignatedReviewers({ callId, transaction }) : null;
    await writeAudit({ actorId: actor.id, action: "review.started", entityType: "call", entityId: callId, details: { semesterCode: call.semesterCode, moved, ...(panel ? { designatedReviewers: panel.length } : {}) } }, transaction);
    return { moved };
  });
}

/**
 * Distributed review: the panel is the reviewers the teams of the proposals in review designated
 * (they need no reviewer role; their desk access comes from their assignments). Adds the missing
 * ones; a reviewer no longer designated leaves the panel unless they hold assignments.
 */
export async function seatDesignatedReviewers({ callId, transaction }: { callId: number; transaction: Transaction }) {
  const proposals = await Proposal.findAll({ where: { callId, status: "in_review" }, attributes: ["id", "designatedReviewerId"], transaction });
  const wanted = [...new Set(proposals.map((p) => p.designatedReviewerId).filter((id): id is number => id !== null && id !== undefined))];
  const current = await ReviewPanelMember.findAll({ where: { callId }, transaction });
  for (const reviewerId of wanted) if (!current.some((m) => m.reviewerId === reviewerId)) await ReviewPanelMember.create({ callId, reviewerId }, { transaction });
  const leaving = current.filter((m) => !wanted.includes(m.reviewerId as number));
  for (const m of leaving) {
    if (await ReviewAssignment.count({ where: { callId, reviewerId: m.reviewerId, status: { [Op.ne]: "conflict" } }, transaction })) continue;
    await m.destroy({ transaction });
  }
  return wanted;
}

/** Review deadline, reviewers per proposal and the panel (users holding the reviewer role; a distributed call's are its designated reviewers). */
export async function saveReviewSetup({ actor, callId, reviewDeadlineAt, perProposal, panel }: { actor: Chair; callId: number; reviewDeadlineAt: Date; perProposal: number; panel: number[] }) {
  return sequelize.transaction(async (transaction) => {
    const call = await Call.findByPk(callId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!call) callNotFound();
    if (reviewDeadlineAt.getTime() <= call.deadlineAt.getTime()) throw new Refusal("The review deadline must come after the call's deadline.", { status: 400, field: "reviewDeadline" });
    if (call.reviewMode === "distributed") {
      const seated = await seatDesignatedReviewers({ callId, transaction });
      const [review] = await CallReview.findOrCreate({ where: { callId }, defaults: { callId, reviewDeadlineAt, perProposal }, transaction });
      const before = { reviewDeadlineAt: review.reviewDeadlineAt?.toISOString() ?? null };
      await review.update({ reviewDeadlineAt }, { transaction });
      await writeAudit({ actorId: actor.id, action: "review.setup_saved", entityType: "call", entityId: callId, details: { before, reviewDeadlineAt: reviewDeadlineAt.toISOString(), designatedReviewers: seated } }, transaction);
      return;
    }
    const wanted = [...new Set(panel)];
    const reviewers = await RoleGrant.findAll({ where: { role: "reviewer", userId: wanted }, transaction });
    if (reviewers.length !== wanted.length) throw new Refusal("Choose the panel among users holding the reviewer role.", { status: 400, field: "panel" });
    const current = await ReviewPanelMember.findAll({ where: { callId }, transaction });
    const leaving = current.filter((m) => !wanted.includes(m.reviewerId as number));
    if (leaving.length) {
      const busy = await ReviewAssignment.findAll({ where: { callId, reviewerId: leaving.map((m) => m.reviewerId as number), status: { [Op.ne]: "conflict" } }, include: [{ model: User, as: "reviewer" }], transaction });
      if (busy.length) {
        const names = [...new Set(busy.map((b) => b.reviewer?.name ?? b.reviewer?.email ?? `user ${b.reviewerId}`))];
        throw new Refusal(`${names.join(", ")} still ${names.length === 1 ? "has" : "have"} assignments in this call: remove or reassign them first.`, { status: 409, field: "panel" });
      }
      await ReviewPanelMember.destroy({ where: { id: leaving.map((m) => m.id) }, transaction });
    }
    for (const reviewerId of wanted) if (!current.some((m) => m.reviewerId === reviewerId)) await ReviewPanelMember.create({ callId, reviewerId }, { transaction });
    const [review] = await CallReview.findOrCreate({ where: { callId }, defaults: { callId, reviewDeadlineAt, perProposal }, transaction });
    const before = { reviewDeadlineAt: review.reviewDeadlineAt?.toISOString() ?? null, perProposal: review.perProposal };
    await review.update({ reviewDeadlineAt, perProposal }, { transaction });
    await writeAudit(
      { actorId: actor.id, action: "review.setup_saved", entityType: "call", entityId: callId, details: { before, reviewDeadlineAt: reviewDeadlineAt.toISOString(), perProposal, panel: wanted } },
      transaction,
    );
  });
}

/** Dual-anonymous before the reveal: the chair's pages show conflicts by their rule, without the team's names or institutions. */
const hidesTeam = (facts: CallFacts) => teamHidden(facts.call, facts.review, "chair");
const chairReason = (facts: CallFacts, c: Conflict) => (hidesTeam(facts) ? conflictReasonWithoutTeam(c) : c.reason);

const conflictList = (facts: CallFacts) => [...facts.conflicts.values()].map((c) => ({ proposalId: c.proposalId, reviewerId: c.reviewerId, rule: c.rule, reason: chairReason(facts, c) }));

function loadsOf(facts: CallFacts, assignments: { reviewerId: number; status: string }[]) {
  return facts.panel.map((r) => ({ reviewerId: r.reviewerId, count: assignments.filter((a) => a.reviewerId === r.reviewerId && a.status !== "conflict").length }));
}

/**
 * Everything the assignment matrix and the progress page show, as `viewer` (a chair) may read it:
 * on a proposal the viewer is conflicted on, no assignment, grade, comment or conflict (they would
 * name its reviewers), and `withheld` says why.
 */
export async function reviewBoard({ callId, viewer }: { callId: number; viewer: { id: number } }) {
  const facts = await factsOrNotFound(callId);
  const [rows, mine] = await Promise.all([ReviewAssignment.findAll({ where: { callId }, order: [["id", "ASC"]] }), chairConflicts({ callId, chair: viewer })]);
  const visible = (proposalId: number) => !mine.has(proposalId);
  const assignments = rows.filter((a) => visible(a.proposalId as number)).map((a) => ({
    assignmentId: a.id,
    proposalId: a.proposalId as number,
    reviewerId: a.reviewerId as number,
    status: a.status as ReviewStatus,
    committed: a.committedAt !== null,
    science: a.science,
    feasibility: a.feasibility,
    legacy: a.legacy,
    overall: a.overall,
    commentToPi: a.commentToPi,
    commentToCommittee: a.commentToCommittee,
    conflictReason: a.conflictReason,
    submittedAt: a.submittedAt?.toISOString() ?? null,
    reopenedUntil: a.reopenedUntil?.toISOString() ?? null,
  }));
  return {
    call: {
      id: facts.call.id,
      semesterCode: facts.call.semesterCode,
      title: facts.call.title,
      deadlineAt: facts.call.deadlineAt.toISOString(),
      deadlinePassed: deadlinePassed(facts.call),
      reviewMode: facts.call.reviewMode,
      reviewsPerSubmitter: facts.call.reviewsPerSubmitter,
      separateCompetitors: facts.call.separateCompetitors,
    },
    review: {
      reviewDeadlineAt: facts.review?.reviewDeadlineAt?.toISOString() ?? null,
      perProposal: facts.review?.perProposal ?? DEFAULT_PER_PROPOSAL,
      startedAt: facts.review?.startedAt?.toISOString() ?? null,
      committedAt: facts.review?.committedAt?.toISOString() ?? null,
    },
    panel: facts.panel.map(({ email: _e, ...r }) => r),
    proposals: (hidesTeam(facts) ? facts.proposals.map((p) => ({ ...p, piInstitution: HIDDEN_TEAM })) : facts.proposals).map((p) => ({
      ...p,
      withheld: visible(p.proposalId) ? null : CONFLICT_WITHHELD,
      conflictReason: mine.get(p.proposalId)?.reason ?? null,
    })),
    teamsHidden: hidesTeam(facts),
    assignments,
    conflicts: conflictList(facts).filter((c) => visible(c.proposalId)),
    loads: loadsOf(facts, assignments),
    submittedCount: await Proposal.count({ where: { callId, status: "submitted" } }),
  };
}

/** GET /api/v1/calls/:callId/review */
export async function reviewState({ callId, viewer }: { callId: number; viewer: { id: number } }) {
  const board = await reviewBoard({ callId, viewer });
  return {
    panel: board.panel.map((r) => ({ reviewerId: r.reviewerId, name: r.name, institution: r.institution, categories: r.categories })),
    proposals: board.proposals.map((p) => ({ proposalId: p.proposalId, code: p.code, category: p.category, withheld: p.withheld })),
    assignments: board.assignments.map((a) => ({ assignmentId: a.assignmentId, proposalId: a.proposalId, reviewerId: a.reviewerId, status: a.status })),
    conflicts: board.conflicts.map((c) => ({ proposalId: c.proposalId, reviewerId: c.reviewerId, reason: c.reason })),
    loads: board.loads,
  };
}

/**
 * The suggestion for the call's proposals in review and its panel; changes nothing. A distributed
 * call gives each designated reviewer the call's k proposals for each team that designated them
 * instead (`perProposal` is not used).
 */
export async function suggestForCall({ callId, perProposal, viewer }: { callId: number; perProposal: number; viewer: { id: number } }) {
  const [facts, mine] = await Promise.all([factsOrNotFound(callId), chairConflicts({ callId, chair: viewer })]);
  const distributed = facts.call.reviewMode === "distributed";
  const result = suggestAssignments({
    proposals: facts.proposals.map((p) => ({ proposalId: p.proposalId, category: p.category })),
    reviewers: facts.panel.map((r) => ({ reviewerId: r.reviewerId, categories: r.categories, ...(distributed ? { teams: r.teams ?? 1 } : {}) })),
    perProposal: distributed ? facts.panel.length : perProposal,
    perReviewer: distributed ? facts.call.reviewsPerSubmitter : undefined,
    isConflict: (p, r) => facts.conflicts.has(pairKey(p, r)),
  });
  // a proposal the viewer is conflicted on: its reviewers are not theirs to see (the loads count without it)
  const assignments = result.assignments.filter((a) => !mine.has(a.proposalId));
  return {
    assignments,
    loads: result.loads.map((l) => ({ ...l, count: assignments.filter((a) => a.reviewerId === l.reviewerId).length })),
    impossible: result.impossible.filter((x) => !mine.has(x.proposalId)),
    short: result.short,
    balanced: result.balanced,
    categoryMatches: result.categoryMatches,
    ...(distributed ? { perReviewer: facts.call.reviewsPerSubmitter } : {}),
  };
}

function describePair(facts: CallFacts, proposalId: number, reviewerId: number) {
  const p = facts.proposals.find((x) => x.proposalId === proposalId);
  const r = facts.panel.find((x) => x.reviewerId === reviewerId);
  return `${p?.code ?? `proposal ${proposalId}`} × ${r?.name ?? `user ${reviewerId}`}`;
}

/** A pair the chair may assign, or the refusal that says why not. */
function checkPair(facts: CallFacts, proposalId: number, reviewerId: number, field: string) {
  if (!facts.proposals.some((p) => p.proposalId === proposalId)) throw new Refusal(`Proposal ${proposalId} is not in review in call ${facts.call.semesterCode}.`, { status: 400, field: field });
  if (!facts.panel.some((r) => r.reviewerId === reviewerId)) throw new Refusal(`User ${reviewerId} is not on the panel of call ${facts.call.semesterCode}.`, { status: 400, field: field });
  const conflict = facts.conflicts.get(pairKey(proposalId, reviewerId));
  if (conflict) throw new Refusal(`${describePair(facts, proposalId, reviewerId)} is a conflict: the reviewer ${chairReason(facts, conflict)}.`, { status: 400, field: field });
}

function listMail({ reviewer, call, deadline, items }: { reviewer: { name: string | null; email: string }; call: Call; deadline: Date | null; items: { code: string | null; title: string }[] }) {
  return plainMail({
    subject: `Nightshare: your ${items.length} proposal${items.length === 1 ? "" : "s"} to review for ${call.semesterCode}`,
    paragraphs: [
      `Dear ${reviewer.name ?? reviewer.email},`,
      `The committee chair has assigned you these proposals of call ${call.semesterCode}:`,
      items.map((i) => `• ${i.code ?? "(no code)"} — ${i.title}`).join("\n"),
      `Please read each one, declare any conflict of interest you find, and submit your grades by ${reviewDeadlineText(deadline)}.`,
    ],
    button: { label: "Open your review desk", href: new URL("/review", env.APP_URL).toString() },
  });
}

/**
 * Replaces the call's assignments with `pairs` in one transaction: a conflicted pair, a proposal
 * not in review or a reviewer off the panel refuses the whole change. Pairs with a saved review
 * are kept unless listed… and cannot be dropped (their reviewer's work would be lost).
 * With `commit`, every assignment becomes visible to its reviewer and each reviewer whose list
 * changed is e-mailed the list and the review deadline.
 */
export async function replaceAssignments({ actor, callId, pairs, commit = false, now = new Date() }: { actor: Chair; callId: number; pairs: { proposalId: number; reviewerId: number }[]; commit?: boolean; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const review = await CallReview.findOne({ where: { callId }, transaction, lock: transaction.LOCK.UPDATE });
    const facts = await factsOrNotFound(callId, transaction);
    if (!review?.startedAt) throw new Refusal(`Put the proposals of ${facts.call.semesterCode} in review first.`, { status: 409 });
    // the reviewers of a proposal this chair is conflicted on are another chair's to choose (and stay as they are)
    const mine = await chairConflicts({ callId, chair: actor, transaction });
    refuseConflicted(mine, pairs.map((p) => p.proposalId), "assign its reviewers", (i) => `assignments.${i}`);
    const seen = new Set<string>();
    pairs.forEach((p, i) => {
      checkPair(facts, p.proposalId, p.reviewerId, `assignments.${i}`);
      const key = pairKey(p.proposalId, p.reviewerId);
      if (seen.has(key)) throw new Refusal(`${describePair(facts, p.proposalId, p.reviewerId)} is listed twice.`, { status: 400, field: `assignments.${i}` });
      seen.add(key);
    });
    const existing = await ReviewAssignment.findAll({ where: { callId }, transaction });
    const keep = new Set(existing.map((a) => pairKey(a.proposalId as number, a.reviewerId as number)));
    const dropped = existing.filter((a) => a.status !== "conflict" && !mine.has(a.proposalId as number) && !seen.has(pairKey(a.proposalId as number, a.reviewerId as number)));
    const worked = dropped.filter((a) => a.status === "draft" || a.status === "submitted");
    if (worked.length) {
      const a = worked[0];
      throw new Refusal(`${describePair(facts, a.proposalId as number, a.reviewerId as number)} has a ${a.status} review; it cannot be removed (the chair can reopen it instead).`, { status: 409, field: "assignments" });
    }
    const added = pairs.filter((p) => !keep.has(pairKey(p.proposalId, p.reviewerId)));
    if (dropped.length) await ReviewAssignment.destroy({ where: { id: dropped.map((a) => a.id) }, transaction });
    for (const p of added) await ReviewAssignment.create({ callId, proposalId: p.proposalId, reviewerId: p.reviewerId, committedAt: null }, { transaction });
    const changedReviewers = new Set<number>([...dropped.filter((a) => a.committedAt).map((a) => a.reviewerId as number)]);
    let mailed = 0;
    if (commit) {
      if (!review.reviewDeadlineAt) throw new Refusal("Set the review deadline before committing the assignment.", { status: 409 });
      const fresh = await ReviewAssignment.findAll({ where: { callId, committedAt: null, status: { [Op.ne]: "conflict" } }, transaction });
      for (const a of fresh) changedReviewers.add(a.reviewerId as number);
      await ReviewAssignment.update({ committedAt: now }, { where: { callId, committedAt: null }, transaction });
      await review.update({ committedAt: now }, { transaction });
      for (const reviewerId of changedReviewers) {
        const reviewer = await User.findByPk(reviewerId, { transaction });
        const mine = await ReviewAssignment.findAll({ where: { callId, reviewerId, status: { [Op.ne]: "conflict" } }, include: [{ model: Proposal, as: "proposal" }], transaction });
        if (!reviewer || mine.length === 0) continue;
        await enqueueMail({ to: reviewer.email, ...listMail({ reviewer, call: facts.call, deadline: review.reviewDeadlineAt, items: mine.map((a) => ({ code: a.proposal?.code ?? null, title: a.proposal?.title ?? "" })) }) }, transaction);
        await ReviewPanelMember.update({ listMailedAt: now }, { where: { callId, reviewerId }, transaction });
        mailed++;
      }
    }
    await writeAudit(
      {
        actorId: actor.id,
        action: commit ? "review.assignments_committed" : "review.assignments_saved",
        entityType: "call",
        entityId: callId,
        details: { pairs: pairs.length, added: added.length, removed: dropped.length, mailed },
      },
      transaction,
    );
    return { pairs: pairs.length, added: added.length, removed: dropped.length, mailed };
  });
}

async function assignmentOfCall(callId: number, assignmentId: number, transaction: Transaction) {
  const a = await ReviewAssignment.findOne({ where: { id: assignmentId, callId }, include: [{ model: User, as: "reviewer" }, { model: Proposal, as: "proposal" }], transaction, lock: transaction.LOCK.UPDATE });
  if (!a) throw new Refusal("There is no such assignment in this call.", { status: 400, field: "assignmentId" });
  return a;
}

/** Moves one pair to another reviewer (committed at once, the new reviewer is told). */
export async function reassign({ actor, callId, assignmentId, reviewerId, now = new Date() }: { actor: Chair; callId: number; assignmentId: number; reviewerId: number; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const a = await assignmentOfCall(callId, assignmentId, transaction);
    refuseConflicted(await chairConflicts({ callId, chair: actor, transaction }), [a.proposalId as number], "reassign its reviews", () => "assignmentId");
    if (a.status === "draft" || a.status === "submitted") throw new Refusal(`This review is ${a.status}; it cannot be moved to someone else.`, { status: 409, field: "reviewerId" });
    const facts = await factsOrNotFound(callId, transaction);
    checkPair(facts, a.proposalId as number, reviewerId, "reviewerId");
    if (await ReviewAssignment.findOne({ where: { proposalId: a.proposalId, reviewerId }, transaction })) throw new Refusal("That reviewer already has this proposal.", { status: 409, field: "reviewerId" });
    const review = await CallReview.findOne({ where: { callId }, transaction });
    if (a.status !== "conflict") await a.destroy({ transaction });
    const created = await ReviewAssignment.create({ callId, proposalId: a.proposalId as number, reviewerId, committedAt: review?.committedAt ? now : null }, { transaction });
    const reviewer = await User.findByPk(reviewerId, { transaction });
    if (review?.committedAt && reviewer) {
      await enqueueMail({ to: reviewer.email, ...listMail({ reviewer, call: facts.call, deadline: review.reviewDeadlineAt, items: [{ code: a.proposal?.code ?? null, title: a.proposal?.title ?? "" }] }) }, transaction);
    }
    await writeAudit(
      { actorId: actor.id, action: "review.reassigned", entityType: "review_assignment", entityId: created.id, proposalId: a.proposalId as number, details: { from: a.reviewerId, to: reviewerId, previousAssignmentId: a.id } },
      transaction,
    );
    return created;
  });
}

/** After the review deadline, the chair can reopen one review for a few days (audited; the reviewer is told). */
export async function chairReopenReview({ actor, callId, assignmentId, now = new Date() }: { actor: Chair; callId: number; assignmentId: number; now?: Date }) {
  return sequelize.transaction(async (transaction) => {
    const a = await assignmentOfCall(callId, assignmentId, transaction);
    refuseConflicted(await chairConflicts({ callId, chair: actor, transaction }), [a.proposalId as number], "reopen its reviews", () => "assignmentId");
    if (a.status === "conflict") throw new Refusal("The reviewer declared a conflict on this proposal; reassign it instead.", { status: 409, field: "assignmentId" });
    const until = new Date(now.getTime() + CHAIR_REOPEN_DAYS * 86_400_000);
    const from = a.status;
    await a.update({ reopenedUntil: until, status: a.status === "submitted" ? "draft" : a.status }, { transaction });
    if (a.reviewer) {
      await enqueueMail(
        {
          to: a.reviewer.email,
          ...plainMail({
            subject: `Nightshare: your review of ${a.proposal?.code ?? "a proposal"} is open again`,
            paragraphs: [`The committee chair reopened your review of ${a.proposal?.code ?? ""} — ${a.proposal?.title ?? ""}.`, `You can change and submit it until ${reviewDeadlineText(until)}.`],
            button: { label: "Open your review desk", href: new URL("/review", env.APP_URL).toString() },
          }),
        },
        transaction,
      );
    }
    await writeAudit({ actorId: actor.id, action: "review.reopened_by_chair", entityType: "review_assignment", entityId: a.id, proposalId: a.proposalId as number, details: { from, until: until.toISOString() } }, transaction);
  });
}

/** The outstanding (committed, not submitted) reviews of one reviewer in a call. */
export async function outstandingFor({ callId, reviewerId, transaction }: { callId: number; reviewerId: number; transaction?: Transaction }) {
  return ReviewAssignment.findAll({
    where: { callId, reviewerId, committedAt: { [Op.ne]: null }, status: { [Op.in]: ["assigned", "draft"] } },
    include: [{ model: Proposal, as: "proposal" }],
    transaction,
  });
}

export function reminderMail({ reviewer, call, deadline, items }: { reviewer: { name: string | null; email: string }; call: Call; deadline: Date | null; items: { code: string | null; title: string }[] }) {
  return plainMail({
    subject: `Nightshare: ${items.length} review${items.length === 1 ? "" : "s"} for ${call.semesterCode} still to submit`,
    paragraphs: [
      `Dear ${reviewer.name ?? reviewer.email},`,
      `These reviews of call ${call.semesterCode} are not submitted yet:`,
      items.map((i) => `• ${i.code ?? "(no code)"} — ${i.title}`).join("\n"),
      `The review deadline is ${reviewDeadlineText(deadline)}.`,
    ],
    button: { label: "Open your review desk", href: new URL("/review", env.APP_URL).toString() },
  });
}

/** The chair's reminder to one reviewer (any time; the automatic one is separate). */
export async function remindReviewer({ actor, callId, reviewerId }: { actor: Chair; callId: number; reviewerId: number }) {
  return sequelize.transaction(async (transaction) => {
    const call = await Call.findByPk(callId, { transaction });
    if (!call) callNotFound();
    const reviewer = await User.findByPk(reviewerId, { transaction });
    const items = reviewer ? await outstandingFor({ callId, reviewerId, transaction }) : [];
    if (!reviewer || items.length === 0) throw new Refusal("This reviewer has no outstanding review in this call.", { status: 409, field: "reviewerId" });
    const review = await CallReview.findOne({ where: { callId }, transaction });
    await enqueueMail({ to: reviewer.email, ...reminderMail({ reviewer, call, deadline: review?.reviewDeadlineAt ?? null, items: items.map((a) => ({ code: a.proposal?.code ?? null, title: a.proposal?.title ?? "" })) }) }, transaction);
    await writeAudit({ actorId: actor.id, action: "review.reminder_sent", entityType: "user", entityId: reviewerId, details: { callId, outstanding: items.length, by: "chair" } }, transaction);
    return { outstanding: items.length };
  });
}

/**
 * GET /api/v1/calls/:callId/reviews: every submitted review with its scores (the ranking board's
 * input), except on the proposals `viewer` is conflicted on: those are listed in `withheld`.
 */
export async function submittedReviews({ callId, viewer }: { callId: number; viewer: { id: number } }) {
  const call = await Call.findByPk(callId);
  if (!call) callNotFound();
  const [all, mine] = await Promise.all([ReviewAssignment.findAll({ where: { callId, status: "submitted" }, order: [["proposalId", "ASC"], ["reviewerId", "ASC"]] }), chairConflicts({ callId, chair: viewer })]);
  const rows = all.filter((a) => !mine.has(a.proposalId as number));
  const withheld = [...mine.values()].filter((c) => all.some((a) => a.proposalId === c.proposalId)).map((c) => ({ proposalId: c.proposalId, code: c.code, withheld: CONFLICT_WITHHELD }));
  const reviews = rows.map((a) => ({
    assignmentId: a.id,
    proposalId: a.proposalId as number,
    reviewerId: a.reviewerId as number,
    science: a.science,
    feasibility: a.feasibility,
    legacy: a.legacy,
    overall: a.overall,
    commentToPi: a.commentToPi,
    commentToCommittee: a.commentToCommittee,
    submittedAt: a.submittedAt?.toISOString() ?? null,
  }));
  return { reviews, withheld };
}

/** Whether this chair may read a proposal: anything past the draft stage (drafts and withdrawn ones stay private). */
export const CHAIR_READABLE = ["submitted", "in_review", "accepted", "waitlisted", "declined"] as const;

export async function chairsOf(transaction?: Transaction) {
  const grants = await RoleGrant.findAll({ where: { role: "chair" }, include: [{ model: User, as: "user" }], transaction });
  return grants.map((g) => (g as RoleGrant & { user?: User }).user).filter((u): u is User => Boolean(u));
}
