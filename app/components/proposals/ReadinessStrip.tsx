import { Link, useFetcher } from "react-router";
import { SelfReferenceSummary } from "~/components/SelfReferenceWarnings";
import { formatUtc as utc } from "~/lib/format";
import { proposalStatusLabels, type ProposalStatus } from "~/lib/domain";
import type { ActionFailure } from "~/lib/forms";
import type { WorkspaceHeader } from "~/lib/proposals/proposals.server";
import type { submissionChecklist } from "~/lib/proposals/submit.server";

/** What the strip's buttons answer (POST /proposals/:id/submit); deleting a draft answers with a redirect instead. */
export type ReadinessDone = { ok: true; intent: "submit" | "withdraw" | "reopen"; message: string };
export type ReadinessAnswer = ActionFailure | ReadinessDone;

/** The checklist of a draft, as the workspace's loader hands it over. */
export type Readiness = Pick<Awaited<ReturnType<typeof submissionChecklist>>, "items" | "ready" | "requestedHours" | "requestedHoursBySemester" | "selfReference">;

/** What is done, what is missing, and the send / withdraw / reopen / delete buttons; on every tab. */
export function ReadinessStrip({ p, readiness, submittedAt }: { p: WorkspaceHeader; readiness: Readiness | null; submittedAt: string | null }) {
  const fetcher = useFetcher<ReadinessAnswer>();
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
