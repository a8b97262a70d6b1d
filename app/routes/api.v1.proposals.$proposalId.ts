import { data } from "react-router";
import { requireUser } from "~/lib/auth/auth.server";
import { feasibilitySheetOf, loadFeasibilityInputWithRows } from "~/lib/proposals/feasibility.server";
import { observationRowsOf } from "~/lib/proposals/observations.server";
import { targetRowsOf } from "~/lib/proposals/targets.server";
import { teamRows } from "~/lib/proposals/team.server";
import { getProposalForUser, membershipWhere, overviewValues, workspaceHeader } from "~/lib/proposals/proposals.server";
import { apiId } from "~/lib/review/api.server";
import { committeeAccess, committeeReading } from "~/lib/review/read.server";
import { ProposalMember } from "~/models/index.server";
import type { Route } from "./+types/api.v1.proposals.$proposalId";

/**
 * GET /api/v1/proposals/:proposalId: one proposal of the user's, with its feasibility sheet; the chair
 * and the proposal's non-conflicted reviewers get the committee's read-only view (team names and institutions, left out for a dual-anonymous call's reviewers and, until the reveal, its chair).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = apiId(params.proposalId, "proposalId");
  // only the committee's roles need to know first whether they are on the team
  const committee = user.roles.includes("chair") || user.roles.includes("reviewer");
  if (committee && !(await ProposalMember.findOne({ where: { proposalId, ...membershipWhere(user) }, attributes: ["id"] }))) {
    const reading = await committeeReading(await committeeAccess({ user, proposalId }));
    return data({ ...reading, readOnly: true }, { headers: { "Cache-Control": "private, no-store" } });
  }
  const access = await getProposalForUser({ proposalId, user });
  // access checked once above; the targets and observations are read once, for the lists and the sheet
  const [team, parts] = await Promise.all([teamRows({ user, proposalId }), loadFeasibilityInputWithRows({ proposal: access.proposal })]);
  const targets = targetRowsOf(parts.targets, parts.observations);
  const observations = observationRowsOf(parts.observations, parts.input);
  let feasibilitySheet = null;
  let feasibilityError: string | null = null;
  try {
    feasibilitySheet = feasibilitySheetOf(parts.input);
  } catch (error) {
    console.error(`feasibility sheet of proposal ${proposalId} failed`, error);
    feasibilityError = "The feasibility sheet could not be computed.";
  }
  return data(
    {
      proposal: {
        ...workspaceHeader(access),
        ...overviewValues(access.proposal),
        submittedAt: access.proposal.submittedAt?.toISOString() ?? null,
        team: team.map(({ isYou: _isYou, ...m }) => m),
        targets,
        observations,
      },
      feasibilitySheet,
      ...(feasibilityError ? { feasibilityError } : {}),
    },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}

export async function action() {
  return data({ error: "Use GET.", issues: [] }, { status: 405, headers: { Allow: "GET" } });
}
