// The read-only proposal that the committee reads: for the chair (anything past the draft
// stage) and for a reviewer through a committed, non-conflicted assignment. Anyone else: 404.
import type { SessionUser } from "~/lib/auth/auth.server";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { targetRows } from "~/lib/proposals/targets.server";
import { notFound } from "~/lib/proposals/proposals.server";
import { latestScienceCase } from "~/lib/proposals/science-case.server";
import { Call, CallReview, Filter, Instrument, Observation, Proposal, ProposalMember, StoredFile, Target, User } from "~/models/index.server";
import { teamHidden } from "./anonymity.server";
import { CHAIR_READABLE } from "./chair.server";
import { assignmentForProposal } from "./desk.server";

export type Reader = Pick<SessionUser, "id" | "email" | "roles">;

export type CommitteeAccess = { as: "chair" | "reviewer"; proposal: Proposal; call: Call; /** dual-anonymous: the team is not shown to this reader */ hideTeam: boolean };

/** "chair" or "reviewer" if this user may read the proposal as the committee, else a 404. */
export async function committeeAccess({ user, proposalId }: { user: Reader; proposalId: number }): Promise<CommitteeAccess> {
  if (!Number.isSafeInteger(proposalId) || proposalId <= 0) notFound();
  // a reviewer, or a submitter of a distributed call, through their assignment
  try {
    const { proposal, call } = await assignmentForProposal({ user, proposalId });
    return { as: "reviewer", proposal, call, hideTeam: teamHidden(call, null, "reviewer") };
  } catch (error) {
    if (!user.roles.includes("chair")) throw error;
  }
  if (user.roles.includes("chair")) {
    const proposal = await Proposal.findByPk(proposalId);
    if (proposal && (CHAIR_READABLE as readonly string[]).includes(proposal.status)) {
      const call = await Call.findByPk(proposal.callId as number);
      if (call) return { as: "chair", proposal, call, hideTeam: teamHidden(call, await CallReview.findOne({ where: { callId: call.id } }), "chair") };
    }
  }
  notFound();
}

export async function committeeReading({ proposal, call, hideTeam }: Pick<CommitteeAccess, "proposal" | "call" | "hideTeam">) {
  const [members, targets, observations, scienceCase] = await Promise.all([
    hideTeam ? [] : ProposalMember.findAll({ where: { proposalId: proposal.id }, include: [{ model: User, as: "user" }], order: [["role", "DESC"], ["id", "ASC"]] }),
    targetRows(proposal.id),
    Observation.findAll({ where: { proposalId: proposal.id }, include: [{ model: Target, as: "target" }, { model: Instrument, as: "instrument" }, { model: Filter, as: "filter" }], order: [["targetId", "ASC"], ["id", "ASC"]] }),
    latestScienceCase({ proposalId: proposal.id }),
  ]);
  let feasibilitySheet = null;
  let feasibilityError: string | null = null;
  try {
    feasibilitySheet = await computeFeasibilitySheet({ proposalId: proposal.id });
  } catch (error) {
    console.error(`feasibility sheet of proposal ${proposal.id} failed`, error);
    feasibilityError = "The feasibility sheet could not be computed.";
  }
  return {
    proposal: {
      id: proposal.id,
      code: proposal.code,
      title: proposal.title,
      abstract: proposal.abstract,
      scienceCategory: proposal.scienceCategory,
      status: proposal.status,
      isMultiSemester: proposal.isMultiSemester,
      semestersRequested: proposal.semestersRequested ?? [],
      isTargetOfOpportunity: proposal.isTargetOfOpportunity,
      submittedAt: proposal.submittedAt?.toISOString() ?? null,
      call: { id: call.id, semesterCode: call.semesterCode },
      teamHidden: hideTeam,
      team: members.map((m) => ({ name: m.user?.name ?? null, institution: m.user?.institution ?? null, role: m.role })),
      targets: targets.map((t) => ({ id: t.id, name: t.name, raDeg: t.raDeg, decDeg: t.decDeg, magnitude: t.magnitude, band: t.band })),
      observations: observations.map((o) => ({
        id: o.id,
        targetName: o.target?.name ?? "?",
        instrumentName: o.instrument?.name ?? "?",
        band: o.filter?.band ?? "?",
        snrGoal: o.snrGoal,
        exposureSeconds: o.exposureSeconds,
        framesPerEpoch: o.framesPerEpoch,
        epochsPerSemester: o.epochsPerSemester,
        moonCategory: o.moonCategory,
        maxAirmass: o.maxAirmass,
      })),
    },
    // a file name often carries the PI's name
    scienceCase: scienceCase ? { id: scienceCase.id, filename: hideTeam ? ANONYMOUS_FILENAME : scienceCase.filename, pageCount: scienceCase.pageCount } : null,
    feasibilitySheet,
    feasibilityError,
  };
}

export const ANONYMOUS_FILENAME = "science-case.pdf";

/** A stored file of a proposal the committee member may read; 404 otherwise. */
export async function committeeFile({ user, proposalId, fileId }: { user: Reader; proposalId: number; fileId: number }) {
  const { hideTeam } = await committeeAccess({ user, proposalId });
  const file = Number.isSafeInteger(fileId) && fileId > 0 ? await StoredFile.findOne({ where: { id: fileId, proposalId } }) : null;
  if (!file) notFound();
  return { file, hideTeam };
}
