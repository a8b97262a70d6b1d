import { z } from "zod";
import { InviteForm, MemberActions, TeamReviewer } from "~/components/proposals/TeamForms";
import { useWorkspace } from "~/components/workspace";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { designateReviewer, handOverPi, inviteCoI, listTeam, removeMember } from "~/lib/proposals/team.server";
import { memberRoleLabels } from "~/lib/proposals/vocabulary";
import { inviteSchema, memberSchema } from "~/lib/schemas/proposals";
import { redirect } from "react-router";
import type { Route } from "./+types/proposals.$proposalId.team";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { proposal, call } = await orNotFound(getProposalForUser({ proposalId, user }));
  const members = await orNotFound(listTeam({ user, proposalId }));
  const reviewer = call.reviewMode === "distributed" ? { designatedUserId: proposal.designatedReviewerId ?? null, perSubmitter: call.reviewsPerSubmitter, semesterCode: call.semesterCode } : null;
  return { members, reviewer };
}

const teamIntents = z.discriminatedUnion("intent", [
  intent("invite", inviteSchema),
  intent("designate-reviewer", memberSchema),
  intent("remove", memberSchema),
  intent("hand-over", memberSchema),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user })); // a stranger gets the 404 before any parsing
  return formAction(request, teamIntents, async (input) => {
    switch (input.intent) {
      case "invite": {
        const email = input.email.toLowerCase();
        const invited = await inviteCoI({ user, proposalId, email: input.email });
        const who = invited.name ? `${invited.name}${invited.institution ? ` (${invited.institution})` : ""} at ${email}` : email;
        return { ok: true as const, intent: input.intent, message: `Invitation sent to ${who}.` };
      }
      case "designate-reviewer": {
        const { email } = await designateReviewer({ user, proposalId, memberId: input.memberId });
        return { ok: true as const, intent: input.intent, message: `${email} will review for the team.` };
      }
      case "remove": {
        const { self } = await removeMember({ user, proposalId, memberId: input.memberId });
        // after leaving, the proposal is no longer yours to see
        if (self) throw redirect("/proposals");
        return { ok: true as const, intent: input.intent, message: "Removed from the team." };
      }
      case "hand-over":
        await handOverPi({ user, proposalId, memberId: input.memberId });
        return { ok: true as const, intent: input.intent, message: "The PI role has been handed over; you are now a Co-I." };
    }
  });
}

export default function Team({ loaderData }: Route.ComponentProps) {
  const workspace = useWorkspace();
  return (
    <div className="space-y-5">
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr><th>Name</th><th>E-mail</th><th>Institution</th><th>Role</th><th>Status</th>{workspace.editable ? <th /> : null}</tr>
          </thead>
          <tbody>
            {loaderData.members.map((m) => (
              <tr key={m.id}>
                <td>{m.name ?? <span className="text-slate-400">—</span>}{m.isYou ? <span className="ml-1 text-xs text-slate-500">(you)</span> : null}</td>
                <td>{m.email}</td>
                <td>{m.institution ?? <span className="text-slate-400">—</span>}</td>
                <td className="font-semibold">{memberRoleLabels[m.role]}</td>
                <td>{m.joined ? "signed in" : <span className="text-amber-800">{m.hasAccount ? "invited; has an account, not opened yet" : "invited, not signed in yet"}</span>}</td>
                {workspace.editable ? <td><MemberActions member={m} isPi={workspace.isPi} /></td> : null}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <TeamReviewer loaderData={loaderData} editable={workspace.editable} isPi={workspace.isPi} />
      {workspace.editable ? <InviteForm /> : <p className="text-sm text-slate-600">The team can change only while the proposal is a draft.</p>}
      <p className="text-sm text-slate-600">Co-Is edit the draft; only the PI submits, withdraws, removes other members or hands the PI role over.</p>
    </div>
  );
}
