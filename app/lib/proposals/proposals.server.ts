// The PI's proposals: every function takes one typed object and is scoped by the caller. A user
// sees a proposal only through a membership (by user id, or by the invited address until sign-in
// claims it); for anyone else the proposal does not exist (404, never 403).
import { Refusal } from "~/lib/forms";
import { Op, QueryTypes, type Transaction } from "sequelize";
import type { SessionUser } from "~/lib/auth/auth.server";
import { callPhase, deadlinePassed } from "~/lib/call-phase";
import { normaliseEmail } from "~/lib/email";
import { openCallsWhere } from "~/lib/call-phase.server";
import { writeAudit } from "~/lib/audit.server";
import { env } from "~/lib/env.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { plainMail } from "~/lib/mail/templates.server";
import type { ProposalStatus } from "~/lib/domain";
import { upcomingSemesters } from "~/lib/semesters";
import type { z } from "zod";
import type { newProposalSchema, overviewSchema } from "~/lib/schemas/proposals";
import { AuditEntry, Call, Proposal, ProposalMember, sequelize, User } from "~/models/index.server";
import type { MemberRole } from "~/models/ProposalMember";

export type Actor = Pick<SessionUser, "id" | "email">;

/** What anyone off a proposal's team is told: it does not exist for them. */
export const NO_PROPOSAL = "There is no proposal at this address, or you are not on its team.";

/** The proposal (or the reviewer's assignment of it) is not this user's: a 404 refusal. */
export function notFound(field = "proposalId"): never {
  throw new Refusal(NO_PROPOSAL, { status: 404, field });
}

/** Where-clause of the memberships that are this user's (claimed, or invited by address and not yet claimed). */
export function membershipWhere(user: Actor) {
  return { [Op.or]: [{ userId: user.id }, { userId: null, email: normaliseEmail(user.email) }] };
}

/** Invitations to this address become the user's: called at sign-in, never by a loader. */
export async function claimInvitations({ user }: { user: Actor }) {
  const [claimed] = await ProposalMember.update(
    { userId: user.id, acceptedAt: new Date() },
    { where: { userId: null, email: normaliseEmail(user.email) } },
  );
  return claimed;
}

export type Access = { proposal: Proposal; call: Call; membership: ProposalMember; role: MemberRole; isPi: boolean; editable: boolean };

/**
 * The proposal if the user is on its team, else a 404. With `transaction` + `lock`, the
 * proposal row is locked FOR UPDATE for the rest of the transaction.
 */
export async function getProposalForUser({
  proposalId,
  user,
  transaction,
  lock = false,
}: {
  proposalId: number;
  user: Actor;
  transaction?: Transaction;
  lock?: boolean;
}): Promise<Access> {
  if (!Number.isSafeInteger(proposalId) || proposalId <= 0) notFound();
  const membership = await ProposalMember.findOne({ where: { proposalId, ...membershipWhere(user) }, transaction });
  if (!membership) notFound();
  // a locking read locks the proposal's row only; otherwise its call comes in the same statement
  const locking = lock && transaction;
  const proposal = await Proposal.findByPk(proposalId, locking ? { transaction, lock: transaction.LOCK.UPDATE } : { transaction, include: [{ model: Call, as: "call" }] });
  if (!proposal) notFound();
  const call = locking ? await Call.findByPk(proposal.callId, { transaction }) : proposal.call;
  if (!call) notFound();
  return { proposal, call, membership, role: membership.role, isPi: membership.role === "pi", editable: proposal.status === "draft" };
}

/** Throws unless the proposal is a draft (submitted proposals are read-only). */
export function assertEditable(access: Access) {
  if (!access.editable) {
    throw new Refusal(`This proposal is ${access.proposal.status === "in_review" ? "in review" : access.proposal.status}, so it is read-only.${
        access.proposal.status === "submitted" ? " The PI can withdraw it before the deadline and reopen it as a draft to change it." : access.proposal.status === "withdrawn" ? " The PI can reopen it as a draft before the deadline." : ""
      }`, { status: 409 });
  }
}

export function assertPi(access: Access, what: string) {
  if (!access.isPi) throw new Refusal(`Only the PI can ${what}.`, { status: 403 });
}

export type ProposalSummary = {
  id: number;
  code: string | null;
  title: string;
  status: ProposalStatus;
  role: MemberRole;
  callId: number;
  semesterCode: string;
  deadlineAt: string;
  lastChangeAt: string;
  targets: number;
  observations: number;
};

export async function listProposalsForUser({ user }: { user: Actor }): Promise<ProposalSummary[]> {
  const memberships = await ProposalMember.findAll({
    where: membershipWhere(user),
    include: [{ model: Proposal, as: "proposal", include: [{ model: Call, as: "call" }] }],
  });
  const ids = memberships.map((m) => m.proposalId);
  if (ids.length === 0) return [];
  const counts = await sequelize.query<{ proposalId: number; targets: number; observations: number; lastAudit: Date | null }>(
    `SELECT p.id AS proposalId,
            (SELECT COUNT(*) FROM targets t WHERE t.proposalId = p.id) AS targets,
            (SELECT COUNT(*) FROM observations o WHERE o.proposalId = p.id) AS observations,
            (SELECT MAX(a.createdAt) FROM audit_log a WHERE a.proposalId = p.id) AS lastAudit
       FROM proposals p WHERE p.id IN (:ids)`,
    { type: QueryTypes.SELECT, replacements: { ids } },
  );
  const byId = new Map(counts.map((c) => [Number(c.proposalId), c]));
  return memberships
    .filter((m) => m.proposal)
    .map((m) => {
      const p = m.proposal!;
      const c = byId.get(p.id);
      const last = [p.updatedAt, c?.lastAudit ? new Date(c.lastAudit) : null].filter(Boolean) as Date[];
      return {
        id: p.id,
        code: p.code,
        title: p.title,
        status: p.status,
        role: m.role,
        callId: p.callId,
        semesterCode: p.call!.semesterCode,
        deadlineAt: p.call!.deadlineAt.toISOString(),
        lastChangeAt: new Date(Math.max(...last.map((d) => d.getTime()))).toISOString(),
        targets: Number(c?.targets ?? 0),
        observations: Number(c?.observations ?? 0),
      };
    })
    .sort((a, b) => b.lastChangeAt.localeCompare(a.lastChangeAt));
}

export async function openCalls({ now = new Date() }: { now?: Date } = {}) {
  const calls = await Call.findAll({ where: openCallsWhere(now), order: [["deadlineAt", "ASC"]] });
  return calls.map((c) => ({ id: c.id, semesterCode: c.semesterCode, title: c.title, deadlineAt: c.deadlineAt.toISOString(), pageLimit: c.pageLimit }));
}

export async function createProposal({ user, ...input }: { user: Actor } & z.output<typeof newProposalSchema>) {
  return sequelize.transaction(async (transaction) => {
    const call = await Call.findByPk(input.callId, { transaction });
    if (!call) throw new Refusal("Choose one of the open calls.", { status: 400, field: "callId" });
    if (callPhase(call) !== "open") {
      throw new Refusal(deadlinePassed(call) ? `The deadline of call ${call.semesterCode} has passed.` : `Call ${call.semesterCode} opens on ${call.opensAt.toISOString().slice(0, 10)}.`, { status: 400, field: "callId" });
    }
    const proposal = await Proposal.create(
      { callId: call.id, title: input.title, abstract: input.abstract ?? "", scienceCategory: null, semestersRequested: [call.semesterCode], createdById: user.id },
      { transaction },
    );
    await ProposalMember.create({ proposalId: proposal.id, userId: user.id, email: normaliseEmail(user.email), role: "pi", acceptedAt: new Date() }, { transaction });
    await writeAudit(
      { actorId: user.id, action: "proposal.created", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { callId: call.id, semesterCode: call.semesterCode, title: input.title } },
      transaction,
    );
    return proposal;
  });
}

export type OverviewValues = {
  title: string;
  abstract: string;
  scienceCategory: string | null;
  isMultiSemester: boolean;
  semestersRequested: string[];
  isTargetOfOpportunity: boolean;
};

export function overviewValues(p: Proposal): OverviewValues {
  return {
    title: p.title,
    abstract: p.abstract,
    scienceCategory: p.scienceCategory,
    isMultiSemester: p.isMultiSemester,
    semestersRequested: p.semestersRequested ?? [],
    isTargetOfOpportunity: p.isTargetOfOpportunity,
  };
}

export type OverviewResult =
  | { ok: true; version: number }
  | {
      ok: false;
      conflict: { mine: OverviewValues; saved: OverviewValues; savedVersion: number; savedBy: string | null; savedAt: string };
    };

/**
 * Saves the overview if nobody saved since the form was loaded (`version`); otherwise returns
 * both the user's values and the saved ones, so that nothing is lost and the user chooses.
 */
export async function updateOverview({ user, proposalId, version, ...input }: { user: Actor; proposalId: number } & z.output<typeof overviewSchema>): Promise<OverviewResult> {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertEditable(access);
    const { proposal, call } = access;
    const allowed = upcomingSemesters(call.semesterCode);
    const semesters = input.isMultiSemester ? allowed.filter((s) => input.semestersRequested.includes(s)) : [call.semesterCode];
    const strange = input.semestersRequested.filter((s) => !allowed.includes(s));
    if (input.isMultiSemester && strange.length) throw new Refusal(`Choose among ${allowed.join(", ")}.`, { status: 400, field: "semestersRequested" });
    if (input.isMultiSemester && !semesters.includes(call.semesterCode)) {
      throw new Refusal(`The programme must include the call's own semester, ${call.semesterCode}.`, { status: 400, field: "semestersRequested" });
    }
    const mine: OverviewValues = { ...input, semestersRequested: semesters };
    if (proposal.version !== version) {
      const last = await AuditEntry.findOne({
        where: { proposalId, action: { [Op.in]: ["proposal.overview_updated", "proposal.created"] } },
        order: [["id", "DESC"]],
        include: [{ model: User, as: "actor" }],
        transaction,
      });
      return {
        ok: false as const,
        conflict: {
          mine,
          saved: overviewValues(proposal),
          savedVersion: proposal.version,
          savedBy: last?.actor ? (last.actor.name ?? last.actor.email) : null,
          savedAt: (last?.createdAt ?? proposal.updatedAt).toISOString(),
        },
      };
    }
    const before = overviewValues(proposal);
    const changed = (Object.keys(mine) as (keyof OverviewValues)[]).filter((k) => JSON.stringify(before[k]) !== JSON.stringify(mine[k]));
    proposal.set(mine);
    await proposal.save({ transaction });
    await writeAudit(
      {
        actorId: user.id,
        action: "proposal.overview_updated",
        entityType: "proposal",
        entityId: proposalId,
        proposalId,
        details: { changed, version: proposal.version, ...(changed.includes("title") ? { title: mine.title } : {}) },
      },
      transaction,
    );
    return { ok: true as const, version: proposal.version };
  });
}

export async function withdrawProposal({ user, proposalId }: { user: Actor; proposalId: number }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertPi(access, "withdraw the proposal");
    const { proposal, call } = access;
    if (!["draft", "submitted"].includes(proposal.status)) throw new Refusal(`A proposal that is ${proposal.status.replace("_", " ")} cannot be withdrawn here.`, { status: 409 });
    if (deadlinePassed(call)) throw new Refusal(`The deadline of call ${call.semesterCode} has passed; write to the observatory office to withdraw.`, { status: 409 });
    const from = proposal.status;
    proposal.status = "withdrawn";
    await proposal.save({ transaction });
    // The whole team hears of it, in the same transaction (through the mail queue).
    const members = await ProposalMember.findAll({ where: { proposalId }, order: [["id", "ASC"]], transaction });
    const by = await User.findByPk(user.id, { transaction });
    const name = proposal.code ? `${proposal.code}, "${proposal.title}"` : `"${proposal.title}"`;
    const mail = plainMail({
      subject: `Nightshare: ${proposal.code ?? "the draft"} "${proposal.title}" was withdrawn`,
      paragraphs: [
        `${by?.name ? `${by.name} (${by.email})` : user.email}, the PI, withdrew the proposal ${name} from call ${call.semesterCode} on ${new Date().toISOString().slice(0, 16).replace("T", " ")} UTC.`,
        `The committee will not read it. Until the deadline, ${call.deadlineAt.toISOString().slice(0, 16).replace("T", " ")} UTC, the PI can reopen it as a draft${proposal.code ? ` (it keeps the code ${proposal.code})` : ""} and submit it again.`,
      ],
      button: { label: "Open the proposal", href: new URL(`/proposals/${proposalId}`, env.APP_URL).toString() },
    });
    for (const m of members) await enqueueMail({ to: m.email, ...mail }, transaction);
    await writeAudit(
      { actorId: user.id, action: "proposal.withdrawn", entityType: "proposal", entityId: proposalId, proposalId, details: { from, code: proposal.code, told: members.map((m) => m.email) } },
      transaction,
    );
    return proposal;
  });
}

export async function reopenProposal({ user, proposalId }: { user: Actor; proposalId: number }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertPi(access, "reopen the proposal");
    const { proposal, call } = access;
    if (proposal.status !== "withdrawn") throw new Refusal("Only a withdrawn proposal can be reopened.", { status: 409 });
    if (deadlinePassed(call)) throw new Refusal(`The deadline of call ${call.semesterCode} has passed, so the proposal cannot be reopened.`, { status: 409 });
    proposal.status = "draft";
    await proposal.save({ transaction });
    await writeAudit({ actorId: user.id, action: "proposal.reopened", entityType: "proposal", entityId: proposalId, proposalId, details: { code: proposal.code } }, transaction);
    return proposal;
  });
}

/**
 * The PI deletes a draft that was never submitted (no code), with everything in it. The audit
 * entry outlives the proposal: it keeps the title and the team, without the proposal id (the
 * proposal's own change log goes with it).
 */
export async function deleteDraft({ user, proposalId }: { user: Actor; proposalId: number }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertPi(access, "delete the draft");
    const { proposal, call } = access;
    if (!["draft", "withdrawn"].includes(proposal.status)) throw new Refusal(`A proposal that is ${proposal.status.replace("_", " ")} cannot be deleted.`, { status: 409 });
    if (proposal.code) {
      throw new Refusal(`This proposal was submitted once as ${proposal.code}, so it stays on record; withdraw it instead.`, { status: 409 });
    }
    const members = await ProposalMember.findAll({ where: { proposalId }, order: [["id", "ASC"]], transaction });
    await proposal.destroy({ transaction });
    await writeAudit(
      {
        actorId: user.id,
        action: "proposal.deleted",
        entityType: "proposal",
        entityId: proposalId,
        proposalId: null,
        details: { title: proposal.title, callId: call.id, semesterCode: call.semesterCode, status: proposal.status, team: members.map((m) => m.email) },
      },
      transaction,
    );
    return { title: proposal.title };
  });
}

export type HistoryEntry = { id: number; at: string; actor: string | null; action: string; entityType: string; entityId: number | null; details: Record<string, unknown> | null };

export async function proposalHistory({ user, proposalId }: { user: Actor; proposalId: number }): Promise<HistoryEntry[]> {
  await getProposalForUser({ proposalId, user });
  const entries = await AuditEntry.findAll({ where: { proposalId }, order: [["id", "DESC"]], include: [{ model: User, as: "actor" }], limit: 1000 });
  return entries.map((e) => ({
    id: e.id,
    at: e.createdAt.toISOString(),
    actor: e.actor ? (e.actor.name ?? e.actor.email) : null,
    action: e.action,
    entityType: e.entityType,
    entityId: e.entityId,
    details: e.details,
  }));
}

/** What the workspace layout shows on every tab. */
export function workspaceHeader(access: Access) {
  const { proposal, call } = access;
  return {
    id: proposal.id,
    code: proposal.code,
    title: proposal.title,
    status: proposal.status,
    version: proposal.version,
    role: access.role,
    isPi: access.isPi,
    editable: access.editable,
    call: { id: call.id, semesterCode: call.semesterCode, deadlineAt: call.deadlineAt.toISOString(), pageLimit: call.pageLimit, deadlinePassed: deadlinePassed(call) },
  };
}
export type WorkspaceHeader = ReturnType<typeof workspaceHeader>;
