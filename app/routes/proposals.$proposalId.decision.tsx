import { z } from "zod";
import { RateComment } from "~/components/decisions/RateComment";
import { formatUtc as utc } from "~/lib/format";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { decisionForUser } from "~/lib/decisions/decisions.server";
import { chargesText } from "~/lib/decisions/template";
import { outcomeLabels } from "~/lib/decisions/vocabulary";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { myHelpfulness, rateComment } from "~/lib/review/helpfulness.server";
import { helpfulnessSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/proposals.$proposalId.decision";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { letter } = await orNotFound(decisionForUser({ user, proposalId }));
  return { proposalId, letter, helpfulness: letter ? await orNotFound(myHelpfulness({ user, proposalId })) : [] };
}

const decisionIntents = z.discriminatedUnion("intent", [intent("rate", helpfulnessSchema)]);

/** The team rates how helpful each comment was (1–5; anonymous: nobody sees who rated). */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user })); // a stranger gets the 404 before any parsing
  return formAction(
    request,
    decisionIntents,
    async (input) => {
      await rateComment({ user, proposalId, assignmentId: input.assignmentId, rating: input.rating });
      return { ok: true as const, intent: input.intent, assignmentId: input.assignmentId };
    },
    { rowId: "assignmentId" },
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
