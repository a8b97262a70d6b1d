import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect } from "react";
import { useForm } from "react-hook-form";
import { Link, useActionData, useFetcher } from "react-router";
import type { z } from "zod";
import { Field, inputProps } from "~/components/Field";
import type { ActionFailure } from "~/lib/forms";
import type { TeamMember } from "~/lib/proposals/team.server";
import { inviteSchema } from "~/lib/schemas/proposals";

/** What the Team tab's action answers, for the forms' fetchers. */
export type TeamActionResult = ActionFailure | { ok: true; intent: "invite" | "designate-reviewer" | "remove" | "hand-over"; message: string };

/** What the Team tab's loader gives. */
export type TeamPageData = {
  members: TeamMember[];
  reviewer: { designatedUserId: number | null; perSubmitter: number; semesterCode: string } | null;
};

/** The PI or a Co-I invites a Co-I by e-mail. */
export function InviteForm() {
  const fetcher = useFetcher<TeamActionResult>();
  const actionData = useActionData<TeamActionResult>();
  // without JavaScript the form posts as a page and the answer arrives as the page's action data
  const answer = fetcher.data ?? actionData;
  const result = answer?.intent === "invite" ? answer : undefined;
  const { register, handleSubmit, formState, reset } = useForm<z.input<typeof inviteSchema>, unknown, z.output<typeof inviteSchema>>({ resolver: zodResolver(inviteSchema), defaultValues: { email: "" } });
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

/** Hand the PI role over, remove a member, or leave. */
export function MemberActions({ member, isPi }: { member: TeamMember; isPi: boolean }) {
  const fetcher = useFetcher<TeamActionResult>();
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
export function TeamReviewer({ loaderData, editable, isPi }: { loaderData: TeamPageData; editable: boolean; isPi: boolean }) {
  const fetcher = useFetcher<TeamActionResult>();
  const actionData = useActionData<TeamActionResult>();
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
