import { Form, Link, useActionData, useNavigation } from "react-router";
import { Field, inputProps } from "~/components/Field";
import { requireRole } from "~/lib/auth/auth.server";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { idSchema, Refusal, valueList, valueText } from "~/lib/forms";
import { observatoryTimeZone } from "~/lib/office/office.server";
import { scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { chairReopenReview, reassign, remindReviewer, reviewBoard, saveReviewSetup, startReview } from "~/lib/review/chair.server";
import { revealTeams, teamRevealState } from "~/lib/review/anonymity.server";
import { reviewerCandidates } from "~/lib/review/facts.server";
import { reviewStatusLabels, type ReviewStatus } from "~/lib/review/vocabulary";
import { reviewSetupSchema } from "~/lib/schemas/review";
import { formatUtc } from "~/lib/format";
import { formatInZone, utcToZonedLocal, zonedLocalToUtc } from "~/lib/zoned-time";
import { z } from "zod";
import type { Route } from "./+types/committee.$callId";

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Review of ${d?.board.call.semesterCode ?? "a call"} · Committee · Nightshare` }];
}


export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  const [board, candidates, timeZone, teams] = await orNotFound(Promise.all([reviewBoard({ callId, viewer: user }), reviewerCandidates(), observatoryTimeZone(), teamRevealState({ callId })]));
  return { board, candidates, timeZone, teams, now: new Date().toISOString() };
}

const reviewerField = { reviewerId: idSchema("reviewer", "Choose a reviewer from the list.") };
const assignmentField = { assignmentId: idSchema("assignment", "The assignment must be a positive whole number; reload the page.") };

const reviewIntents = z.discriminatedUnion("intent", [
  intent("start"),
  intent("setup", reviewSetupSchema),
  intent("remind", z.object(reviewerField)),
  intent("reassign", z.object({ ...assignmentField, ...reviewerField })),
  intent("reveal"),
  intent("reopen", z.object(assignmentField)),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  return formAction(request, reviewIntents, async (input, { values }) => {
    const done = (message: string) => ({ ok: true as const, intent: input.intent, message, values });
    switch (input.intent) {
      case "start": {
        const { moved } = await startReview({ actor: user, callId });
        return done(`${moved} proposal${moved === 1 ? "" : "s"} moved to in review.`);
      }
      case "setup": {
        const at = zonedLocalToUtc(input.reviewDeadline, await observatoryTimeZone());
        if (!at) throw new Refusal("That date and time do not exist in the observatory's time zone.", { field: "reviewDeadline" });
        await saveReviewSetup({ actor: user, callId, reviewDeadlineAt: at, perProposal: input.perProposal, panel: input.panel });
        return done("Review deadline and panel saved.");
      }
      case "remind": {
        const { outstanding } = await remindReviewer({ actor: user, callId, reviewerId: input.reviewerId });
        return done(`Reminder sent (${outstanding} outstanding).`);
      }
      case "reassign":
        await reassign({ actor: user, callId, assignmentId: input.assignmentId, reviewerId: input.reviewerId });
        return done("Reassigned; the new reviewer was told.");
      case "reveal": {
        const { already } = await revealTeams({ actor: user, callId });
        return done(already ? "The teams were already revealed." : "The teams are revealed to the chair; reviewers still do not see them.");
      }
      case "reopen":
        await chairReopenReview({ actor: user, callId, assignmentId: input.assignmentId });
        return done("Review reopened for the reviewer.");
    }
  });
}

const statusTone: Record<ReviewStatus | "overdue", string> = {
  assigned: "bg-slate-100 text-slate-700",
  draft: "bg-amber-100 text-amber-900",
  submitted: "bg-emerald-100 text-emerald-900",
  conflict: "bg-red-100 text-red-800",
  overdue: "bg-red-600 text-white",
};

export default function CallReviewPage({ loaderData }: Route.ComponentProps) {
  const { board, candidates, timeZone, now, teams } = loaderData;
  const actionData = useActionData<typeof action>();
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const { call, review } = board;
  const reviewerName = (id: number) => board.panel.find((r) => r.reviewerId === id)?.name ?? `user ${id}`;
  const overdue = review.reviewDeadlineAt !== null && now >= review.reviewDeadlineAt;
  const errors = actionData && !actionData.ok ? actionData.errors : {};
  // a panel member's message sits at panel.<n>
  const err = (field: string) => errors[field] ?? Object.entries(errors).find(([key]) => key.startsWith(`${field}.`))?.[1];
  const typed = (field: string) => valueText(actionData?.values, field);
  const deadlineLocal = typed("reviewDeadline") ?? (review.reviewDeadlineAt ? utcToZonedLocal(review.reviewDeadlineAt, timeZone) : "");
  // a refused setup keeps the boxes the chair ticked; otherwise the saved panel is ticked
  const refusedSetup = actionData && !actionData.ok && actionData.intent === "setup";
  const ticked = refusedSetup ? valueList(actionData.values, "panel") : board.panel.map((r) => String(r.reviewerId));
  return (
    <div className="space-y-6">
      <p className="text-sm"><Link to="/committee">Committee</Link> › {call.semesterCode}</p>
      <h1>Review of call {call.semesterCode}</h1>
      {actionData?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900">{actionData.message}</p> : null}
      {err("form") || err("reviewerId") || err("assignmentId") ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800">{err("form") ?? err("reviewerId") ?? err("assignmentId")}</p> : null}

      <section className="card space-y-2">
        <h2>Proposals in review</h2>
        <p>Call deadline {formatUtc(call.deadlineAt)}. {board.proposals.length} in review; {board.submittedCount} submitted and not yet in review.</p>
        {board.submittedCount > 0 ? (
          call.deadlinePassed ? (
            <Form method="post">
              <button className="btn" name="intent" value="start" disabled={busy}>Put {board.submittedCount} submitted proposal{board.submittedCount === 1 ? "" : "s"} in review</button>
            </Form>
          ) : (
            <p className="text-slate-600">The call's deadline has not passed: proposals can be put in review after it.</p>
          )
        ) : null}
      </section>

      {teams.dualAnonymous ? (
        <section className="card space-y-2" aria-label="Teams">
          <h2>Teams: dual-anonymous review</h2>
          {teams.revealedAt ? (
            <p>Revealed to the chair on {formatUtc(teams.revealedAt)} (recorded in the audit log). Reviewers still do not see the teams.</p>
          ) : (
            <>
              <p>Reviewers never see the teams of this call. You see them once every grade is in: {teams.submitted} of {teams.expected} assigned reviews submitted. Conflicts are found from the real teams and shown by their rule only.</p>
              <Form method="post">
                <button className="btn" name="intent" value="reveal" disabled={busy || !teams.canReveal} title={teams.canReveal ? undefined : "Every committed review must be submitted first"}>Reveal the teams</button>
              </Form>
            </>
          )}
        </section>
      ) : null}

      <section className="card space-y-3">
        <h2>Review deadline and panel</h2>
        <Form method="post" className="space-y-3" noValidate>
          <input type="hidden" name="intent" value="setup" />
          <div className="grid gap-3 sm:grid-cols-2">
            <Field label={`Review deadline (${timeZone})`} id="reviewDeadline" error={err("reviewDeadline")} hint={review.reviewDeadlineAt ? `${formatInZone(review.reviewDeadlineAt, timeZone)} = ${formatUtc(review.reviewDeadlineAt)}` : undefined}>
              <input {...inputProps("reviewDeadline", err("reviewDeadline"))} type="datetime-local" name="reviewDeadline" defaultValue={deadlineLocal} />
            </Field>
            {call.reviewMode === "distributed" ? (
              <input type="hidden" name="perProposal" value={review.perProposal} />
            ) : (
              <Field label="Reviewers per proposal" id="perProposal" error={err("perProposal")}>
                <input {...inputProps("perProposal", err("perProposal"))} type="number" min={1} max={10} name="perProposal" defaultValue={typed("perProposal") ?? review.perProposal} />
              </Field>
            )}
          </div>
          {call.reviewMode === "distributed" ? (
            <p className="text-sm" data-testid="distributed-panel">
              This call is reviewed by its submitters: the panel is the {board.panel.length} reviewer{board.panel.length === 1 ? "" : "s"} the teams designated, each with {call.reviewsPerSubmitter} proposals to review. They need no reviewer role.
            </p>
          ) : (
          <fieldset>
            <legend className="text-sm font-semibold">Panel (users holding the reviewer role)</legend>
            <div className="mt-1 grid gap-1 sm:grid-cols-2">
              {candidates.map((c) => (
                <label key={c.reviewerId} className="flex items-start gap-2 font-normal">
                  <input type="checkbox" name="panel" value={c.reviewerId} defaultChecked={ticked.includes(String(c.reviewerId))} />
                  <span>
                    {c.name} <span className="text-sm text-slate-600">· {c.institution ?? "no institution"} · {c.categories.map((x) => scienceCategoryLabel(x)).join(", ") || "no categories stated"}</span>
                  </span>
                </label>
              ))}
            </div>
            {err("panel") ? <p className="field-error" role="alert">{err("panel")}</p> : null}
          </fieldset>
          )}
          <button className="btn" disabled={busy}>Save deadline and panel</button>
        </Form>
        <p><Link to={`/committee/${call.id}/board`} className="font-semibold">Open the ranking board →</Link></p>
        <p><Link to={`/committee/${call.id}/assignments`} className="font-semibold">Open the assignment matrix →</Link> {review.committedAt ? `Committed ${formatUtc(review.committedAt)}.` : "Not committed yet."}</p>
      </section>

      <section className="card space-y-3">
        <h2>Progress per reviewer</h2>
        <table className="table-base">
          <thead><tr><th>Reviewer</th><th>Assigned</th><th>Submitted</th><th>Outstanding</th><th>Conflicts declared</th><th></th></tr></thead>
          <tbody>
            {board.panel.map((r) => {
              const mine = board.assignments.filter((a) => a.reviewerId === r.reviewerId && a.committed);
              const open = mine.filter((a) => a.status === "assigned" || a.status === "draft").length;
              return (
                <tr key={r.reviewerId}>
                  <td>{r.name}</td>
                  <td>{mine.filter((a) => a.status !== "conflict").length}</td>
                  <td>{mine.filter((a) => a.status === "submitted").length}</td>
                  <td>{open}{overdue && open ? <span className={`ml-2 rounded px-1 text-xs ${statusTone.overdue}`}>overdue</span> : null}</td>
                  <td>{mine.filter((a) => a.status === "conflict").length}</td>
                  <td>
                    {open ? (
                      <Form method="post"><input type="hidden" name="reviewerId" value={r.reviewerId} /><button className="btn-quiet" name="intent" value="remind" disabled={busy}>Send a reminder</button></Form>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </section>

      <section className="card space-y-3">
        <h2>Progress per proposal</h2>
        {board.proposals.map((p) => {
          const rows = board.assignments.filter((a) => a.proposalId === p.proposalId && a.committed);
          const done = rows.filter((a) => a.status === "submitted" && a.overall !== null);
          const mean = done.length ? done.reduce((s, a) => s + (a.overall ?? 0), 0) / done.length : null;
          return (
            <div key={p.proposalId} className="border-t border-slate-200 pt-3" data-proposal={p.code ?? p.proposalId}>
              <h3 className="font-semibold">
                <Link to={`/review/${p.proposalId}`}>{p.code ?? `#${p.proposalId}`} · {p.title}</Link>
              </h3>
              <p className="text-sm text-slate-600">{scienceCategoryLabel(p.category) ?? "no category"} · {board.teamsHidden ? "team hidden" : `PI at ${p.piInstitution ?? "?"}`}{p.withheld ? "" : ` · ${done.length}/${rows.filter((a) => a.status !== "conflict").length} submitted${mean !== null ? ` · mean overall ${mean.toFixed(2)}` : ""}`}</p>
              {p.withheld ? <p className="text-sm text-amber-900" data-testid={`progress-withheld-${p.proposalId}`}>Reviewers, grades and comments {p.withheld} ({p.conflictReason}); another chair follows its review.</p> : null}
              <ul className="mt-1 space-y-1">
                {rows.map((a) => (
                  <li key={a.assignmentId} className="text-sm">
                    <span className={`mr-2 rounded px-1 ${statusTone[a.status]}`}>{reviewStatusLabels[a.status]}</span>
                    {reviewerName(a.reviewerId)}
                    {a.status === "submitted" ? ` — science ${a.science}, feasibility ${a.feasibility}, legacy ${a.legacy}, overall ${a.overall}` : ""}
                    {a.status === "conflict" ? ` — ${a.conflictReason}` : ""}
                    {a.commentToCommittee ? <details className="ml-6"><summary>Comment to the committee</summary><p className="whitespace-pre-wrap">{a.commentToCommittee}</p></details> : null}
                    {a.commentToPi ? <details className="ml-6"><summary>Comment to the PI</summary><p className="whitespace-pre-wrap">{a.commentToPi}</p></details> : null}
                    {a.status === "assigned" || a.status === "conflict" ? (
                      <Form method="post" className="ml-6 inline-flex gap-2">
                        <input type="hidden" name="assignmentId" value={a.assignmentId} />
                        <select name="reviewerId" aria-label={`New reviewer for ${p.code}`} className="input w-auto py-0">
                          {board.panel
                            .filter((r) => !board.conflicts.some((c) => c.proposalId === p.proposalId && c.reviewerId === r.reviewerId) && !board.assignments.some((x) => x.proposalId === p.proposalId && x.reviewerId === r.reviewerId))
                            .map((r) => <option key={r.reviewerId} value={r.reviewerId}>{r.name}</option>)}
                        </select>
                        <button className="btn-quiet" name="intent" value="reassign" disabled={busy}>Reassign</button>
                      </Form>
                    ) : null}
                    {overdue && a.status !== "conflict" ? (
                      <Form method="post" className="ml-2 inline"><input type="hidden" name="assignmentId" value={a.assignmentId} /><button className="btn-quiet" name="intent" value="reopen" disabled={busy}>Reopen for the reviewer</button></Form>
                    ) : null}
                  </li>
                ))}
              </ul>
            </div>
          );
        })}
      </section>
    </div>
  );
}
