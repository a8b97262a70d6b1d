// The office's night-log import (/admin/epochs): a CSV pasted in, a report per row, the refused rows kept in the box.
import { useEffect, useState } from "react";
import { useActionData, useFetcher } from "react-router";
import { CsvReportTable } from "~/components/CsvReportTable";
import { CsvTextBox } from "~/components/CsvTextBox";
import { NIGHT_LOG_COLUMNS, NIGHT_LOG_MAX_BYTES, type NightLogReport } from "~/lib/epochs/night-log-csv";
import { valueText, type ActionFailure, type FieldErrors } from "~/lib/forms";

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
        <code>lost</code> is weather or technical for a lost epoch. Paste it or choose the file. Refused rows are listed and kept in the box to fix and import again.
      </p>
      <fetcher.Form method="post" noValidate className="space-y-3">
        <input type="hidden" name="intent" value="night-log" />
        <CsvTextBox
          id="night-log"
          label="Night log"
          placeholder={"proposal,target,observed_at,telescope,frames,fwhm,snr,precision_mas,lost,note\n004/26B,,2026-11-03T02:41,KRO 2.4 m,5,1.1,140,,,"}
          value={text}
          onChange={setText}
          error={error}
          maxBytes={NIGHT_LOG_MAX_BYTES}
        >
          <button type="submit" className="btn ml-auto" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Importing…" : "Import the night log"}</button>
        </CsvTextBox>
      </fetcher.Form>
      {report ? (
        <div className="space-y-2" role="status">
          <p className="text-sm">
            <strong className="text-emerald-800">{answer?.ok ? answer.saved : 0} recorded</strong>
            {refused.length ? <>, <strong className="text-red-800">{refused.length} refused</strong> (kept in the box above)</> : ", none refused"}.
          </p>
          <CsvReportTable label="Night log report" rows={report.rows} done="recorded" />
        </div>
      ) : null}
    </section>
  );
}

