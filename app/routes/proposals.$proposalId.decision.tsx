import { data, useFetcher } from "react-router";
import { formatUtc as utc } from "~/lib/format";
import { requireUser } from "~/lib/auth/auth.server";
import { decisionForUser } from "~/lib/decisions/decisions.server";
import { chargesText } from "~/lib/decisions/template";
import { outcomeLabels } from "~/lib/decisions/vocabulary";
import { fieldErrors, readForm } from "~/lib/forms";
import { formValues, proposalIdParam, refusalResponse } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { myHelpfulness, rateComment } from "~/lib/review/helpfulness.server";
import { HELPFULNESS_MAX, HELPFULNESS_MIN } from "~/lib/review/vocabulary";
import { helpfulnessSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/proposals.$proposalId.decision";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { letter } = await decisionForUser({ user, proposalId });
  return { proposalId, letter, helpfulness: letter ? await myHelpfulness({ user, proposalId }) : [] };
}

/** The team rates how helpful each comment was (1–5; anonymous: nobody sees who rated). */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await getProposalForUser({ proposalId, user }); // a stranger gets the 404 before any parsing
  const values = formValues(await readForm(request)) as Record<string, string>;
  const parsed = helpfulnessSchema.safeParse(values);
  if (!parsed.success) return data({ ok: false as const, assignmentId: values.assignmentId ?? null, errors: fieldErrors(parsed.error), values }, { status: 400 });
  try {
    await rateComment({ user, proposalId, assignmentId: parsed.data.assignmentId, rating: parsed.data.rating });
    return { ok: true as const, assignmentId: String(parsed.data.assignmentId), errors: {} as Record<string, string>, values };
  } catch (error) {
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, ok: false as const, assignmentId: values.assignmentId ?? null }, { status: refused.init?.status ?? 400 });
  }
}

function RateComment({ assignmentId, rating, label }: { assignmentId: number; rating: number | null; label: string }) {
  const fetcher = useFetcher<typeof action>();
  const answer = fetcher.data && fetcher.data.assignmentId === String(assignmentId) ? fetcher.data : undefined;
  const error = answer && !answer.ok ? (answer.errors.rating ?? answer.errors.assignmentId ?? answer.errors.form) : undefined;
  const shown = fetcher.formData ? Number(fetcher.formData.get("rating")) : rating;
  return (
    <fetcher.Form method="post" className="mt-2 flex flex-wrap items-center gap-2 text-sm" aria-label={`How helpful was ${label}?`}>
      <input type="hidden" name="assignmentId" value={assignmentId} />
      <span className="text-slate-600">How helpful was this comment?</span>
      {Array.from({ length: HELPFULNESS_MAX - HELPFULNESS_MIN + 1 }, (_, i) => HELPFULNESS_MIN + i).map((n) => (
        <button
          key={n}
          type="submit"
          name="rating"
          value={n}
          aria-pressed={shown === n}
          className={`rounded border px-2 py-0.5 tabular-nums ${shown === n ? "border-night-700 bg-night-700 text-white" : "border-slate-300 bg-white"}`}
          title={n === HELPFULNESS_MIN ? "not helpful" : n === HELPFULNESS_MAX ? "very helpful" : undefined}
        >
          {n}
        </button>
      ))}
      <span className="text-xs text-slate-500">1 not helpful · 5 very helpful · anonymous</span>
      {answer?.ok ? <span role="status" className="text-emerald-700">Saved.</span> : null}
      {error ? <span role="alert" className="field-error">{error}</span> : null}
    </fetcher.Form>
  );
}

export default function Decision({ loaderData }: Route.ComponentProps) {
  const { letter, proposalId, helpfulness } = loaderData;
  if (!letter) {
    return (
      <section className="card" role="status">
        <h2>Decision</h2>
        <p className="text-slate-600">No decision has been sent for this proposal yet. When the observatory office sends it, it appears here and in the PI's and Co-Is' mailboxes.</p>
      </section>
    );
  }
  const f = letter.facts;
  return (
    <div className="space-y-6">
      <section className="card space-y-3">
        <div className="flex flex-wrap items-baseline justify-between gap-3">
          <h2>Decision: <span data-testid="decision-outcome">{outcomeLabels[letter.outcome]}</span></h2>
          <a className="btn" href={`/proposals/${proposalId}/decision-letter.pdf`}>Download the letter (PDF)</a>
        </div>
        <p className="text-sm text-slate-600">Sent {utc(letter.sentAt)} · call {f.semesterCode}{f.tier ? ` · tier ${f.tier}` : ""}</p>
        {f.hours.length ? (
          <table className="table-base" aria-label="Allocated hours">
            <thead><tr><th>Telescope</th><th>Moon category</th><th>Semester</th><th className="text-right">Hours</th></tr></thead>
            <tbody>
              {f.hours.map((h, i) => (
                <tr key={i}><td>{h.telescope}</td><td>{h.moonCategory}</td><td>{h.semesterCode}</td><td className="text-right tabular-nums">{h.hours.toFixed(1)}</td></tr>
              ))}
            </tbody>
          </table>
        ) : null}
        <p className="text-sm"><span className="font-semibold">Charges due: </span>{f.charge ? chargesText(f) : "nothing."}</p>
      </section>
      <section className="card space-y-3">
        <h2>Reviewers' comments</h2>
        {f.comments.length === 0 ? <p className="text-slate-600">The reviewers left no comments for the PI.</p> : null}
        {f.comments.map((c) => {
          const rate = helpfulness.find((h) => h.label === c.label);
          return (
            <div key={c.label} data-testid="decision-comment">
              <h3 className="text-sm font-semibold">{c.label}</h3>
              <p className="whitespace-pre-wrap text-sm">{c.text}</p>
              {rate ? <RateComment assignmentId={rate.assignmentId} rating={rate.rating} label={c.label} /> : null}
            </div>
          );
        })}
      </section>
      <section className="card">
        <h2>The letter</h2>
        <p className="font-semibold">{letter.subject}</p>
        <pre className="whitespace-pre-wrap font-sans text-sm">{letter.body}</pre>
      </section>
    </div>
  );
}
