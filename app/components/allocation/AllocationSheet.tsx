import { zodResolver } from "@hookform/resolvers/zod";
import { Fragment, useEffect, useMemo, useState } from "react";
import { get, useForm, useWatch, type Control } from "react-hook-form";
import { useSubmit } from "react-router";
import type { z } from "zod";
import { runningTotals, type CellTotals } from "~/lib/allocation/running-totals";
import type { SheetColumn, SheetRow } from "~/lib/allocation/sheet.server";
import { allocationTiers } from "~/lib/domain";
import { CONFLICT_WITHHELD } from "~/lib/review/vocabulary";
import { NONE } from "~/lib/format";
import { allocationSheetSchema } from "~/lib/schemas/allocation";

type SheetForm = z.input<typeof allocationSheetSchema>;
type SheetOut = z.output<typeof allocationSheetSchema>;
type Settings = { assuredShareLimit: number; fillerMargin: number };

const h = (x: number) => x.toFixed(1);
const moonLabel = (m: string) => m.charAt(0).toUpperCase() + m.slice(1);
const hoursOf = (v: unknown) => {
  const n = typeof v === "number" ? v : Number(String(v ?? "").trim() || 0);
  return Number.isFinite(n) && n > 0 ? n : 0;
};

function defaults(rows: SheetRow[], started: boolean): SheetForm {
  // Before anything is saved the proposal is the requested hours; afterwards, what was saved. A row
  // the chair is conflicted on is sent back as stored (the server refuses any change to it).
  return {
    intent: "save",
    rows: rows.map((r) => {
      const value = (c: SheetRow["cells"][number]) => String(started || r.conflictReason ? c.allocatedHours : c.requestedHours);
      return {
      proposalId: r.proposalId,
      tier: r.tier ?? "",
      waitlisted: r.waitlisted,
      cells: [...r.cells, ...r.laterCells].map((c) => ({ telescopeId: c.telescopeId, moonCategory: c.moonCategory, semesterCode: c.semesterCode, hours: value(c) })),
      };
    }),
  };
}

/** The running totals and warnings, recomputed from what is typed on every change. */
function useTotals(control: Control<SheetForm, unknown, SheetOut>, columns: SheetColumn[], semesterCode: string, settings: Settings) {
  const rows = useWatch({ control, name: "rows" });
  return useMemo(
    () =>
      runningTotals({
        offered: columns.map((c) => ({ telescopeId: c.telescopeId, moonCategory: c.moonCategory, hours: c.offeredHours })),
        assuredShareLimit: settings.assuredShareLimit,
        fillerMargin: settings.fillerMargin,
        rows: (rows ?? []).map((r) => ({
          proposalId: Number(r.proposalId),
          tier: r.tier === "assured" || r.tier === "queue" || r.tier === "filler" ? r.tier : null,
          cells: (r.cells ?? []).filter((c) => c.semesterCode === semesterCode).map((c) => ({ telescopeId: Number(c.telescopeId), moonCategory: c.moonCategory, hours: hoursOf(c.hours) })),
        })),
      }),
    [rows, columns, semesterCode, settings],
  );
}

export function AllocationSheet({
  semesterCode,
  columns,
  rows,
  started,
  locked,
  settings,
  serverErrors,
  busy,
  basedOn,
}: {
  semesterCode: string;
  columns: SheetColumn[];
  rows: SheetRow[];
  started: boolean;
  locked: boolean;
  settings: Settings;
  serverErrors: Record<string, string>;
  busy: boolean;
  /** the allocation's version the page was read at: a save over a newer one is refused */
  basedOn?: number;
}) {
  const submit = useSubmit();
  const initial = useMemo(() => defaults(rows, started), [rows, started]);
  const { register, handleSubmit, control, formState } = useForm<SheetForm, unknown, SheetOut>({
    resolver: zodResolver(allocationSheetSchema),
    defaultValues: initial,
  });
  // the sheet saves through JavaScript (JSON); until the page has hydrated the button waits
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  // the server-rendered page shows the same values before react-hook-form takes the fields over
  const initialHours = (i: number, j: number) => String(initial.rows[i]?.cells?.[j]?.hours ?? "");
  const { cells: totals, warnings } = useTotals(control, columns, semesterCode, settings);
  const error = (path: string): string | undefined => (get(formState.errors, path) as { message?: string } | undefined)?.message ?? serverErrors[path];
  const columnName = (c: { telescopeId: number; moonCategory: string }) => {
    const col = columns.find((x) => x.telescopeId === c.telescopeId && x.moonCategory === c.moonCategory);
    return `${col?.telescopeName ?? `Telescope ${c.telescopeId}`} ${c.moonCategory}`;
  };
  const linesBefore = (i: number) => totals.filter((t) => t.firstRowOver === i);
  const over = (t: CellTotals, i: number) => t.firstRowOver !== null && i >= t.firstRowOver;
  const onSubmit = handleSubmit((values) => submit(basedOn === undefined ? values : { ...values, basedOn }, { method: "post", encType: "application/json" }));

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3" aria-label="Allocation" data-hydrated={hydrated ? "yes" : "no"}>
      {!started ? <p className="text-sm text-slate-700">Nothing is saved yet: the hours shown are each proposal's requested hours. Choose tiers (or fill by rank on the board) and save.</p> : null}
      <div role="status" aria-live="polite" data-testid="allocation-warnings">
        {warnings.length === 0 ? (
          <p className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-sm text-emerald-900">Within limits: assured ≤ {Math.round(settings.assuredShareLimit * 100)} % of offered and all tiers ≤ offered + {Math.round(settings.fillerMargin * 100)} % everywhere.</p>
        ) : (
          <ul className="space-y-1 rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-950">
            {warnings.map((w) => (
              <li key={`${w.telescopeId}-${w.moonCategory}-${w.kind}`}>
                {columnName(w)}:{" "}
                {w.kind === "assured-share"
                  ? `assured ${h(w.hours)} h is more than ${Math.round(settings.assuredShareLimit * 100)} % of offered (${h(w.limit)} h).`
                  : `all tiers ${h(w.hours)} h are more than offered + ${Math.round(settings.fillerMargin * 100)} % (${h(w.limit)} h).`}
              </li>
            ))}
          </ul>
        )}
      </div>
      {serverErrors.form ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800">{serverErrors.form}</p> : null}
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Position</th>
              <th>Proposal</th>
              <th>Tier</th>
              <th>Waitlist</th>
              {columns.map((c) => (
                <th key={`${c.telescopeId}-${c.moonCategory}`} className="text-right">
                  {c.telescopeName} · {moonLabel(c.moonCategory)}
                  <span className="block text-xs font-normal text-slate-600">h in {semesterCode} · running total / {h(c.offeredHours)} offered</span>
                </th>
              ))}
              <th>Later semesters (h)</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((row, i) => (
              <Fragment key={row.proposalId}>
                {linesBefore(i).length ? (
                  <tr data-testid="offered-line">
                    <td colSpan={columns.length + 5} className="border-b-2 border-red-600 bg-red-50 py-1 text-xs font-medium text-red-900">
                      ▼ Offered runs out here: from this row on, over what is offered on {linesBefore(i).map((t) => `${columnName(t)} (${h(t.offeredHours)} h)`).join(", ")}
                    </td>
                  </tr>
                ) : null}
                <tr data-testid={`allocation-row-${row.proposalId}`}>
                  <td>
                    {row.position}
                    <span className="block text-xs text-slate-600">
                      computed {row.conflictReason ? CONFLICT_WITHHELD : (row.computedRank ?? NONE)}
                      {row.chairRank !== null ? <span title={row.chairRankReason ?? undefined}> · chair {row.chairRank}</span> : null}
                    </span>
                  </td>
                  <td className="max-w-xs">
                    <span className="font-medium">{row.code}</span> {row.title}
                    {row.allocatedByHand ? <span className="block text-xs text-slate-600" data-testid={`by-hand-${row.proposalId}`}>set by hand: fill by rank keeps it</span> : null}
                    {row.requestedError ? <span className="block text-xs text-red-800">{row.requestedError}</span> : null}
                    {row.conflictReason ? (
                      <span className="block text-xs text-amber-900" data-testid={`conflict-${row.proposalId}`}>
                        You have a conflict on this proposal ({row.conflictReason}): its hours, tier and waitlist are another chair's to set.
                      </span>
                    ) : null}
                    {row.notOffered.length ? (
                      <span className="block text-xs text-amber-800">
                        Also requests time this call does not offer: {row.notOffered.map((c) => `${h(c.hours)} h ${columnName(c)} ${c.semesterCode}`).join(", ")}
                      </span>
                    ) : null}
                  </td>
                  {row.conflictReason ? (
                    <>
                      {/* not registered: the form sends the stored values (its defaults) */}
                      <td>
                        <select aria-label={`Tier of ${row.code}`} className="input w-28 cursor-not-allowed bg-slate-100 text-slate-500" disabled value={row.tier ?? ""} onChange={() => undefined}>
                          <option value="">none</option>
                          {allocationTiers.map((t) => <option key={t} value={t}>{t}</option>)}
                        </select>
                      </td>
                      <td><input type="checkbox" aria-label={`Waitlist ${row.code}`} disabled checked={row.waitlisted} onChange={() => undefined} /></td>
                    </>
                  ) : (<>
                  <td>
                    <select
                      aria-label={`Tier of ${row.code}`}
                      className="input w-28"
                      disabled={locked}
                      defaultValue={row.tier ?? ""}
                      aria-invalid={error(`rows.${i}.tier`) ? true : undefined}
                      aria-describedby={error(`rows.${i}.tier`) ? `rows-${i}-tier-error` : undefined}
                      {...register(`rows.${i}.tier`)}
                    >
                      <option value="">none</option>
                      {allocationTiers.map((t) => <option key={t} value={t}>{t}</option>)}
                    </select>
                    {error(`rows.${i}.tier`) ? <p id={`rows-${i}-tier-error`} role="alert" className="field-error">{error(`rows.${i}.tier`)}</p> : null}
                  </td>
                  <td>
                    <input type="checkbox" aria-label={`Waitlist ${row.code}`} disabled={locked} defaultChecked={row.waitlisted} {...register(`rows.${i}.waitlisted`)} />
                    {error(`rows.${i}.waitlisted`) ? <p role="alert" className="field-error">{error(`rows.${i}.waitlisted`)}</p> : null}
                  </td>
                  </>)}
                  {row.cells.map((c, j) => {
                    const t = totals[j];
                    const path = `rows.${i}.cells.${j}.hours` as const;
                    return (
                      <td key={j} className={`text-right ${t && over(t, i) ? "bg-red-50" : ""}`}>
                        {row.conflictReason ? (
                          <input aria-label={`${row.code} ${columnName(c)} hours`} inputMode="decimal" className="input w-20 cursor-not-allowed bg-slate-100 text-right text-slate-500" disabled value={initialHours(i, j)} onChange={() => undefined} />
                        ) : (
                          <input
                            aria-label={`${row.code} ${columnName(c)} hours`}
                            inputMode="decimal"
                            className="input w-20 text-right"
                            disabled={locked}
                            defaultValue={initialHours(i, j)}
                            aria-invalid={error(path) ? true : undefined}
                            {...register(path)}
                          />
                        )}
                        <span className="block text-xs text-slate-600">requested {h(c.requestedHours)}</span>
                        <span className="block text-xs" data-testid={`running-${row.proposalId}-${c.telescopeId}-${c.moonCategory}`}>Σ {h(t?.runningHours[i] ?? 0)}</span>
                        {error(path) ? <p role="alert" className="field-error">{error(path)}</p> : null}
                      </td>
                    );
                  })}
                  <td>
                    {row.laterCells.length === 0 ? <span className="text-slate-500">–</span> : null}
                    {row.laterCells.map((c, k) => {
                      const j = row.cells.length + k;
                      const path = `rows.${i}.cells.${j}.hours` as const;
                      return (
                        <label key={j} className="mb-1 block text-xs">
                          {c.semesterCode} {columnName(c)} (requested {h(c.requestedHours)})
                          {row.conflictReason ? (
                            <input inputMode="decimal" className="input ml-1 inline-block w-20 cursor-not-allowed bg-slate-100 text-right text-slate-500" disabled value={initialHours(i, j)} onChange={() => undefined} />
                          ) : (
                            <input inputMode="decimal" className="input ml-1 inline-block w-20 text-right" disabled={locked} defaultValue={initialHours(i, j)} aria-invalid={error(path) ? true : undefined} {...register(path)} />
                          )}
                          {error(path) ? <span role="alert" className="field-error block">{error(path)}</span> : null}
                        </label>
                      );
                    })}
                  </td>
                </tr>
              </Fragment>
            ))}
          </tbody>
          <tfoot>
            <tr className="font-medium">
              <td colSpan={4}>Totals in {semesterCode}</td>
              {totals.map((t) => (
                <td key={`${t.telescopeId}-${t.moonCategory}`} className="text-right" data-testid={`total-${t.telescopeId}-${t.moonCategory}`}>
                  {h(t.allHours)} / {h(t.offeredHours)}
                  <span className="block text-xs font-normal text-slate-600">assured {h(t.assuredHours)} / {h(t.assuredLimit)}</span>
                </td>
              ))}
              <td />
            </tr>
          </tfoot>
        </table>
      </div>
      {locked ? null : (
        <button className="btn" disabled={busy || !hydrated}>
          Save the allocation
        </button>
      )}
    </form>
  );
}
