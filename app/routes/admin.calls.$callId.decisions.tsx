import { Fragment, useState } from "react";
import { Form, Link, useActionData, useNavigation } from "react-router";
import { z } from "zod";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { BatchProgressBar } from "~/components/decisions/BatchProgressBar";
import { TemplateEditor } from "~/components/decisions/TemplateEditor";
import { requireRole } from "~/lib/auth/auth.server";
import { callDecisions, saveTemplate } from "~/lib/decisions/decisions.server";
import { templatesFor } from "~/lib/decisions/facts.server";
import { resendLetter, sendDecisions } from "~/lib/decisions/send.server";
import { formatMoney } from "~/lib/payments/money";
import { decisionOutcomes, outcomeLabels } from "~/lib/decisions/vocabulary";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { hours } from "~/lib/format";
import { resendSchema, templateSchema, type DecisionsAnswer } from "~/lib/schemas/decisions";
import type { Route } from "./+types/admin.calls.$callId.decisions";
import { valueText } from "~/lib/forms";

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Decisions ${d?.decisions.call.semesterCode ?? ""} · Observatory office · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const callId = idParam(params.callId, "call");
  const [decisions, templates] = await orNotFound(Promise.all([callDecisions({ callId }), templatesFor()]));
  return { decisions, templates };
}

const decisionsIntents = z.discriminatedUnion("intent", [intent("send-all"), intent("resend", resendSchema), intent("save-template", templateSchema)]);

export async function action({ request, params }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const callId = idParam(params.callId, "call");
  return formAction(request, decisionsIntents, async (input): Promise<DecisionsAnswer> => {
    switch (input.intent) {
      case "send-all": {
        const sent = await sendDecisions({ actor, callId });
        const message = sent.letters ? `${sent.letters} letter${sent.letters === 1 ? "" : "s"} queued (${sent.mails} e-mails to PIs and Co-Is).` : "Every letter had been sent already; nothing was queued.";
        return { ok: true, intent: input.intent, message };
      }
      case "resend": {
        const sent = await resendLetter({ actor, callId, proposalId: input.proposalId, reason: input.reason });
        return { ok: true, intent: input.intent, message: `The letter is queued again (${sent.mails} e-mail${sent.mails === 1 ? "" : "s"}).` };
      }
      case "save-template":
        await saveTemplate({ actor, outcome: input.outcome, subject: input.subject, body: input.body });
        return { ok: true, intent: input.intent, outcome: input.outcome, message: `The ${input.outcome} template is saved; letters not yet sent use it.` };
    }
  });
}

const hoursOf = (row: { facts: { hours: { hours: number; semesterCode: string }[]; semesterCode: string } }) => row.facts.hours.filter((h) => h.semesterCode === row.facts.semesterCode).reduce((s, h) => s + h.hours, 0);

export default function Decisions({ loaderData }: Route.ComponentProps) {
  const { decisions, templates } = loaderData;
  const actionData = useActionData<typeof action>();
  const busy = useNavigation().state !== "idle";
  const [open, setOpen] = useState<number | null>(null);
  const { call } = decisions;
  const unsent = decisions.rows.filter((r) => !r.sent).length;
  // a template's answer belongs to its editor; the rest (sending, an unknown button) to the page
  const editorsAnswer = actionData?.intent === "save-template" && (actionData.ok || decisionOutcomes.some((o) => o === valueText(actionData.values, "outcome")));
  const pageAnswer = actionData && !editorsAnswer ? actionData : undefined;
  return (
    <div className="space-y-6">
      <Breadcrumbs trail={[{ to: "/admin", label: "Observatory office" }, { to: "/admin/calls", label: "Calls" }, { to: `/admin/calls/${call.id}`, label: call.semesterCode }, { label: "Decisions" }]} />
      <h1>Decisions · {call.semesterCode}</h1>
      {!decisions.locked ? (
        <div className="card" role="status">
          <p>The allocation of {call.title} is not locked. Decisions are sent from a locked allocation only: the chair locks it on the <Link to={`/committee/${call.id}/board`}>ranking board</Link>.</p>
        </div>
      ) : (
        <>
          <section className="card space-y-3">
            <p className="text-sm text-slate-600">Allocation locked {decisions.lockedAt!.slice(0, 16).replace("T", " ")} UTC · {decisions.rows.length} proposals with an outcome · {unsent} letter{unsent === 1 ? "" : "s"} not sent</p>
            <Form method="post" className="flex items-center gap-3">
              <input type="hidden" name="intent" value="send-all" />
              <button type="submit" className="btn" disabled={busy || unsent === 0}>{unsent === 0 ? "All letters sent" : `Send all ${unsent} letters`}</button>
              {pageAnswer?.ok ? <span role="status" className="text-sm text-emerald-700">{pageAnswer.message}</span> : null}
              {pageAnswer && !pageAnswer.ok ? <span role="alert" className="text-sm text-red-700">{Object.values(pageAnswer.errors)[0]}</span> : null}
            </Form>
            {decisions.latestBatch ? <BatchProgressBar key={decisions.latestBatch.id} initial={decisions.latestBatch} /> : null}
          </section>
          <section className="card overflow-x-auto">
            <table className="table-base" aria-label="Decisions">
              <thead>
                <tr><th>Code</th><th>Title</th><th>Outcome</th><th>Hours ({call.semesterCode})</th><th>Tier</th><th>Charge</th><th>Letter</th><th></th></tr>
              </thead>
              <tbody>
                {decisions.rows.map((r) => (
                  <Fragment key={r.proposalId}>
                    <tr data-proposal={r.proposalId}>
                      <td className="whitespace-nowrap font-semibold">{r.code}</td>
                      <td>{r.title}</td>
                      <td>{outcomeLabels[r.outcome]}</td>
                      <td className="tabular-nums">{hours(r.outcome === "accepted" ? hoursOf(r) : null)}<div className="text-xs text-slate-500">{r.facts.hours.map((h) => `${h.telescope} ${h.moonCategory} ${h.semesterCode} ${h.hours.toFixed(1)}`).join(" · ")}</div></td>
                      <td>{r.facts.tier ?? "—"}</td>
                      <td>{r.facts.charge ? formatMoney(r.facts.charge.amountCents, r.facts.charge.currency) : r.outcome !== "accepted" ? "—" : r.sent ? "none" : "raised on sending, if due"}</td>
                      <td data-testid="letter-state">{!r.sent ? "not sent" : r.sent.queued + r.sent.retrying > 0 ? `sending (${r.sent.sent}/${r.sent.total})` : r.sent.failed ? `${r.sent.failed} failed` : `sent to ${r.sent.total}`}{r.sent?.resends ? ` · re-sent ${r.sent.resends}×` : ""}</td>
                      <td className="whitespace-nowrap"><button type="button" className="btn-quiet" onClick={() => setOpen(open === r.proposalId ? null : r.proposalId)}>{open === r.proposalId ? "Hide letter" : "Letter"}</button></td>
                    </tr>
                    {open === r.proposalId ? (
                      <tr>
                        <td colSpan={8} className="bg-slate-50">
                          <p className="font-semibold">{r.letter.subject}</p>
                          <pre className="whitespace-pre-wrap font-sans text-sm">{r.letter.body}</pre>
                          {r.sent ? (
                            <Form method="post" className="mt-3 flex flex-wrap items-end gap-2">
                              <input type="hidden" name="intent" value="resend" />
                              <input type="hidden" name="proposalId" value={r.proposalId} />
                              <label className="flex-1">Reason for sending again<input name="reason" className="input" defaultValue={pageAnswer && !pageAnswer.ok && pageAnswer.intent === "resend" ? (valueText(pageAnswer.values, "reason") ?? "") : ""} aria-invalid={pageAnswer && !pageAnswer.ok && pageAnswer.errors.reason ? true : undefined} /></label>
                              <button type="submit" className="btn-quiet" disabled={busy}>Send this letter again</button>
                              {pageAnswer && !pageAnswer.ok && pageAnswer.errors.reason ? <p className="field-error w-full" role="alert">{pageAnswer.errors.reason}</p> : null}
                            </Form>
                          ) : <p className="mt-2 text-sm text-slate-500">Preview with the current template; charges are raised when the letter is sent.</p>}
                        </td>
                      </tr>
                    ) : null}
                  </Fragment>
                ))}
              </tbody>
            </table>
          </section>
        </>
      )}
      <section className="space-y-3">
        <h2>Letter templates</h2>
        <p className="text-sm text-slate-600">One per outcome. A placeholder is a name in double square brackets, e.g. <code>[[code]]</code>; a template naming an unknown one is refused. The comments are the reviewers' comments to the PI, as Reviewer 1, 2, 3 — never their names or their comments to the committee.</p>
        {decisionOutcomes.map((o) => (
          <TemplateEditor key={o} outcome={o} initial={templates[o]} sample={decisions.rows.find((r) => r.outcome === o)?.facts ?? decisions.rows[0]?.facts ?? null} />
        ))}
      </section>
    </div>
  );
}
