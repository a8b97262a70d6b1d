import { useEffect, useState } from "react";
import { useActionData, useFetcher } from "react-router";
import { CsvReportTable } from "~/components/CsvReportTable";
import { CsvTextBox } from "~/components/CsvTextBox";
import { valueText } from "~/lib/forms";
import { CSV_COLUMNS, CSV_UPLOAD_MAX_BYTES } from "~/lib/proposals/target-csv";
import type { TargetActionResult } from "./target-results";

/** Targets pasted or read from a CSV file; the refused rows come back in the box to fix. */
export function CsvImport() {
  const fetcher = useFetcher<TargetActionResult>();
  const pageAnswer = useActionData<TargetActionResult>();
  const answer = fetcher.data ?? pageAnswer;
  const initial = answer?.intent === "import" ? (answer.ok ? (answer.remaining ?? "") : (valueText(answer.values, "csv") ?? "")) : "";
  const [text, setText] = useState(initial);
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
        <CsvTextBox
          id="csv"
          label="CSV text"
          placeholder={"name,ra,dec,pmra,pmdec,mag_V,mag_R\nField star 1,05:12:33.4,+21:04:12,1.2,-3.4,15.2,14.8"}
          value={text}
          onChange={setText}
          error={error}
          maxBytes={CSV_UPLOAD_MAX_BYTES}
        >
          <button type="submit" className="btn ml-auto" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Importing…" : "Import"}</button>
        </CsvTextBox>
      </fetcher.Form>
      {report ? (
        <div className="space-y-2" role="status">
          <p className="text-sm">
            <strong className="text-emerald-800">{result?.ok ? result.saved : 0} accepted and saved</strong>
            {refused.length ? <>, <strong className="text-red-800">{refused.length} refused</strong> (kept in the box above to fix and import again)</> : ", none refused"}.
          </p>
          <CsvReportTable label="Import report" rows={report.rows} done="accepted" />
        </div>
      ) : null}
    </section>
  );
}
