import { useEffect, useState } from "react";
import { data, Link, useActionData, useFetcher } from "react-router";
import { ErrorPage } from "~/components/ErrorPage";
import { astrometryProgrammes, importNightLog, requireEpochOffice } from "~/lib/epochs/epochs.server";
import { NIGHT_LOG_COLUMNS, refusedNightLogText } from "~/lib/epochs/night-log-csv";
import { issueLine, readForm } from "~/lib/forms";
import type { Route } from "./+types/admin.epochs._index";

export function meta() {
  return [{ title: "Epoch log · Office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireEpochOffice(request);
  return { programmes: await astrometryProgrammes() };
}

const MAX_UPLOAD_BYTES = 2 * 1024 * 1024;

export async function action({ request }: Route.ActionArgs) {
  const user = await requireEpochOffice(request);
  const form = await readForm(request);
  const csv = form.get("csv");
  if (form.get("intent") !== "night-log") return data({ ok: false as const, errors: { form: "Choose what to do: intent must be night-log." }, csv: "" }, { status: 400 });
  if (typeof csv !== "string" || csv.trim() === "") return data({ ok: false as const, errors: { csv: "Paste the night log (a header row and one row per epoch)." }, csv: "" }, { status: 400 });
  if (new TextEncoder().encode(csv).byteLength > MAX_UPLOAD_BYTES) return data({ ok: false as const, errors: { csv: "The night log is larger than 2 MB; split it." }, csv: "" }, { status: 400 });
  const { report, saved } = await importNightLog({ user, csv });
  if (report.error) return data({ ok: false as const, errors: { csv: report.error }, csv }, { status: 400 });
  return { ok: true as const, saved, report, remaining: refusedNightLogText(report), errors: {} as Record<string, string>, csv };
}

export default function OfficeEpochs({ loaderData }: Route.ComponentProps) {
  const { programmes } = loaderData;
  return (
    <div className="space-y-4">
      <p className="text-sm"><Link to="/admin">Office</Link> › Epoch log</p>
      <h1>Epoch log</h1>
      <p className="text-slate-700">Accepted astrometry programmes: record each executed or lost epoch on the programme's page, or many at once from the night log below.</p>
      <table className="table-base" aria-label="Astrometry programmes">
        <thead><tr><th>Programme</th><th>Title</th><th>Call</th><th>Targets</th><th>Executed</th><th>Lost</th><th>Still planned</th></tr></thead>
        <tbody>
          {programmes.map((p) => (
            <tr key={p.proposalId}>
              <td><Link to={`/admin/epochs/${p.proposalId}`}>{p.code}</Link></td>
              <td>{p.title}</td>
              <td>{p.semesterCode}</td>
              <td>{p.observations.map((o) => o.targetName).join(", ")}</td>
              <td className="tabular-nums">{p.executed}</td>
              <td className="tabular-nums">{p.lost}</td>
              <td className="tabular-nums">{p.remaining}</td>
            </tr>
          ))}
          {programmes.length === 0 ? <tr><td colSpan={7}>No accepted programme has an astrometric observation.</td></tr> : null}
        </tbody>
      </table>
      <NightLogImport />
    </div>
  );
}

function NightLogImport() {
  const fetcher = useFetcher<typeof action>();
  const pageAnswer = useActionData<typeof action>();
  const answer = fetcher.data ?? pageAnswer;
  // after a plain form post (no script yet) the page comes back with the refused rows in the box
  const [text, setText] = useState(answer ? (answer.ok ? answer.remaining : answer.csv) : "");
  useEffect(() => {
    if (fetcher.state === "idle" && answer?.ok) setText(answer.remaining);
  }, [answer, fetcher.state]);
  const errors = (answer && !answer.ok ? answer.errors : {}) as Record<string, string | undefined>;
  const error = errors.csv ?? errors.form;
  const report = answer?.ok ? answer.report : null;
  const refused = report ? report.rows.filter((r) => !r.ok) : [];
  return (
    <section className="card space-y-3" aria-labelledby="night-log-title">
      <h2 id="night-log-title">Import a night log (CSV)</h2>
      <p className="text-sm text-slate-600">
        A header row with <code>{NIGHT_LOG_COLUMNS.join(", ")}</code>, then one row per epoch. <code>proposal</code> is the programme's code; <code>target</code> may be empty when it has one
        astrometric target; <code>observed_at</code> in UTC (2026-11-03T02:41); <code>telescope</code> by name; <code>precision_mas</code> as measured, or <code>fwhm</code> (″) and <code>snr</code> (per frame) to derive it;
        <code>lost</code> is weather or technical for a lost epoch. Refused rows are listed and kept in the box to fix and import again.
      </p>
      <fetcher.Form method="post" noValidate className="space-y-3">
        <input type="hidden" name="intent" value="night-log" />
        <div>
          <label htmlFor="night-log">Night log</label>
          <textarea
            id="night-log"
            name="csv"
            rows={8}
            spellCheck={false}
            className="input font-mono text-sm"
            placeholder={"proposal,target,observed_at,telescope,frames,fwhm,snr,precision_mas,lost,note\n004/26B,,2026-11-03T02:41,KRO 2.4 m,5,1.1,140,,,"}
            value={text}
            onChange={(e) => setText(e.target.value)}
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? "night-log-error" : undefined}
          />
          {error ? <p id="night-log-error" className="field-error" role="alert">{error}</p> : null}
        </div>
        <button type="submit" className="btn" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Importing…" : "Import the night log"}</button>
      </fetcher.Form>
      {report ? (
        <div className="space-y-2" role="status">
          <p className="text-sm">
            <strong className="text-emerald-800">{answer?.ok ? answer.saved : 0} recorded</strong>
            {refused.length ? <>, <strong className="text-red-800">{refused.length} refused</strong> (kept in the box above)</> : ", none refused"}.
          </p>
          <table className="table-base" aria-label="Night log report">
            <thead><tr><th>Line</th><th>Row</th><th>Result</th></tr></thead>
            <tbody>
              {report.rows.map((r) => (
                <tr key={r.line} className={r.ok ? "" : "bg-red-50/60"}>
                  <td className="tabular-nums">{r.line}</td>
                  <td className="font-mono text-xs break-all">{r.text}</td>
                  <td>{r.ok ? <span className="text-emerald-800">recorded</span> : <ul className="text-red-800">{r.problems.map((p, i) => <li key={i}>{issueLine(p.field, p.message)}</li>)}</ul>}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </section>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
