// What the review rules need from the database: a call's panel, its proposals and their teams,
// and the conflicts between them. No access checks here: the callers scope by the user's rights.
import { Op, type Transaction } from "sequelize";
import { Call, CallReview, Proposal, ProposalMember, ReviewAssignment, ReviewerProfile, ReviewPanelMember, RoleGrant, User } from "~/models/index.server";
import { computeFeasibilitySheets } from "~/lib/proposals/feasibility.server";
import { sameEmail } from "~/lib/email";
import { detectConflicts, pairKey, type Competition, type Conflict, type ProposalFacts } from "./conflicts";

/** Proposals that take part in a call's review (submitted ones before the chair starts it). */
export const REVIEWED_STATUSES = ["in_review"] as const;
/** Proposals whose teams count as competitors in the same call. */
const COMPETING_STATUSES = ["submitted", "in_review", "accepted", "waitlisted", "declined"] as const;

export type PanelReviewer = {
  reviewerId: number;
  name: string;
  email: string;
  institution: string | null;
  categories: string[];
  /** distributed review: how many teams of the proposals in review designated this reviewer */
  teams?: number;
};

export async function categoriesOf(userIds: number[], transaction?: Transaction) {
  const profiles = userIds.length ? await ReviewerProfile.findAll({ where: { userId: userIds }, transaction }) : [];
  return new Map(profiles.map((p) => [p.userId as number, (p.categories ?? []) as string[]]));
}

export async function panelOf({ callId, transaction }: { callId: number; transaction?: Transaction }): Promise<PanelReviewer[]> {
  const members = await ReviewPanelMember.findAll({ where: { callId }, include: [{ model: User, as: "reviewer" }], order: [["id", "ASC"]], transaction });
  const cats = await categoriesOf(members.map((m) => m.reviewerId as number), transaction);
  return members
    .filter((m) => m.reviewer)
    .map((m) => ({
      reviewerId: m.reviewerId as number,
      name: m.reviewer!.name ?? m.reviewer!.email,
      email: m.reviewer!.email,
      institution: m.reviewer!.institution,
      categories: cats.get(m.reviewerId as number) ?? [],
    }));
}

/** Everyone holding the reviewer role (the chair picks the panel among them). */
export async function reviewerCandidates(): Promise<PanelReviewer[]> {
  const grants = await RoleGrant.findAll({ where: { role: "reviewer" }, include: [{ model: User, as: "user" }] });
  const cats = await categoriesOf(grants.map((g) => g.userId as number));
  return grants
    .filter((g) => (g as RoleGrant & { user?: User }).user)
    .map((g) => {
      const u = (g as RoleGrant & { user: User }).user;
      return { reviewerId: u.id, name: u.name ?? u.email, email: u.email, institution: u.institution, categories: cats.get(u.id) ?? [] };
    })
    .sort((a, b) => a.name.localeCompare(b.name));
}

export type ReviewedProposal = { proposalId: number; code: string | null; serial: number | null; title: string; category: string | null; piInstitution: string | null; status: string };

async function teams(proposalIds: number[], transaction?: Transaction) {
  const members = proposalIds.length ? await ProposalMember.findAll({ where: { proposalId: proposalIds }, include: [{ model: User, as: "user" }], transaction }) : [];
  const byProposal = new Map<number, ProposalFacts["team"]>();
  const pis = new Map<number, string | null>();
  for (const m of members) {
    const list = byProposal.get(m.proposalId as number) ?? [];
    list.push({ userId: (m.userId as number | null) ?? null, email: m.email, institution: m.user?.institution ?? null, name: m.user?.name ?? null });
    byProposal.set(m.proposalId as number, list);
    if (m.role === "pi") pis.set(m.proposalId as number, m.user?.institution ?? null);
  }
  return { byProposal, pis };
}

/** How a call's review treats competitors: the panel's category rule, or the distributed call's own choice. */
export function competitionOf(call: Pick<Call, "reviewMode" | "separateCompetitors">): Competition {
  if (call.reviewMode !== "distributed") return "category";
  return call.separateCompetitors ? "requests" : "none";
}

/**
 * The telescope × moon cells of the call's semester in which each proposal requests hours (its
 * feasibility sheet's totals, as the ranking board reads them). A sheet that fails counts as no request.
 */
export async function requestedCells({ call, proposalIds }: { call: Call; proposalIds: number[] }): Promise<Map<number, string[]>> {
  const out = new Map<number, string[]>();
  if (proposalIds.length === 0) return out;
  const sheets = await computeFeasibilitySheets({ proposalIds, calls: [call] });
  for (const id of proposalIds) {
    const sheet = sheets.get(id);
    if (!sheet || sheet instanceof Error) {
      if (sheet) console.error(`feasibility sheet of proposal ${id} failed`, sheet);
      out.set(id, []);
      continue;
    }
    out.set(id, [...new Set(sheet.totals.filter((t) => t.semesterCode === call.semesterCode && t.hours > 0).map((t) => `${t.telescopeId}|${t.moonCategory}`))]);
  }
  return out;
}

export type CallFacts = {
  call: Call;
  review: CallReview | null;
  panel: PanelReviewer[];
  proposals: ReviewedProposal[];
  conflicts: Map<string, Conflict>;
};

/** The call's panel, the proposals in review, and every conflict between them with its reason. */
export async function callFacts({ callId, transaction, statuses = REVIEWED_STATUSES }: { callId: number; transaction?: Transaction; statuses?: readonly string[] }): Promise<CallFacts | null> {
  const call = await Call.findByPk(callId, { transaction });
  if (!call) return null;
  const [review, panel, competing, declared] = await Promise.all([
    CallReview.findOne({ where: { callId }, transaction }),
    panelOf({ callId, transaction }),
    Proposal.findAll({ where: { callId, status: { [Op.in]: [...COMPETING_STATUSES] } }, order: [["serial", "ASC"], ["id", "ASC"]], transaction }),
    ReviewAssignment.findAll({ where: { callId, status: "conflict" }, transaction }),
  ]);
  const { byProposal, pis } = await teams(competing.map((p) => p.id), transaction);
  const competition = competitionOf(call);
  const cells = competition === "requests" ? await requestedCells({ call, proposalIds: competing.map((p) => p.id) }) : new Map<number, string[]>();
  const facts: ProposalFacts[] = competing.map((p) => ({ proposalId: p.id, code: p.code, category: p.scienceCategory, team: byProposal.get(p.id) ?? [], requests: cells.get(p.id) }));
  const reviewed = competing.filter((p) => statuses.includes(p.status));
  if (call.reviewMode === "distributed") {
    // a submitter knows the category of the proposals they are on the team of
    for (const r of panel) {
      const own = competing.filter((p) => p.scienceCategory && (byProposal.get(p.id) ?? []).some((m) => m.userId === r.reviewerId)).map((p) => p.scienceCategory as string);
      r.categories = [...new Set([...r.categories, ...own])];
      // each team owes its k reviews: a reviewer designated by two teams owes both
      r.teams = reviewed.filter((p) => p.designatedReviewerId === r.reviewerId).length;
    }
  }
  const all = detectConflicts({
    proposals: facts,
    reviewers: panel.map((r) => ({ reviewerId: r.reviewerId, email: r.email, institution: r.institution })),
    declared: declared.map((d) => ({ proposalId: d.proposalId as number, reviewerId: d.reviewerId as number, reason: d.conflictReason ?? "no reason given" })),
    competition,
  });
  const reviewedIds = new Set(reviewed.map((p) => p.id));
  const conflicts = new Map([...all].filter(([, c]) => reviewedIds.has(c.proposalId)));
  return {
    call,
    review,
    panel,
    proposals: reviewed.map((p) => ({ proposalId: p.id, code: p.code, serial: p.serial, title: p.title, category: p.scienceCategory, piInstitution: pis.get(p.id) ?? null, status: p.status })),
    conflicts,
  };
}

/** The conflict of one pair, if any (for access checks: the rules are applied on every request). */
export async function pairConflict({ callId, proposalId, reviewerId, transaction }: { callId: number; proposalId: number; reviewerId: number; transaction?: Transaction }) {
  const [reviewer, competing, call] = await Promise.all([
    User.findByPk(reviewerId, { transaction }),
    Proposal.findAll({ where: { callId, status: { [Op.in]: [...COMPETING_STATUSES] } }, attributes: ["id", "code", "scienceCategory"], transaction }),
    Call.findByPk(callId, { transaction }),
  ]);
  if (!reviewer || !call) return null;
  const { byProposal } = await teams(competing.map((p) => p.id), transaction);
  const competition = competitionOf(call);
  let cells = new Map<number, string[]>();
  if (competition === "requests") {
    // only the sheets that matter for this pair: the proposal and the reviewer's own teams'
    const own = competing.filter((p) => (byProposal.get(p.id) ?? []).some((m) => m.userId === reviewerId || sameEmail(m.email, reviewer.email))).map((p) => p.id);
    cells = await requestedCells({ call, proposalIds: [...new Set([proposalId, ...own])] });
  }
  const conflicts = detectConflicts({
    proposals: competing.map((p) => ({ proposalId: p.id, code: p.code, category: p.scienceCategory, team: byProposal.get(p.id) ?? [], requests: cells.get(p.id) })),
    reviewers: [{ reviewerId, email: reviewer.email, institution: reviewer.institution }],
    competition,
  });
  return conflicts.get(pairKey(proposalId, reviewerId)) ?? null;
}
