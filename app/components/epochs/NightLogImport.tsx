// The office's night-log import (/admin/epochs): a CSV pasted in, a report per row, the refused rows kept in the box.
import { useEffect, useState } from "react";
import { useActionData, useFetcher } from "react-router";
import { NIGHT_LOG_COLUMNS, type NightLogReport } from "~/lib/epochs/night-log-csv";
import { issueLine, valueText, type ActionFailure, type FieldErrors } from "~/lib/forms";

/** What the page's action answers: the report and the refused rows' text, or a refusal of the whole log. */
export type NightLogAnswer = ActionFailure | { ok: true; intent: "night-log"; saved: number; report: NightLogReport; remaining: string };

export function NightLogImport() {
  const fetcher = useFetcher<NightLogAnswer>();
  const pageAnswer = useActionData<NightLogAnswer>();
  const answer = fetcher.data ?? pageAnswer;
  // after a plain form post (no script yet) the page comes back with the refused rows in the box
  const [text, setText] = useState(answer ? (answer.ok ? answer.remaining : (valueText(answer.values, "csv") ?? "")) : "");
  useEffect(() => {
    if (fetcher.state === "idle" && answer?.ok) setText(answer.remaining);
  }, [answer, fetcher.state]);
  const errors: FieldErrors = answer && !answer.ok ? answer.errors : {};
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

