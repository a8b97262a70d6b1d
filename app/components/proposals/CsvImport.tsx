import { useEffect, useRef, useState } from "react";
import { useActionData, useFetcher } from "react-router";
import { issueLine, valueText } from "~/lib/forms";
import { CSV_COLUMNS, CSV_UPLOAD_MAX_BYTES } from "~/lib/proposals/target-csv";
import type { TargetActionResult } from "./target-results";

/** Targets pasted or read from a CSV file; the refused rows come back in the box to fix. */
export function CsvImport() {
  const fetcher = useFetcher<TargetActionResult>();
  const pageAnswer = useActionData<TargetActionResult>();
  const answer = fetcher.data ?? pageAnswer;
  const initial = answer?.intent === "import" ? (answer.ok ? (answer.remaining ?? "") : (valueText(answer.values, "csv") ?? "")) : "";
  const [text, setText] = useState(initial);
  const [fileNote, setFileNote] = useState<string | null>(null);
  const fileRef = useRef<HTMLInputElement>(null);
  const result = answer?.intent === "import" ? answer : undefined;
  useEffect(() => {
    if (fetcher.state !== "idle" || !result) return;
    if (result.ok) setText(result.remaining ?? "");
  }, [result, fetcher.state]);
  const error = result && !result.ok ? (result.errors.csv ?? result.errors.form) : undefined;
  const report = result?.ok ? result.report : null;
  const refused = report ? report.rows.filter((r) => !r.ok) : [];
  return (
    <section className="card space-y-3" aria-labelledby="csv-title">
      <h2 id="csv-title">Import targets from CSV</h2>
      <p className="text-sm text-slate-600">
        A header row with the columns <code>{CSV_COLUMNS.join(", ")}</code> (name, ra and dec required; the others may be empty), then one row per target. RA and Dec
        sexagesimal (05:12:33.4, +21:04:12) or in degrees; proper motions in mas/yr (μα* includes cos δ). Rows with problems are listed and kept below to fix and import again; duplicates (same name, or within 1″) are refused.
      </p>
      <fetcher.Form method="post" encType="multipart/form-data" noValidate className="space-y-3">
        <input type="hidden" name="intent" value="import" />
        <div>
          <label htmlFor="csv">CSV text</label>
          <textarea
            id="csv"
            name="csv"
            rows={8}
            spellCheck={false}
            className="input font-mono text-sm"
            placeholder={"name,ra,dec,pmra,pmdec,mag_V,mag_R\nField star 1,05:12:33.4,+21:04:12,1.2,-3.4,15.2,14.8"}
            value={text}
            onChange={(e) => setText(e.target.value)}
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? "csv-error" : undefined}
          />
          {error ? <p id="csv-error" className="field-error" role="alert">{error}</p> : null}
        </div>
        <div className="flex flex-wrap items-center gap-3">
          <label htmlFor="csv-file" className="btn-quiet">Choose a CSV file…</label>
          <input
            id="csv-file"
            ref={fileRef}
            type="file"
            accept=".csv,text/csv,text/plain"
            className="sr-only"
            onChange={async (e) => {
              const f = e.target.files?.[0];
              if (!f) return;
              if (f.size > CSV_UPLOAD_MAX_BYTES) {
                setFileNote(`${f.name} is larger than 2 MB; split it.`);
                return;
              }
              setText(await f.text());
              setFileNote(`Read ${f.name}; check it below, then import.`);
              if (fileRef.current) fileRef.current.value = "";
            }}
          />
          {fileNote ? <span className="text-sm text-slate-600">{fileNote}</span> : null}
          <button type="submit" className="btn ml-auto" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Importing…" : "Import"}</button>
        </div>
      </fetcher.Form>
      {report ? (
        <div className="space-y-2" role="status">
          <p className="text-sm">
            <strong className="text-emerald-800">{result?.ok ? result.saved : 0} accepted and saved</strong>
            {refused.length ? <>, <strong className="text-red-800">{refused.length} refused</strong> (kept in the box above to fix and import again)</> : ", none refused"}.
          </p>
          <div className="overflow-x-auto rounded-md border border-slate-200">
            <table className="table-base" aria-label="Import report">
              <thead><tr><th>Line</th><th>Row</th><th>Result</th></tr></thead>
              <tbody>
                {report.rows.map((r) => (
                  <tr key={r.line} className={r.ok ? "" : "bg-red-50/60"}>
                    <td className="tabular-nums">{r.line}</td>
                    <td className="font-mono text-xs break-all">{r.text}</td>
                    <td>
                      {r.ok ? (
                        <span className="text-emerald-800">accepted</span>
                      ) : (
                        <ul className="text-red-800">
                          {r.problems.map((p, i) => <li key={i}>{issueLine(p.field, p.message)}</li>)}
                        </ul>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </div>
      ) : null}
    </section>
  );
}
