// Pieces of the feasibility sheet that other screens reuse (the observations tab shows the
// problems and totals live). Only types come from ~/lib/proposals/feasibility: nothing server-side here.
//
// Live use (agreed with the workspace's observations tab): `useLiveFeasibility(proposalId, key)`
// loads GET /api/v1/proposals/:id, whose JSON carries the sheet as `feasibilitySheet`, and loads it
// again whenever `key` changes (e.g. the observation's saved version), without a page reload.
import { useEffect } from "react";
import { useFetcher } from "react-router";
import { hours } from "~/lib/format";
import type { FeasibilitySheet, Problem } from "~/lib/proposals/feasibility";

export function ProblemsList({ problems, empty = "No problems found: nothing blocks this proposal." }: { problems: Problem[]; empty?: string }) {
  const blocking = problems.filter((p) => p.severity === "blocking");
  const warnings = problems.filter((p) => p.severity === "warning");
  if (!problems.length) {
    return (
      <p role="status" className="rounded-md border border-emerald-200 bg-emerald-50 px-4 py-2 text-sm text-emerald-900">
        {empty}
      </p>
    );
  }
  return (
    <div className="space-y-2" aria-label="Problems">
      {blocking.length ? (
        <div role="alert" className="rounded-md border border-red-300 bg-red-50 px-4 py-3 text-sm text-red-900">
          <p className="font-semibold">
            {blocking.length} blocking problem{blocking.length === 1 ? "" : "s"}: the proposal cannot be submitted until {blocking.length === 1 ? "it is" : "they are"} fixed.
          </p>
          <ul className="mt-1 list-disc space-y-0.5 pl-5">
            {blocking.map((p, i) => (
              <li key={i}>{p.message}</li>
            ))}
          </ul>
        </div>
      ) : null}
      {warnings.length ? (
        <div className="rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-sm text-amber-900">
          <p className="font-semibold">
            {warnings.length} warning{warnings.length === 1 ? "" : "s"} to read (they do not stop a submission)
          </p>
          <ul className="mt-1 list-disc space-y-0.5 pl-5">
            {warnings.map((p, i) => (
              <li key={i}>{p.message}</li>
            ))}
          </ul>
        </div>
      ) : null}
    </div>
  );
}

export function TotalsTable({ sheet }: { sheet: Pick<FeasibilitySheet, "totals" | "requestedHours" | "semesterCode" | "requestedHoursBySemester"> }) {
  const bySemester = sheet.requestedHoursBySemester ?? [{ semesterCode: sheet.semesterCode, hours: sheet.requestedHours, callSemester: true }];
  if (!sheet.totals.length) return <p className="text-sm text-slate-600">No time requested yet.</p>;
  return (
    <table className="table-base">
      <thead>
        <tr>
          <th>Semester</th>
          <th>Telescope</th>
          <th>Moon category</th>
          <th className="text-right">Requested</th>
          <th className="text-right">Offered in the call</th>
        </tr>
      </thead>
      <tbody>
        {sheet.totals.map((t) => (
          <tr key={`${t.semesterCode}-${t.telescopeId}-${t.moonCategory}`}>
            <td>{t.semesterCode}</td>
            <td>{t.telescopeName}</td>
            <td>{t.moonCategory}</td>
            <td className="text-right">{hours(t.hours, 2)}</td>
            <td className="text-right">{t.offeredHours === null ? (t.semesterCode === sheet.semesterCode ? "—" : "later call") : hours(t.offeredHours, 0)}</td>
          </tr>
        ))}
      </tbody>
      <tfoot>
        {bySemester.map((s) => (
          <tr key={s.semesterCode}>
            <td colSpan={3} className="px-3 py-2 font-semibold">
              {s.callSemester ? `Requested in ${s.semesterCode}, the call's semester` : `Requested in ${s.semesterCode}, a later semester`}
            </td>
            <td className="px-3 py-2 text-right font-semibold">{hours(s.hours, 2)}</td>
            <td />
          </tr>
        ))}
        {bySemester.length > 1 ? (
          <tr>
            <td colSpan={3} className="px-3 py-2 text-slate-600">All semesters together</td>
            <td className="px-3 py-2 text-right text-slate-600">{hours(sheet.requestedHours, 2)}</td>
            <td />
          </tr>
        ) : null}
      </tfoot>
    </table>
  );
}

/** The sheet from the JSON API, re-fetched whenever `key` changes. */
export function useLiveFeasibility(proposalId: number, key: unknown) {
  const fetcher = useFetcher<{ feasibilitySheet?: FeasibilitySheet | null; feasibilityError?: string }>();
  const { load } = fetcher;
  useEffect(() => {
    load(`/api/v1/proposals/${proposalId}`);
  }, [proposalId, key, load]);
  return { sheet: fetcher.data?.feasibilitySheet ?? null, error: fetcher.data?.feasibilityError ?? null, loading: fetcher.state !== "idle" };
}

/** Problems and totals, kept current from the API: for the observations tab. */
export function LiveFeasibilitySummary({ proposalId, revision }: { proposalId: number; revision: unknown }) {
  const { sheet, error, loading } = useLiveFeasibility(proposalId, revision);
  return (
    <section aria-label="Feasibility sheet summary" aria-busy={loading} className="space-y-3">
      <div className="flex items-baseline justify-between gap-4">
        <h2>Feasibility sheet</h2>
        <span className="text-xs text-slate-500" aria-live="polite">
          {loading ? "updating…" : sheet ? `computed ${sheet.computedAt.slice(11, 19)} UTC` : ""}
        </span>
      </div>
      {sheet ? (
        <>
          <ProblemsList problems={sheet.problems} />
          <TotalsTable sheet={sheet} />
        </>
      ) : (
        <p className="text-sm text-slate-600">{loading ? "Computing…" : (error ?? "Not available.")}</p>
      )}
    </section>
  );
}
