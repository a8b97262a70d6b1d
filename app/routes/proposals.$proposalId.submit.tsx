import { data, Form, Link, useActionData, useNavigation } from "react-router";
import { utc, useWorkspace } from "~/components/workspace";
import { requireUser } from "~/lib/auth.server";
import { proposalIdParam, refusalResponse } from "~/lib/proposal-routes.server";
import { submissionChecklist, submitProposal } from "~/lib/proposal-submit.server";
import { getProposalForUser, reopenProposal, withdrawProposal } from "~/lib/proposals.server";
import type { Route } from "./+types/proposals.$proposalId.submit";
import { readForm } from "~/lib/forms";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const { items, ready, requestedHours, access } = await submissionChecklist({ user, proposalId: proposalIdParam(params) });
  return { items, ready, requestedHours, submittedAt: access.proposal.submittedAt?.toISOString() ?? null };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await getProposalForUser({ proposalId, user }); // a stranger gets the 404 before any parsing
  const intent = String((await readForm(request)).get("intent") ?? "");
  try {
    if (intent === "submit") {
      const r = await submitProposal({ user, proposalId });
      return { ok: true as const, intent, message: `Submitted as ${r.code}. A receipt${r.pdfAttached ? " with the proposal PDF" : ""} is on its way to ${r.recipients.join(", ")}.`, errors: {} as Record<string, string> };
    }
    if (intent === "withdraw") {
      await withdrawProposal({ user, proposalId });
      return { ok: true as const, intent, message: "The proposal is withdrawn. You can reopen it as a draft until the deadline.", errors: {} as Record<string, string> };
    }
    if (intent === "reopen") {
      await reopenProposal({ user, proposalId });
      return { ok: true as const, intent, message: "The proposal is a draft again. Submit it again before the deadline; it keeps its code.", errors: {} as Record<string, string> };
    }
    return data({ ok: false as const, intent, errors: { form: "Unknown action." } as Record<string, string> }, { status: 400 });
  } catch (error) {
    const refused = refusalResponse(error, {});
    return data({ ok: false as const, intent, errors: refused.data.errors }, { status: refused.init?.status ?? 400 });
  }
}

export default function Submit({ loaderData }: Route.ComponentProps) {
  const w = useWorkspace();
  const { items, ready, requestedHours, submittedAt } = loaderData;
  const actionData = useActionData<typeof action>();
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const open = !w.call.deadlinePassed;
  return (
    <div className="grid gap-5 lg:grid-cols-[3fr_2fr]">
      <section className="card" aria-labelledby="checklist-title">
        <h2 id="checklist-title">Before submitting</h2>
        <p className="mt-1 text-sm text-slate-600">Checked on the server each time this page loads and again when you submit.</p>
        <ul className="mt-4 space-y-3">
          {items.map((item) => (
            <li key={item.key} className="flex gap-3">
              <span aria-hidden className={`mt-0.5 flex h-5 w-5 shrink-0 items-center justify-center rounded-full text-xs font-bold text-white ${item.ok ? "bg-emerald-600" : "bg-red-600"}`}>{item.ok ? "✓" : "!"}</span>
              <div>
                <p className="font-semibold text-night-900">
                  <span className="sr-only">{item.ok ? "Done: " : "Missing: "}</span>
                  {item.href ? <Link to={item.href}>{item.label}</Link> : item.label}
                </p>
                <p className={`text-sm ${item.ok ? "text-slate-600" : "text-red-800"}`}>{item.detail}</p>
              </div>
            </li>
          ))}
        </ul>
        {requestedHours !== null ? <p className="mt-4 text-sm text-slate-700">Requested in total: <strong>{requestedHours.toFixed(1)} h</strong> (from the feasibility sheet).</p> : null}
      </section>
      <section className="card space-y-3" aria-labelledby="act-title">
        <h2 id="act-title">{w.status === "draft" ? "Submit" : w.status === "withdrawn" ? "Withdrawn" : "Submitted"}</h2>
        {actionData?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-sm text-emerald-900">{actionData.message}</p> : null}
        {actionData && !actionData.ok ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">{Object.values(actionData.errors)[0]}</p> : null}
        {w.status === "draft" ? (
          w.isPi ? (
            <Form method="post" className="space-y-2">
              <p className="text-sm text-slate-700">
                {ready ? "Everything is in place. Submitting gives the proposal its code and sends the receipt with the proposal PDF to the whole team." : "The items marked ! must be done first."}
              </p>
              <button type="submit" name="intent" value="submit" className="btn" disabled={!ready || busy}>{busy ? "Submitting…" : "Submit the proposal"}</button>
            </Form>
          ) : (
            <p className="text-sm text-slate-700">Only the PI can submit. You can keep editing the draft until then.</p>
          )
        ) : null}
        {w.status === "submitted" ? (
          <>
            <p className="text-sm text-slate-700">Submitted as <strong>{w.code}</strong>{submittedAt ? ` on ${utc(submittedAt)}` : ""}. It is read-only now.</p>
            {w.isPi && open ? (
              <Form method="post" onSubmit={(e) => { if (!confirm("Withdraw this proposal? You can reopen it as a draft until the deadline.")) e.preventDefault(); }}>
                <button type="submit" name="intent" value="withdraw" className="btn-quiet" disabled={busy}>Withdraw the proposal</button>
              </Form>
            ) : null}
          </>
        ) : null}
        {w.status === "withdrawn" ? (
          w.isPi && open ? (
            <Form method="post">
              <p className="mb-2 text-sm text-slate-700">Reopening makes it a draft again{w.code ? `; it keeps the code ${w.code}` : ""}.</p>
              <button type="submit" name="intent" value="reopen" className="btn" disabled={busy}>Reopen as a draft</button>
            </Form>
          ) : (
            <p className="text-sm text-slate-700">{open ? "The PI can reopen it as a draft before the deadline." : "The deadline has passed; it can no longer be reopened."}</p>
          )
        ) : null}
        {w.status === "draft" && w.isPi && open && w.code ? (
          <Form method="post" onSubmit={(e) => { if (!confirm("Withdraw this draft?")) e.preventDefault(); }}>
            <button type="submit" name="intent" value="withdraw" className="btn-quiet" disabled={busy}>Withdraw instead</button>
          </Form>
        ) : null}
        <p className="border-t border-slate-200 pt-3 text-sm">
          <a href={`/proposals/${w.id}/pdf`} download>Download the proposal PDF</a> — the cover, the technical pages and the science case, as the committee reads them.
        </p>
        <p className="text-xs text-slate-500">Deadline {utc(w.call.deadlineAt)}.</p>
      </section>
    </div>
  );
}
