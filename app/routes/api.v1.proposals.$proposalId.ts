import { data } from "react-router";
import { requireUser } from "~/lib/auth/auth.server";
import { Refusal } from "~/lib/forms";
import { feasibilitySheetOf, loadFeasibilityInputWithRows } from "~/lib/proposals/feasibility.server";
import { observationRowsOf } from "~/lib/proposals/observations.server";
import { targetRowsOf } from "~/lib/proposals/targets.server";
import { teamRows } from "~/lib/proposals/team.server";
import { getProposalForUser, overviewValues, workspaceHeader } from "~/lib/proposals/proposals.server";
import { apiAttempt, apiId } from "~/lib/http/api.server";
import { committeeAccess, committeeReading } from "~/lib/review/read.server";
import type { Route } from "./+types/api.v1.proposals.$proposalId";

/**
 * GET /api/v1/proposals/:proposalId: one proposal of the user's, with its feasibility sheet; the chair
 * and the proposal's non-conflicted reviewers get the committee's read-only view (team names and institutions, left out for a dual-anonymous call's reviewers and, until the reveal, its chair).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = apiId(params.proposalId, "proposalId");
  // one access check: the team's; the committee's roles fall back to their read-only view
  const committee = user.roles.includes("chair") || user.roles.includes("reviewer");
  const access = await apiAttempt(() => getProposalForUser({ proposalId, user }).catch((error: unknown) => {
    if (committee && error instanceof Refusal && error.status === 404) return null;
    throw error;
  }));
  if (!access) {
    const reading = await apiAttempt(async () => committeeReading(await committeeAccess({ user, proposalId })));
    return data({ ...reading, readOnly: true }, { headers: { "Cache-Control": "private, no-store" } });
  }
  // the targets and observations are read once, for the lists and the sheet
  const [team, parts] = await apiAttempt(() => Promise.all([teamRows({ user, proposalId }), loadFeasibilityInputWithRows({ proposal: access.proposal })]));
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
