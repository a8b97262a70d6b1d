import { Form, Link, useActionData, useNavigation } from "react-router";
import { z } from "zod";
import { EpochViews, PrecisionSummary } from "~/components/epochs/EpochProgressView";
import { ErrorPage } from "~/components/ErrorPage";
import { requireUser } from "~/lib/auth/auth.server";
import { acceptReplan, epochProgress, telescopeChoices } from "~/lib/epochs/epochs.server";
import { replanAcceptSchema } from "~/lib/epochs/schema";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { fixed } from "~/lib/format";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/proposals.$proposalId.epochs";

export function meta() {
  return [{ title: "Epoch progress · Nightshare" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await orNotFound(getProposalForUser({ proposalId, user }));
  const obs = new URL(request.url).searchParams.get("obs");
  const [progress, telescopes] = await orNotFound(Promise.all([epochProgress({ proposalId }), telescopeChoices()]));
  const selected = progress.observations.find((o) => String(o.observationId) === obs) ?? progress.observations[0] ?? null;
  return { progress, telescopes, selectedId: selected?.observationId ?? null, isPi: access.isPi, accepted: access.proposal.status === "accepted" };
}

const epochIntents = z.discriminatedUnion("intent", [intent("accept-replan", replanAcceptSchema)]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user }));
  return formAction(request, epochIntents, async (input) => {
    const { replaced } = await acceptReplan({ user, proposalId, observationId: input.observationId, dates: input.dates.split(",") });
    return { ok: true as const, intent: input.intent, message: `Re-plan accepted: the remaining planned epochs are now ${replaced} new dates.` };
  });
}

export default function EpochProgressPage({ loaderData }: Route.ComponentProps) {
  const { progress, telescopes, selectedId, isPi, accepted } = loaderData;
  const answer = useActionData<typeof action>();
  const busy = useNavigation().state !== "idle";
  const o = progress.observations.find((x) => x.observationId === selectedId) ?? null;
  const telescopeName = (id: number) => telescopes.find((t) => t.id === id)?.name ?? `telescope ${id}`;
  if (!o) {
    return (
      <section className="card space-y-2">
        <h2>Epoch progress</h2>
        <p className="text-slate-700">This proposal has no astrometric observation (one with a baseline), so there are no epochs to follow.</p>
      </section>
    );
  }
  const lost = progress.executed.filter((e) => e.observationId === o.observationId && e.lost).length;
  const done = progress.executed.filter((e) => e.observationId === o.observationId && !e.lost).length;
  const remaining = progress.planned.filter((e) => e.observationId === o.observationId);
  return (
    <div className="space-y-4">
      <section className="card space-y-3">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2>Epoch progress · {o.targetName}</h2>
          {progress.observations.length > 1 ? (
            <nav className="flex gap-3 text-sm" aria-label="Observations">
              {progress.observations.map((x) => (
                <Link key={x.observationId} to={`?obs=${x.observationId}`} aria-current={x.observationId === o.observationId ? "page" : undefined}>{x.targetName}</Link>
              ))}
            </nav>
          ) : null}
        </div>
        <p className="text-sm text-slate-700" data-testid="epoch-counts">
          {done} executed, {lost} lost, {remaining.length} still planned. The precision so far is the five-parameter fit's covariance over the executed epochs' times and measured precisions;
          the projection adds the remaining planned epochs at the per-epoch precision of the feasibility sheet.
        </p>
        <PrecisionSummary o={o} />
      </section>
      {answer?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900">{answer.message}</p> : null}
      {answer && !answer.ok ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800">{Object.values(answer.errors)[0]}</p> : null}
      {o.replan ? (
        <section className="card space-y-2" aria-labelledby="replan-title">
          <h3 id="replan-title">Re-plan of the remaining epochs</h3>
          <p className="text-sm text-slate-700">
            The planner places the {remaining.length} remaining epochs again, from tomorrow on, in the same semesters, with the executed epochs fixed in the fit; nights must be observable in the dark above airmass limit.
          </p>
          {o.replan.message ? <p className="text-sm text-amber-800">{o.replan.message}</p> : null}
          {o.replan.dates.length ? (
            <>
              <table className="table-base" aria-label="Re-plan">
                <thead><tr><th>Now planned</th><th>Re-plan</th><th>Semester</th><th>f(α*)</th><th>f(δ)</th></tr></thead>
                <tbody>
                  {o.replan.dates.map((d, i) => (
                    <tr key={d.date}>
                      <td className="tabular-nums">{remaining[i]?.date ?? "—"}</td>
                      <td className="tabular-nums">{d.date}</td>
                      <td>{d.semesterCode}</td>
                      <td className="tabular-nums">{d.parallaxFactors.ra.toFixed(3)}</td>
                      <td className="tabular-nums">{d.parallaxFactors.dec.toFixed(3)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="text-sm tabular-nums" data-testid="replan-projected">
                With the re-plan: σ(μα*) {fixed(o.replanProjected?.properMotionPrecisionMasPerYr?.ra, 3)}, σ(μδ) {fixed(o.replanProjected?.properMotionPrecisionMasPerYr?.dec, 3)} mas/yr, σ(ϖ) {fixed(o.replanProjected?.parallaxPrecisionMas, 3)} mas
                (now planned: σ(μα*) {fixed(o.projected.properMotionPrecisionMasPerYr?.ra, 3)}, σ(μδ) {fixed(o.projected.properMotionPrecisionMasPerYr?.dec, 3)} mas/yr).
              </p>
              {isPi && accepted ? (
                <Form method="post">
                  <input type="hidden" name="intent" value="accept-replan" />
                  <input type="hidden" name="observationId" value={o.observationId} />
                  <input type="hidden" name="dates" value={o.replan.dates.map((d) => d.date).join(",")} />
                  <button type="submit" className="btn" disabled={busy}>{busy ? "Accepting…" : "Accept the re-plan"}</button>
                </Form>
              ) : (
                <p className="text-sm text-slate-600">{accepted ? "Only the PI can accept the re-plan." : "Re-plans are for accepted programmes."}</p>
              )}
            </>
          ) : null}
        </section>
      ) : null}
      <EpochViews progress={progress} o={o} telescopeName={telescopeName} />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
