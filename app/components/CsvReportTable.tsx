// The per-row report of a CSV import: each line as sent, and what became of it.
import { issueLine } from "~/lib/forms";
import type { CsvProblem } from "~/lib/proposals/target-csv";

export type ReportRow = { line: number; text: string } & ({ ok: true } | { ok: false; problems: CsvProblem[] });

/** One row per line of the CSV: `done` says what happened to a good row ("accepted", "recorded"), a refused one lists its problems. */
export function CsvReportTable({ label, rows, done }: { label: string; rows: ReportRow[]; done: string }) {
  return (
    <div className="overflow-x-auto rounded-md border border-slate-200">
      <table className="table-base" aria-label={label}>
        <thead><tr><th>Line</th><th>Row</th><th>Result</th></tr></thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.line} className={r.ok ? "" : "bg-red-50/60"}>
              <td className="tabular-nums">{r.line}</td>
              <td className="font-mono text-xs break-all">{r.text}</td>
              <td>
                {r.ok ? (
                  <span className="text-emerald-800">{done}</span>
                ) : (
                  <ul className="text-red-800">
                    {r.problems.map((p, i) => <li key={i}>{issueLine(p.field, p.message, { asWritten: true })}</li>)}
                  </ul>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
