import { Link, NavLink, Outlet, useFetcher } from "react-router";
import { SelfReferenceSummary } from "~/components/SelfReferenceWarnings";
import { StatusBadge } from "~/components/StatusBadge";
import { utc } from "~/components/workspace";
import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { proposalStatusLabels, type ProposalStatus } from "~/lib/domain";
import { memberRoleLabels } from "~/lib/proposals/vocabulary";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { submissionChecklist } from "~/lib/proposals/submit.server";
import { getProposalForUser, workspaceHeader } from "~/lib/proposals/proposals.server";
import { Op } from "sequelize";
import { Charge, Observation } from "~/models/index.server";
import type { Route } from "./+types/proposals.$proposalId";
import type { action as stripAction } from "./proposals.$proposalId.submit";

export function meta({ data }: Route.MetaArgs) {
  return [{ title: `${data?.proposal.code ?? "Draft"} · ${data?.proposal.title ?? "Proposal"} · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await orNotFound(getProposalForUser({ proposalId, user }));
  // The checklist is for drafts only: a submitted or decided proposal shows its state instead.
  const readiness =
    access.proposal.status === "draft"
      ? await orNotFound(submissionChecklist({ user, proposalId, access })).then(({ items, ready, requestedHours, requestedHoursBySemester, selfReference }) => ({ items, ready, requestedHours, requestedHoursBySemester, selfReference }))
      : null;
  // Epoch progress is a tab once an astrometry programme is accepted (the route answers for any proposal)
  const epochTab = access.proposal.status === "accepted" && (await Observation.count({ where: { proposalId, baselineYears: { [Op.ne]: null } } })) > 0;
  // the Decision tab once the office has sent the letter
  const decisionTab = access.proposal.decisionSentAt !== null && access.proposal.decisionSentAt !== undefined;
  // the Charges tab appears once there can be charges: an accepted programme, or one that has some
  const showCharges = access.proposal.status === "accepted" || (await Charge.count({ where: { proposalId } })) > 0;
  return { proposal: workspaceHeader(access), readiness, submittedAt: access.proposal.submittedAt?.toISOString() ?? null, epochTab, decisionTab, showCharges };
}

const tabs = [
  { to: "", label: "Summary", end: true },
  { to: "targets", label: "Targets" },
  { to: "observations", label: "Observations" },
  { to: "feasibility", label: "Feasibility sheet" },
  { to: "science-case", label: "Science case" },
  { to: "team", label: "Team" },
  { to: "epochs", label: "Epoch progress" },
  { to: "change-log", label: "Change log" },
  { to: "decision", label: "Decision" },
];
const chargesTab = { to: "charges", label: "Charges", end: false };

type Data = Route.ComponentProps["loaderData"];

/** What is done, what is missing, and the send / withdraw / reopen / delete buttons; on every tab. */
function ReadinessStrip({ p, readiness, submittedAt }: { p: Data["proposal"]; readiness: Data["readiness"]; submittedAt: string | null }) {
  const fetcher = useFetcher<typeof stripAction>();
  const busy = fetcher.state !== "idle";
  const answer = fetcher.data;
  const open = !p.call.deadlinePassed;
  const action = `/proposals/${p.id}/submit`;
  const confirmFirst = (question: string) => (e: React.FormEvent) => {
    if (!confirm(question)) e.preventDefault();
  };
  const done = readiness?.items.filter((i) => i.ok) ?? [];
  const missing = readiness?.items.filter((i) => !i.ok) ?? [];
  return (
    <section aria-label="Readiness" className="rounded-lg border border-slate-300 bg-white px-4 py-3">
      <div className="flex flex-wrap items-start gap-x-6 gap-y-3">
        <div className="min-w-0 flex-1 space-y-2">
          {readiness ? (
            <>
              <p className="text-sm font-semibold text-night-900">
                {readiness.ready ? "Ready to send" : `${missing.length} of ${readiness.items.length} still missing before it can be sent`}
              </p>
              <ul className="flex flex-wrap gap-2" aria-label="Done">
                {done.map((item) => (
                  <li key={item.key} title={item.detail} className="rounded-full border border-emerald-300 bg-emerald-50 px-2.5 py-0.5 text-xs font-semibold text-emerald-800">
                    <span aria-hidden>✓ </span>
                    <span className="sr-only">Done: </span>
                    {item.label}
                  </li>
                ))}
              </ul>
              {missing.length ? (
                <ul className="space-y-1" aria-label="Missing">
                  {missing.map((item) => (
                    <li key={item.key} className="text-sm text-red-800">
                      <span aria-hidden className="mr-1 font-bold">!</span>
                      <span className="sr-only">Missing: </span>
                      {item.href ? <Link to={item.href} className="font-semibold text-red-800">{item.label}</Link> : <strong>{item.label}</strong>}: {item.detail}
                    </li>
                  ))}
                </ul>
              ) : null}
              {readiness.selfReference ? <SelfReferenceSummary check={readiness.selfReference} href={`/proposals/${p.id}/science-case`} /> : null}
              {readiness.requestedHoursBySemester.length ? (
                <p className="text-xs text-slate-600">
                  Requested:{" "}
                  {readiness.requestedHoursBySemester.map((s, i) => (
                    <span key={s.semesterCode}>
                      {i ? " · " : ""}
                      <strong className="tabular-nums">{s.hours.toFixed(1)} h</strong> in {s.semesterCode}
                      {s.callSemester ? " (this call)" : ""}
                    </span>
                  ))}
                </p>
              ) : null}
            </>
          ) : (
            <p className="text-sm text-slate-700">
              {p.status === "submitted" ? (
                <>Sent as <strong>{p.code}</strong>{submittedAt ? ` on ${utc(submittedAt)}` : ""}; read-only while it waits for the committee.</>
              ) : p.status === "withdrawn" ? (
                <>Withdrawn{p.code ? <> (code <strong>{p.code}</strong>)</> : null}: the committee will not read it.</>
              ) : (
                <>
                  {p.code ? <strong>{p.code}</strong> : null} is {proposalStatusLabels[p.status as ProposalStatus]}
                  {submittedAt ? `; sent on ${utc(submittedAt)}` : ""}.
                </>
              )}
            </p>
          )}
          {answer?.ok ? <p role="status" className="text-sm text-emerald-800">{answer.message}</p> : null}
          {answer && !answer.ok ? <p role="alert" className="text-sm text-red-800">{Object.values(answer.errors)[0]}</p> : null}
        </div>
        <div className="flex flex-wrap items-center gap-2">
          {p.status === "draft" && p.isPi ? (
            <fetcher.Form method="post" action={action}>
              <button type="submit" name="intent" value="submit" className="btn" disabled={!readiness?.ready || busy} title={readiness?.ready ? undefined : "Complete the items marked ! first"}>
                {busy && fetcher.formData?.get("intent") === "submit" ? "Sending…" : "Send the proposal"}
              </button>
            </fetcher.Form>
          ) : null}
          {p.status === "draft" && !p.isPi ? <p className="text-xs text-slate-600">Only the PI sends the proposal.</p> : null}
          {p.isPi && open && (p.status === "submitted" || (p.status === "draft" && p.code)) ? (
            <fetcher.Form method="post" action={action} onSubmit={confirmFirst("Withdraw this proposal? The team is told by e-mail; you can reopen it as a draft until the deadline.")}>
              <button type="submit" name="intent" value="withdraw" className="btn-quiet" disabled={busy}>Withdraw</button>
            </fetcher.Form>
          ) : null}
          {p.isPi && open && p.status === "withdrawn" ? (
            <fetcher.Form method="post" action={action}>
              <button type="submit" name="intent" value="reopen" className="btn" disabled={busy}>Reopen as a draft</button>
            </fetcher.Form>
          ) : null}
          {p.isPi && !p.code && (p.status === "draft" || p.status === "withdrawn") ? (
            <fetcher.Form method="post" action={action} onSubmit={confirmFirst(`Delete the draft "${p.title}" with its targets, observations and files? This cannot be undone.`)}>
              <button type="submit" name="intent" value="delete" className="btn-quiet text-red-700" disabled={busy}>Delete draft</button>
            </fetcher.Form>
          ) : null}
          <a href={`/proposals/${p.id}/pdf`} download className="text-sm">PDF</a>
        </div>
      </div>
    </section>
  );
}

export default function Workspace({ loaderData }: Route.ComponentProps) {
  const p = loaderData.proposal;
  return (
    <div className="space-y-5">
      <div>
        <p className="text-sm text-slate-600">
          <Link to="/proposals">My proposals</Link> · call {p.call.semesterCode}
        </p>
        <div className="mt-1 flex flex-wrap items-center gap-3">
          <h1 className="min-w-0 break-words">{p.title}</h1>
          <StatusBadge status={p.status} />
        </div>
        <p className="mt-1 text-sm text-slate-600">
          {p.code ? <span className="font-semibold text-night-900">{p.code}</span> : <span>No code yet: it is given when the proposal is sent</span>} · you are{" "}
          {memberRoleLabels[p.role]} · deadline {utc(p.call.deadlineAt)}
          {p.call.deadlinePassed ? <strong className="text-red-700"> (passed)</strong> : null}
        </p>
      </div>
      {!p.editable ? (
        <p role="status" className="rounded-md border border-night-700/30 bg-night-100 px-4 py-2 text-sm text-night-900">
          This proposal is {p.status === "in_review" ? "in review" : p.status} and therefore read-only.{" "}
          {p.status === "submitted" && !p.call.deadlinePassed
            ? p.isPi
              ? "To change it, withdraw it and reopen it as a draft; it keeps its code."
              : "The PI can withdraw it and reopen it as a draft before the deadline."
            : p.status === "withdrawn" && !p.call.deadlinePassed
              ? p.isPi
                ? "Reopen it as a draft to change it."
                : "The PI can reopen it as a draft before the deadline."
              : null}
        </p>
      ) : p.call.deadlinePassed ? (
        <p role="status" className="rounded-md border border-red-200 bg-red-50 px-4 py-2 text-sm text-red-800">
          The deadline of call {p.call.semesterCode} has passed: this draft can no longer be sent.
        </p>
      ) : null}
      <ReadinessStrip p={p} readiness={loaderData.readiness} submittedAt={loaderData.submittedAt} />
      <nav aria-label="Proposal sections" className="flex flex-wrap gap-1 border-b border-slate-300">
        {[...tabs.filter((tab) => (tab.to !== "epochs" || loaderData.epochTab) && (tab.to !== "decision" || loaderData.decisionTab)), ...(loaderData.showCharges ? [chargesTab] : [])].map((tab) => (
          <NavLink
            key={tab.label}
            to={tab.to}
            end={tab.end}
            prefetch="intent"
            className={({ isActive }) =>
              `-mb-px rounded-t-md border px-3 py-2 text-sm font-semibold no-underline hover:no-underline ${
                isActive ? "border-slate-300 border-b-white bg-white text-night-900" : "border-transparent text-slate-600 hover:text-night-800"
              }`
            }
          >
            {tab.label}
          </NavLink>
        ))}
      </nav>
      <Outlet />
    </div>
  );
}
