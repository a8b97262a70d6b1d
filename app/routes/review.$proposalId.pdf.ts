import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { buildProposalPdf } from "~/lib/proposals/pdf.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { committeeAccess } from "~/lib/review/read.server";
import type { Route } from "./+types/review.$proposalId.pdf";

/** The proposal PDF for the chair and the proposal's non-conflicted reviewers (404 for anyone else). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const { proposal, hideTeam } = await orNotFound(committeeAccess({ user, proposalId: proposalIdParam(params) }));
  const bytes = await buildProposalPdf({ proposalId: proposal.id, anonymous: hideTeam });
  return new Response(Buffer.from(bytes), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${(proposal.code ?? `proposal-${proposal.id}`).replace("/", "-")}.pdf"`,
      "Content-Length": String(bytes.byteLength),
      "Cache-Control": "private, no-store",
    },
  });
}
