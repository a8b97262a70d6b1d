import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect } from "react";
import { useForm } from "react-hook-form";
import { data, Link, redirect, useActionData, useFetcher } from "react-router";
import { Field, inputProps } from "~/components/Field";
import { useWorkspace } from "~/components/workspace";
import { requireUser } from "~/lib/auth/auth.server";
import { fieldErrors, readForm } from "~/lib/forms";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { formValues, proposalIdParam, refusalResponse } from "~/lib/proposals/routes.server";
import { designateReviewer, handOverPi, inviteCoI, listTeam, removeMember } from "~/lib/proposals/team.server";
import { memberRoleLabels } from "~/lib/proposals/vocabulary";
import { inviteSchema, memberSchema } from "~/lib/schemas/proposals";
import type { Route } from "./+types/proposals.$proposalId.team";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { proposal, call } = await getProposalForUser({ proposalId, user });
  const members = await listTeam({ user, proposalId });
  const reviewer = call.reviewMode === "distributed" ? { designatedUserId: proposal.designatedReviewerId ?? null, perSubmitter: call.reviewsPerSubmitter, semesterCode: call.semesterCode } : null;
  return { members, reviewer };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await getProposalForUser({ proposalId, user }); // a stranger gets the 404 before any parsing
  const values = formValues(await readForm(request)) as Record<string, string>;
  const intent = values.intent;
  try {
    if (intent === "invite") {
      const parsed = inviteSchema.safeParse(values);
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      const invited = await inviteCoI({ user, proposalId, email: parsed.data.email });
      const who = invited.name ? `${invited.name}${invited.institution ? ` (${invited.institution})` : ""} at ${parsed.data.email.toLowerCase()}` : parsed.data.email.toLowerCase();
      return { ok: true as const, intent, message: `Invitation sent to ${who}.`, errors: {} as Record<string, string>, values: {} as Record<string, string> };
    }
    if (intent === "designate-reviewer") {
      const parsed = memberSchema.safeParse(values);
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      const { email } = await designateReviewer({ user, proposalId, memberId: parsed.data.memberId });
      return { ok: true as const, intent, message: `${email} will review for the team.`, errors: {} as Record<string, string>, values };
    }
    if (intent === "remove" || intent === "hand-over") {
      const parsed = memberSchema.safeParse(values);
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      if (intent === "remove") {
        const { self } = await removeMember({ user, proposalId, memberId: parsed.data.memberId });
        // after leaving, the proposal is no longer yours to see
        if (self) throw redirect("/proposals");
        return { ok: true as const, intent, message: self ? "You have left the team." : "Removed from the team.", errors: {} as Record<string, string>, values };
      }
      await handOverPi({ user, proposalId, memberId: parsed.data.memberId });
      return { ok: true as const, intent, message: "The PI role has been handed over; you are now a Co-I.", errors: {} as Record<string, string>, values };
    }
    return data({ ok: false as const, intent, errors: { form: "Unknown action." } as Record<string, string>, values }, { status: 400 });
  } catch (error) {
    if (error instanceof Response) throw error;
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, intent }, { status: refused.init?.status ?? 400 });
  }
}

function InviteForm() {
  const fetcher = useFetcher<typeof action>();
  const actionData = useActionData<typeof action>();
  // without JavaScript the form posts as a page and the answer arrives as the page's action data
  const answer = fetcher.data ?? actionData;
  const result = answer?.intent === "invite" ? answer : undefined;
  const { register, handleSubmit, formState, reset } = useForm({ resolver: zodResolver(inviteSchema), defaultValues: { email: "" } });
  useEffect(() => {
    if (result?.ok && fetcher.state === "idle") reset({ email: "" });
  }, [result, fetcher.state, reset]);
  const error = formState.errors.email?.message ?? (result && !result.ok ? (result.errors.email ?? result.errors.form) : undefined);
  return (
    <fetcher.Form method="post" noValidate className="card space-y-3" onSubmit={handleSubmit((_, e) => fetcher.submit(e?.target as HTMLFormElement))}>
      <h2>Invite a Co-I</h2>
      <p className="text-sm text-slate-600">They receive an e-mail with a link. When they sign in with that address the proposal appears in their list, and they can edit it while it is a draft.</p>
      <input type="hidden" name="intent" value="invite" />
      <div className="flex flex-wrap items-start gap-3">
        <div className="min-w-72 flex-1">
          <Field label="E-mail address" id="invite-email" error={error}>
            <input type="email" autoComplete="off" {...inputProps("invite-email", error)} {...register("email")} />
          </Field>
        </div>
        <button type="submit" className="btn mt-7" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Sending…" : "Send invitation"}</button>
      </div>
      {result?.ok ? <p role="status" className="text-sm text-emerald-700">{result.message}</p> : null}
    </fetcher.Form>
  );
}

function MemberActions({ member, isPi }: { member: Route.ComponentProps["loaderData"]["members"][number]; isPi: boolean }) {
  const fetcher = useFetcher<typeof action>();
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : null;
  if (member.role === "pi") return null;
  const canRemove = isPi || member.isYou;
  return (
    <div className="flex flex-wrap items-center gap-2">
      {isPi ? (
        <fetcher.Form method="post" onSubmit={(e) => { if (!confirm(`Hand the PI role to ${member.name ?? member.email}? You become a Co-I.`)) e.preventDefault(); }}>
          <input type="hidden" name="intent" value="hand-over" />
          <input type="hidden" name="memberId" value={member.id} />
          <button type="submit" className="btn-quiet" disabled={!member.joined} title={member.joined ? undefined : "Possible once they have signed in"}>Make PI</button>
        </fetcher.Form>
      ) : null}
      {canRemove ? (
        <fetcher.Form method="post" onSubmit={(e) => { if (!confirm(member.isYou ? "Leave this proposal's team?" : `Remove ${member.name ?? member.email} from the team?`)) e.preventDefault(); }}>
          <input type="hidden" name="intent" value="remove" />
          <input type="hidden" name="memberId" value={member.id} />
          <button type="submit" className="btn-quiet">{member.isYou ? "Leave" : "Remove"}</button>
        </fetcher.Form>
      ) : null}
      {error ? <span role="alert" className="text-sm text-red-700">{error}</span> : null}
      {fetcher.data?.ok ? <span role="status" className="text-sm text-emerald-700">{fetcher.data.message}</span> : null}
    </div>
  );
}

/** Distributed review: the PI names who reviews for the team (required before submission). */
function TeamReviewer({ loaderData, editable, isPi }: { loaderData: Route.ComponentProps["loaderData"]; editable: boolean; isPi: boolean }) {
  const fetcher = useFetcher<typeof action>();
  const actionData = useActionData<typeof action>();
  const answer = fetcher.data ?? actionData;
  const result = answer?.intent === "designate-reviewer" ? answer : undefined;
  const r = loaderData.reviewer;
  if (!r) return null;
  const joined = loaderData.members.filter((m) => m.joined);
  const current = loaderData.members.find((m) => m.joined && m.userId === r.designatedUserId);
  const error = result && !result.ok ? (result.errors.memberId ?? result.errors.form) : undefined;
  return (
    <section className="card space-y-3" aria-labelledby="team-reviewer">
      <h2 id="team-reviewer">The team's reviewer</h2>
      <p className="text-sm text-slate-600">
        Call {r.semesterCode} is reviewed by its submitters: one person of each team grades {r.perSubmitter} other proposals of the call before the review deadline. A team whose reviewer does not deliver is flagged to the committee.
      </p>
      <p data-testid="designated-reviewer">
        {current ? <>Reviewer: <strong>{current.name ?? current.email}</strong></> : <span className="text-amber-800">No reviewer chosen yet; the proposal cannot be submitted without one.</span>}
      </p>
      {current?.isYou && !editable ? <p className="text-sm">Your assignments appear on the <Link to="/review">review desk</Link> once the chair commits them (you are told by e-mail).</p> : null}
      {editable && isPi ? (
        <fetcher.Form method="post" className="flex flex-wrap items-end gap-3">
          <input type="hidden" name="intent" value="designate-reviewer" />
          <Field label="Who reviews for the team" id="designate-member" error={error}>
            <select id="designate-member" className="input" aria-invalid={error ? true : undefined} aria-describedby={error ? "designate-member-error" : undefined} name="memberId" defaultValue={current?.id ?? ""}>
              <option value="" disabled>Choose a member…</option>
              {joined.map((m) => (
                <option key={m.id} value={m.id}>{m.name ?? m.email}{m.role === "pi" ? " (PI)" : " (Co-I)"}</option>
              ))}
            </select>
          </Field>
          <button type="submit" className="btn" disabled={fetcher.state !== "idle"}>Save the reviewer</button>
          {result?.ok ? <p role="status" className="text-sm text-emerald-700">{result.message}</p> : null}
        </fetcher.Form>
      ) : null}
    </section>
  );
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
