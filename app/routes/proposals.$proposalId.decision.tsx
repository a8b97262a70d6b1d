import { utc } from "~/components/workspace";
import { requireUser } from "~/lib/auth.server";
import { decisionForUser } from "~/lib/decisions/decisions.server";
import { chargesText } from "~/lib/decisions/template";
import { outcomeLabels } from "~/lib/decisions/vocabulary";
import { proposalIdParam } from "~/lib/proposal-routes.server";
import type { Route } from "./+types/proposals.$proposalId.decision";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { letter } = await decisionForUser({ user, proposalId });
  return { proposalId, letter };
}

const moonWords = { dark: "dark", grey: "grey", bright: "bright" } as const;

export default function Decision({ loaderData }: Route.ComponentProps) {
  const { letter, proposalId } = loaderData;
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
                <tr key={i}><td>{h.telescope}</td><td>{moonWords[h.moonCategory]}</td><td>{h.semesterCode}</td><td className="text-right tabular-nums">{h.hours.toFixed(1)}</td></tr>
              ))}
            </tbody>
          </table>
        ) : null}
        <p className="text-sm"><span className="font-semibold">Charges due: </span>{f.charge ? chargesText(f) : "nothing."}</p>
      </section>
      <section className="card space-y-3">
        <h2>Reviewers' comments</h2>
        {f.comments.length === 0 ? <p className="text-slate-600">The reviewers left no comments for the PI.</p> : null}
        {f.comments.map((c) => (
          <div key={c.label}>
            <h3 className="text-sm font-semibold">{c.label}</h3>
            <p className="whitespace-pre-wrap text-sm">{c.text}</p>
          </div>
        ))}
      </section>
      <section className="card">
        <h2>The letter</h2>
        <p className="font-semibold">{letter.subject}</p>
        <pre className="whitespace-pre-wrap font-sans text-sm">{letter.body}</pre>
      </section>
    </div>
  );
}
