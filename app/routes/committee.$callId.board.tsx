import { createColumnHelper, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { data, Link } from "react-router";
import { SortableTable } from "~/components/SortableTable";
import { callBoard } from "~/lib/allocation/board.server";
import { DISAGREEMENT_SPAN, MIN_GRADES } from "~/lib/allocation/normalise";
import { requireRole } from "~/lib/auth.server";
import { scienceCategoryLabel } from "~/lib/proposal-vocabulary";
import { apiId } from "~/lib/review/api.server";
import { Telescope } from "~/models/index.server";
import type { Route } from "./+types/committee.$callId.board";

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Ranking board ${d?.board.call.semesterCode ?? ""} · Committee · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  let callId: number;
  try {
    callId = apiId(params.callId, "callId");
  } catch {
    throw data({ message: "There is no call at this address." }, { status: 404 });
  }
  const [board, telescopes] = await Promise.all([callBoard({ callId }), Telescope.findAll({ attributes: ["id", "name"], order: [["id", "ASC"]] })]);
  return { board, telescopes: telescopes.map((t) => ({ id: t.id, name: t.name })) };
}

type Row = Route.ComponentProps["loaderData"]["board"]["proposals"][number];
const column = createColumnHelper<Row>();
const fixed = (value: number | null, digits: number) => (value === null ? "–" : value.toFixed(digits));

export default function RankingBoard({ loaderData }: Route.ComponentProps) {
  const { board, telescopes } = loaderData;
  const { call } = board;
  const telescopeName = (id: number) => telescopes.find((t) => t.id === id)?.name ?? `telescope ${id}`;
  const [sorting, setSorting] = useState<SortingState>([{ id: "computedRank", desc: false }]);
  const [filter, setFilter] = useState("");
  const columns = useMemo(() => {
    const hours = (row: Row, thisSemester: boolean) =>
      row.requested.filter((r) => (r.semesterCode === call.semesterCode) === thisSemester).reduce((sum, r) => sum + r.hours, 0);
    return [
      column.accessor("computedRank", { header: "Rank", cell: (c) => c.getValue() ?? "–", sortUndefined: "last" }),
      column.accessor("chairRank", {
        header: "Chair's rank",
        sortUndefined: "last",
        cell: (c) => (c.getValue() === null ? "–" : <span title={c.row.original.chairRankReason ?? undefined}>{c.getValue()} <span className="text-xs text-slate-600">({c.row.original.chairRankReason})</span></span>),
      }),
      column.accessor((r) => r.code ?? "", { id: "code", header: "Code" }),
      column.accessor("title", { header: "Title" }),
      column.accessor((r) => (r.category ? scienceCategoryLabel(r.category) : ""), { id: "category", header: "Category" }),
      column.accessor((r) => r.piInstitution ?? "", { id: "institution", header: "PI institution" }),
      column.accessor("reviews", { header: "Reviews" }),
      column.accessor("rawMean", { header: "Raw mean", cell: (c) => fixed(c.getValue(), 2) }),
      column.accessor("normalisedScore", {
        header: "Normalised",
        cell: (c) => (
          <span>
            {fixed(c.getValue(), 2)}
            {c.row.original.fallbackReviewerIds.length ? <span className="ml-1 text-xs text-amber-800" title="Some of its reviewers graded too few proposals, or gave one grade to all, and are placed on the panel's scale">({c.row.original.fallbackReviewerIds.length} on panel scale)</span> : null}
          </span>
        ),
      }),
      column.accessor("spread", { header: "Spread (σ)", cell: (c) => fixed(c.getValue(), 2) }),
      column.accessor("disagreement", { header: "Reviewers", cell: (c) => (c.getValue() ? <span className="rounded bg-amber-100 px-1.5 py-0.5 text-amber-900">disagree</span> : "agree") }),
      column.accessor((r) => hours(r, true), { id: "hoursThis", header: `Hours ${call.semesterCode}`, cell: (c) => (c.row.original.requestedError ? "unknown" : c.getValue().toFixed(1)) }),
      column.accessor((r) => hours(r, false), { id: "hoursLater", header: "Hours later", cell: (c) => (c.row.original.requestedError ? "unknown" : c.getValue().toFixed(1)) }),
    ];
  }, [call.semesterCode]);
  const table = useReactTable({
    data: board.proposals,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: "includesString",
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const maxRatio = Math.max(1, ...board.oversubscription.map((o) => o.ratio ?? 0));
  return (
    <div className="space-y-6">
      <p className="text-sm"><Link to="/committee">Committee</Link> › <Link to={`/committee/${call.id}`}>{call.semesterCode}</Link> › Ranking board</p>
      <h1>Ranking board for {call.semesterCode}</h1>
      {board.locked ? <p role="status" className="rounded-md border border-slate-300 bg-slate-100 px-3 py-2">The allocation is locked: ranking and hours cannot change until the chair unlocks it with a reason.</p> : null}
      <section className="card space-y-2">
        <h2>Oversubscription</h2>
        <p className="text-sm text-slate-700">Requested hours for {call.semesterCode} against offered hours, less what earlier calls' locked allocations already committed to this semester.</p>
        <table className="table-base">
          <thead><tr><th>Telescope</th><th>Moon</th><th>Requested h</th><th>Offered h</th><th>Committed h</th><th>Ratio</th><th className="w-1/3"></th></tr></thead>
          <tbody>
            {board.oversubscription.map((o) => (
              <tr key={`${o.telescopeId}-${o.moonCategory}`}>
                <td>{telescopeName(o.telescopeId)}</td>
                <td>{o.moonCategory}</td>
                <td>{o.requestedHours.toFixed(1)}</td>
                <td>{o.offeredHours.toFixed(1)}</td>
                <td>{o.committedHours.toFixed(1)}</td>
                <td data-testid={`ratio-${o.telescopeId}-${o.moonCategory}`}>{o.ratio === null ? "nothing offered" : `${o.ratio.toFixed(2)}×`}</td>
                <td>
                  <div className="relative h-3 rounded bg-slate-100" aria-hidden>
                    <div className={`absolute inset-y-0 left-0 rounded ${o.ratio !== null && o.ratio > 1 ? "bg-red-500" : "bg-emerald-500"}`} style={{ width: `${Math.min(100, ((o.ratio ?? 0) / maxRatio) * 100)}%` }} />
                    <div className="absolute inset-y-0 border-l-2 border-slate-700" style={{ left: `${(1 / maxRatio) * 100}%` }} title="offered" />
                  </div>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
      <section className="space-y-2">
        <div className="flex flex-wrap items-end justify-between gap-2">
          <h2>Proposals</h2>
          <label className="text-sm">Filter <input className="input ml-1 w-64" value={filter} onChange={(e) => setFilter(e.target.value)} placeholder="code, title, category, institution" /></label>
        </div>
        <p className="text-sm text-slate-700">
          Each reviewer's overall merits become z-scores within that reviewer's own grades in this call; a proposal's normalised score is the mean of its reviewers' z-scores, mapped back to the 1–10 scale around the panel's mean ({fixed(board.panel.mean, 2)}) and spread ({fixed(board.panel.sd, 2)}).
          A reviewer with fewer than {MIN_GRADES} grades, or one grade for everything, is placed on the panel's scale instead. Reviewers disagree when their z-scores span more than {DISAGREEMENT_SPAN}.
        </p>
        <SortableTable table={table} empty="No proposal on the board matches." />
      </section>
    </div>
  );
}
