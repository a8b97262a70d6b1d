// The readiness strip's actions (send, withdraw, reopen, delete), posted from every tab of the
// workspace. A resource route: the strip's fetcher reads the answer; a GET goes to the summary.
import { redirect } from "react-router";
import { z } from "zod";
import type { ReadinessDone } from "~/components/proposals/ReadinessStrip";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { submitProposal } from "~/lib/proposals/submit.server";
import { deleteDraft, getProposalForUser, reopenProposal, withdrawProposal } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/proposals.$proposalId.submit";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const { proposal } = await orNotFound(getProposalForUser({ proposalId: proposalIdParam(params), user }));
  return redirect(`/proposals/${proposal.id}`);
}

const stripIntents = z.discriminatedUnion("intent", [intent("submit"), intent("withdraw"), intent("reopen"), intent("delete")]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user })); // a stranger gets the 404 before any parsing
  return formAction(request, stripIntents, async (input) => {
    const ok = (intent: ReadinessDone["intent"], message: string): ReadinessDone => ({ ok: true, intent, message });
    switch (input.intent) {
      case "submit": {
        const r = await submitProposal({ user, proposalId });
        return ok(input.intent, `Submitted as ${r.code}. A receipt${r.pdfAttached ? " with the proposal PDF" : ""} is on its way to ${r.recipients.join(", ")}.`);
      }
      case "withdraw":
        await withdrawProposal({ user, proposalId });
        return ok(input.intent, "The proposal is withdrawn and the team has been told by e-mail. You can reopen it as a draft until the deadline.");
      case "reopen":
        await reopenProposal({ user, proposalId });
        return ok(input.intent, "The proposal is a draft again. Submit it again before the deadline; it keeps its code.");
      case "delete": {
        const { title } = await deleteDraft({ user, proposalId });
        return redirect(`/proposals?deleted=${encodeURIComponent(title)}`);
      }
    }
  });
}
