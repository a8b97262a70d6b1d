// The semester check on the ranking board: realisations and seed, Run (POST to the API), a
// progress bar fed by polling GET /api/v1/semester-checks/:id every 500 ms, then the result per
// programme and per telescope, and a banner when the inputs changed since the run shown.
import { useEffect, useRef, useState } from "react";
import { useRevalidator } from "react-router";
import { Field, inputProps } from "~/components/Field";
import type { SemesterCheckView } from "~/lib/allocation/semester-check.server";
import { fixed, NONE, percent } from "~/lib/format";

const FLAG_TEXT = { "assured-below-goal": "assured below 90 %", "queue-below-goal": "queue below 50 %" } as const;

/** A typed number as the API expects it; anything else goes as typed, for the server to name. */
const asNumber = (text: string) => (text.trim() === "" ? undefined : /^-?\d+(\.\d+)?$/.test(text.trim()) ? Number(text) : text);

export function SemesterCheck({ callId, latest }: { callId: number; latest: SemesterCheckView | null }) {
  const [realisations, setRealisations] = useState(String(latest?.realisations ?? 200));
  const [seed, setSeed] = useState(String(latest?.seed ?? 1));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [job, setJob] = useState<SemesterCheckView | null>(latest && (latest.status === "queued" || latest.status === "running") ? latest : null);
  const [starting, setStarting] = useState(false);
  const revalidator = useRevalidator();
  const revalidate = useRef(revalidator.revalidate);
  revalidate.current = revalidator.revalidate;

  const jobId = job && (job.status === "queued" || job.status === "running") ? job.id : null;
  useEffect(() => {
    if (jobId === null) return;
    let stop = false;
    const timer = setInterval(async () => {
      try {
        const res = await fetch(`/api/v1/semester-checks/${jobId}`, { headers: { Accept: "application/json" } });
        if (!res.ok || stop) return;
        const next = (await res.json()) as SemesterCheckView;
        setJob(next);
        if (next.status === "done" || next.status === "failed") void revalidate.current();
      } catch {
        // the next tick tries again
      }
    }, 500);
    return () => {
      stop = true;
      clearInterval(timer);
    };
  }, [jobId]);

  async function run(event: React.FormEvent) {
    event.preventDefault();
    setErrors({});
    setStarting(true);
    try {
      const body = { realisations: asNumber(realisations), seed: asNumber(seed) };
      const res = await fetch(`/api/v1/calls/${callId}/semester-check`, { method: "POST", headers: { "Content-Type": "application/json", Accept: "application/json" }, body: JSON.stringify(body) });
      const answer = await res.json().catch(() => ({}));
      if (res.status !== 202) {
        const found: Record<string, string> = {};
        for (const issue of (answer.issues ?? []) as { path: string; message: string }[]) found[issue.path === "realisations" || issue.path === "seed" ? issue.path : "form"] ??= issue.message;
        if (!Object.keys(found).length) found.form = answer.error ?? `The check could not start (${res.status}).`;
        setErrors(found);
        return;
      }
      setJob({ id: answer.id, callId, status: "queued", progress: 0, seed: Number(body.seed ?? 1), realisations: Number(body.realisations ?? 200), stale: false, createdAt: new Date().toISOString(), finishedAt: null, error: null, result: null });
    } catch {
      setErrors({ form: "The server could not be reached; try again." });
    } finally {
      setStarting(false);
    }
  }

  const runningNow = jobId !== null;
  // what the page shows: the run just finished (until the loader has it), else the loader's latest
  const shown = job && !runningNow && (!latest || job.id > latest.id || job.id === latest.id) ? (latest?.id === job.id ? latest : job) : latest;
  const result = shown?.status === "done" ? shown.result : null;
  const telescopeName = (id: number) => result?.telescopes.find((t) => t.telescopeId === id)?.name ?? `telescope ${id}`;

  return (
    <section className="card space-y-3" aria-labelledby="semester-check-heading">
      <h2 id="semester-check-heading">Semester check</h2>
      <p className="text-sm text-slate-700">
        The allocated programmes scheduled night by night into {"the semester's"} nights under weather: each night clear or lost with the {"telescope's"} clear fraction for its month, over many realisations. The same seed gives the same answer.
      </p>
      <form className="flex flex-wrap items-end gap-3" onSubmit={run} noValidate>
        <Field label="Realisations (1–1000)" id="checkRealisations" error={errors.realisations}>
          <input {...inputProps("checkRealisations", errors.realisations)} inputMode="numeric" className="input w-28" value={realisations} onChange={(e) => setRealisations(e.target.value)} />
        </Field>
        <Field label="Seed" id="checkSeed" error={errors.seed}>
          <input {...inputProps("checkSeed", errors.seed)} inputMode="numeric" className="input w-36" value={seed} onChange={(e) => setSeed(e.target.value)} />
        </Field>
        <button className="btn" disabled={starting || runningNow}>{runningNow ? "Running…" : "Run the semester check"}</button>
      </form>
      {errors.form ? <p role="alert" className="field-error">{errors.form}</p> : null}
      {runningNow && job ? (
        <div className="space-y-1">
          <div className="text-sm text-slate-700">{job.status === "queued" ? "Waiting for the check's worker…" : `Running ${job.realisations} realisations (seed ${job.seed})…`} {percent(job.progress)}</div>
          <div role="progressbar" aria-label="Semester check progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(job.progress * 100)} className="h-3 w-full rounded bg-slate-100">
            <div className="h-3 rounded bg-sky-600 transition-all" style={{ width: `${Math.round(job.progress * 100)}%` }} />
          </div>
        </div>
      ) : null}
      {shown?.status === "failed" ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800">The last check failed: {shown.error}</p> : null}
      {shown?.stale ? (
        <p role="status" className="rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-amber-900">
          Stale — inputs changed since this run (hours, tiers, ranks, clear fractions or observations). Run the check again before locking.
        </p>
      ) : null}
      {result ? (
        <div className="space-y-3">
          <p className="text-sm text-slate-700">
            Run of {shown!.finishedAt ? `${shown!.finishedAt.slice(0, 16).replace("T", " ")} UTC` : NONE}: {result.realisations} realisations, seed {result.seed}. Flags: assured below {result.goals.assured * 100} % completion, queue below {result.goals.queue * 100} %.
          </p>
          {result.notes.length ? <ul className="list-disc pl-5 text-sm text-amber-900">{result.notes.map((n) => <li key={n}>{n}</li>)}</ul> : null}
          <div className="overflow-x-auto">
            <table className="table-base" aria-label="Semester check per programme">
              <thead>
                <tr><th>Code</th><th>Title</th><th>Tier</th><th>Allocated h</th><th>Visits</th><th>Completes</th><th>Hours executed</th><th>Epochs</th><th>PM precision (mas/yr): expected / required</th><th>Flag</th></tr>
              </thead>
              <tbody>
                {result.programmes.map((p) => (
                  <tr key={p.proposalId} data-testid={`check-${p.proposalId}`}>
                    <td>{p.code ?? NONE}</td>
                    <td>
                      {p.title}
                      {p.notes.length ? <ul className="mt-1 text-xs text-slate-600">{p.notes.map((n) => <li key={n}>{n}</li>)}</ul> : null}
                    </td>
                    <td>{p.tier}</td>
                    <td>{fixed(p.allocatedHours, 1)}</td>
                    <td>{p.plannedVisits === p.wantedVisits ? p.plannedVisits : `${p.plannedVisits} of ${p.wantedVisits}`}</td>
                    <td data-testid="completion">{percent(p.completionProbability)}</td>
                    <td>{fixed(p.expectedExecutedHours, 1)} h ({percent(p.expectedExecutedFraction)})</td>
                    <td>{p.epochs ? `${fixed(p.epochs.expectedAchieved, 1)} of ${p.epochs.planned}${p.epochs.planned < p.epochs.wanted ? ` (${p.epochs.wanted} wanted)` : ""}` : NONE}</td>
                    <td>
                      {p.astrometry.length === 0
                        ? NONE
                        : p.astrometry.map((a) => (
                            <div key={a.observationId}>
                              {fixed(a.expectedPmPrecisionMasPerYr, 3)} / {fixed(a.requiredPmPrecisionMasPerYr, 3)}
                              {a.probabilityMet !== null ? <span className="text-xs text-slate-600"> (met in {percent(a.probabilityMet)})</span> : null}
                            </div>
                          ))}
                    </td>
                    <td>{p.flag ? <span className="rounded bg-red-100 px-1.5 py-0.5 text-red-900">{FLAG_TEXT[p.flag]}</span> : NONE}</td>
                  </tr>
                ))}
                {result.programmes.length === 0 ? <tr><td colSpan={10}>No programme has a tier yet: fill by rank or set tiers first.</td></tr> : null}
              </tbody>
            </table>
          </div>
          <table className="table-base" aria-label="Semester check per telescope">
            <thead><tr><th>Telescope</th><th>Nights</th><th>Dark h</th><th>Clear dark h (expected)</th><th>Used h (expected)</th><th>Use of dark time</th><th>Use of clear dark time</th></tr></thead>
            <tbody>
              {result.telescopes.map((t) => (
                <tr key={t.telescopeId}>
                  <td>{telescopeName(t.telescopeId)}</td>
                  <td>{t.nights}</td>
                  <td>{fixed(t.darkHours, 1)}</td>
                  <td>{fixed(t.expectedClearDarkHours, 1)}</td>
                  <td>{fixed(t.expectedUsedHours, 1)}</td>
                  <td>{percent(t.expectedUseOfDark, 1)}</td>
                  <td>{percent(t.expectedUseOfClearDark, 1)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <details className="text-sm text-slate-700">
            <summary>How the check schedules</summary>
            <ul className="list-disc pl-5">{result.rules.map((r) => <li key={r}>{r}</li>)}</ul>
          </details>
        </div>
      ) : !runningNow && !shown ? (
        <p className="text-sm text-slate-700">No check has run for this call yet.</p>
      ) : null}
    </section>
  );
}
