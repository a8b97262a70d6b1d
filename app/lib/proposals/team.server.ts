// The team of a proposal: Co-Is invited by address (mailed through the queue), removed, and the
// PI role handed over. An invitation to an existing account is theirs at once; one to a new address
// is claimed when the invitee signs in with it (never by a read).
import { Refusal } from "~/lib/forms";
import { writeAudit } from "~/lib/audit.server";
import { normaliseEmail } from "~/lib/email";
import { env } from "~/lib/env.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { plainMail } from "~/lib/mail/templates.server";
import { ProposalMember, sequelize, User } from "~/models/index.server";
import { assertEditable, assertPi, getProposalForUser, type Actor } from "./proposals.server";

export const MAX_TEAM_SIZE = 60;

export type TeamMember = {
  id: number;
  email: string;
  name: string | null;
  institution: string | null;
  role: "pi" | "coi";
  joined: boolean;
  /** invited by an address that already has an account (name and institution come from it) */
  hasAccount: boolean;
  isYou: boolean;
  /** the member's account, once they have signed in */
  userId: number | null;
};

export async function listTeam({ user, proposalId }: { user: Actor; proposalId: number }): Promise<TeamMember[]> {
  await getProposalForUser({ proposalId, user });
  return teamRows({ user, proposalId });
}

/** The team of a proposal whose access the caller has already checked. */
export async function teamRows({ user, proposalId }: { user: Actor; proposalId: number }): Promise<TeamMember[]> {
  const members = await ProposalMember.findAll({ where: { proposalId }, include: [{ model: User, as: "user" }], order: [["role", "DESC"], ["id", "ASC"]] });
  // An invited address that already has an account shows that account's name at once.
  const pending = members.filter((m) => m.userId === null).map((m) => m.email);
  const accounts = new Map(pending.length ? (await User.findAll({ where: { email: pending } })).map((u) => [u.email.toLowerCase(), u]) : []);
  return members.map((m) => {
    const account = m.user ?? accounts.get(m.email.toLowerCase()) ?? null;
    return {
      id: m.id,
      email: m.email,
      name: account?.name ?? null,
      institution: account?.institution ?? null,
      role: m.role,
      joined: m.userId !== null,
      hasAccount: account !== null,
      isYou: m.userId === user.id,
      userId: (m.userId as number | null) ?? null,
    };
  });
}

export async function inviteCoI({ user, proposalId, email }: { user: Actor; proposalId: number; email: string }) {
  const address = normaliseEmail(email);
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertEditable(access);
    const existing = await ProposalMember.findOne({ where: { proposalId, email: address }, transaction });
    if (existing) throw new Refusal(`${address} is already on the team.`, { status: 400, field: "email" });
    if ((await ProposalMember.count({ where: { proposalId }, transaction })) >= MAX_TEAM_SIZE) {
      throw new Refusal(`A team has at most ${MAX_TEAM_SIZE} members.`, { status: 400, field: "email" });
    }
    const account = await User.findOne({ where: { email: address }, transaction });
    const member = await ProposalMember.create(
      { proposalId, userId: account?.id ?? null, email: address, role: "coi", acceptedAt: account ? new Date() : null },
      { transaction },
    );
    const inviter = await User.findByPk(user.id, { transaction });
    const who = inviter?.name ? `${inviter.name} (${inviter.email})` : user.email;
    const link = new URL(`/proposals/${proposalId}`, env.APP_URL).toString();
    const mail = plainMail({
      subject: `Nightshare: you are invited as Co-I on "${access.proposal.title}"`,
      paragraphs: [
        `${who} has added you as a co-investigator (Co-I) on the proposal "${access.proposal.title}" for call ${access.call.semesterCode}.`,
        `Sign in to Nightshare with this address (${address}) and the proposal appears under My proposals; you can edit it while it is a draft. Only the PI submits or withdraws it.`,
        `The deadline is ${access.call.deadlineAt.toISOString().slice(0, 16).replace("T", " ")} UTC.`,
      ],
      button: { label: "Open the proposal", href: link },
    });
    await enqueueMail({ to: address, ...mail }, transaction);
    await writeAudit({ actorId: user.id, action: "member.invited", entityType: "proposal_member", entityId: member.id, proposalId, details: { email: address, role: "coi", name: account?.name ?? null } }, transaction);
    return { member, name: account?.name ?? null, institution: account?.institution ?? null };
  });
}

export async function removeMember({ user, proposalId, memberId }: { user: Actor; proposalId: number; memberId: number }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertEditable(access);
    const member = await ProposalMember.findOne({ where: { id: memberId, proposalId }, transaction });
    if (!member) throw new Refusal("That person is not on this team (any more).", { status: 400, field: "memberId" });
    if (member.role === "pi") throw new Refusal("The PI cannot be removed; hand the PI role to a Co-I first.", { status: 409, field: "memberId" });
    const self = member.id === access.membership.id;
    if (!self) assertPi(access, "remove other members");
    await member.destroy({ transaction });
    // the team's reviewer for a distributed call must be on the team: leaving clears the choice
    if (member.userId !== null && access.proposal.designatedReviewerId === member.userId) await access.proposal.update({ designatedReviewerId: null }, { transaction });
    await writeAudit(
      { actorId: user.id, action: self ? "member.left" : "member.removed", entityType: "proposal_member", entityId: memberId, proposalId, details: { email: member.email } },
      transaction,
    );
    return { self };
  });
}

export async function handOverPi({ user, proposalId, memberId }: { user: Actor; proposalId: number; memberId: number }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertPi(access, "hand over the PI role");
    assertEditable(access);
    const member = await ProposalMember.findOne({ where: { id: memberId, proposalId }, transaction });
    if (!member || member.role !== "coi") throw new Refusal("Choose a Co-I of this proposal.", { status: 400, field: "memberId" });
    if (member.userId === null) {
      throw new Refusal(`${member.email} has not signed in yet; the PI role can go to them once they have.`, { status: 409, field: "memberId" });
    }
    await access.membership.update({ role: "coi" }, { transaction });
    await member.update({ role: "pi" }, { transaction });
    await writeAudit(
      { actorId: user.id, action: "member.pi_handed_over", entityType: "proposal_member", entityId: member.id, proposalId, details: { from: access.membership.email, to: member.email } },
      transaction,
    );
  });
}

/**
 * Distributed review: the PI names the team member (the PI or a Co-I who has signed in) who will
 * review for the team. Only while the proposal is a draft; the submission checks it again.
 */
export async function designateReviewer({ user, proposalId, memberId }: { user: Actor; proposalId: number; memberId: number }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertPi(access, "choose the team's reviewer");
    assertEditable(access);
    if (access.call.reviewMode !== "distributed") throw new Refusal(`Call ${access.call.semesterCode} is reviewed by the committee's panel; the team names no reviewer.`, { status: 409, field: "memberId" });
    const member = await ProposalMember.findOne({ where: { id: memberId, proposalId }, transaction });
    if (!member) throw new Refusal("That person is not on this team (any more).", { status: 400, field: "memberId" });
    if (member.userId === null) throw new Refusal(`${member.email} has not signed in yet; choose someone who has, or wait until they have.`, { status: 409, field: "memberId" });
    const before = access.proposal.designatedReviewerId ?? null;
    await access.proposal.update({ designatedReviewerId: member.userId as number }, { transaction });
    await writeAudit({ actorId: user.id, action: "proposal.reviewer_designated", entityType: "proposal", entityId: proposalId, proposalId, details: { before, after: member.userId, email: member.email } }, transaction);
    return { email: member.email };
  });
}

/** The designated reviewer's check (checklist and submission): a member of the team with an account. */
export async function designatedReviewerProblem({ proposal, transaction }: { proposal: { id: number; designatedReviewerId?: number | null }; transaction?: import("sequelize").Transaction }): Promise<string | null> {
  if (!proposal.designatedReviewerId) return "No reviewer chosen yet: the PI names the team's reviewer (the PI or a Co-I) on the Team tab.";
  const member = await ProposalMember.findOne({ where: { proposalId: proposal.id, userId: proposal.designatedReviewerId }, include: [{ model: User, as: "user" }], transaction });
  if (!member) return "The chosen reviewer is no longer on the team; choose another on the Team tab.";
  return null;
}

export async function designatedReviewerName({ proposal }: { proposal: { id: number; designatedReviewerId?: number | null } }) {
  if (!proposal.designatedReviewerId) return null;
  const u = await User.findByPk(proposal.designatedReviewerId);
  return u ? (u.name ?? u.email) : null;
}
