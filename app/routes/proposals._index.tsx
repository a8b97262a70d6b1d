import {
  createColumnHelper,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import { SortableTable } from "~/components/SortableTable";
import { useMemo, useState } from "react";
import { Link } from "react-router";
import { StatusBadge } from "~/components/StatusBadge";
import { formatUtc as utc } from "~/lib/format";
import { requireUser } from "~/lib/auth/auth.server";
import { proposalStatuses, proposalStatusLabels, type ProposalStatus } from "~/lib/domain";
import { withRequestedHours } from "~/lib/proposals/hours.server";
import { memberRoleLabels } from "~/lib/proposals/vocabulary";
import { listProposalsForUser, openCalls } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/proposals._index";

export function meta() {
  return [{ title: "My proposals · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const [proposals, calls] = await Promise.all([listProposalsForUser({ user }).then(withRequestedHours), openCalls()]);
  // after "Delete draft" in a workspace, the list says what went
  const deleted = new URL(request.url).searchParams.get("deleted")?.slice(0, 300) ?? null;
  return { proposals, calls, deleted };
}

type Row = Awaited<ReturnType<typeof loader>>["proposals"][number];
const column = createColumnHelper<Row>();

export default function MyProposals({ loaderData }: Route.ComponentProps) {
  const { proposals, calls, deleted } = loaderData;
  const [sorting, setSorting] = useState<SortingState>([{ id: "lastChangeAt", desc: true }]);
  const [globalFilter, setGlobalFilter] = useState("");
  const [status, setStatus] = useState<"" | ProposalStatus>("");
  const [semester, setSemester] = useState("");
  const semesters = useMemo(() => [...new Set(proposals.map((p) => p.semesterCode))].sort(), [proposals]);
  const rows = useMemo(() => proposals.filter((p) => (!status || p.status === status) && (!semester || p.semesterCode === semester)), [proposals, status, semester]);
  const columns = useMemo(
    () => [
      column.accessor("status", { header: "State", cell: (info) => <StatusBadge status={info.getValue()} />, sortingFn: (a, b) => proposalStatuses.indexOf(a.original.status) - proposalStatuses.indexOf(b.original.status) }),
      column.accessor((p) => p.code ?? "", { id: "code", header: "Code", cell: (info) => info.getValue() || <span className="text-slate-400">not yet</span> }),
      column.accessor("semesterCode", { header: "Call" }),
      column.accessor("title", {
        header: "Title",
        cell: (info) => (
          <span>
            <Link to={`/proposals/${info.row.original.id}`} className="font-semibold">{info.getValue()}</Link>
            <span className="ml-2 text-xs text-slate-500">{memberRoleLabels[info.row.original.role]}</span>
          </span>
        ),
      }),
      column.accessor((p) => p.requestedHoursThisSemester ?? -1, {
        id: "requestedHoursThisSemester",
        header: "Hours, call's semester",
        cell: (info) => {
          const h = info.row.original.requestedHoursThisSemester;
          return h === null ? <span className="text-red-700" title="The feasibility sheet could not be computed">?</span> : <span className="tabular-nums">{h.toFixed(1)}</span>;
        },
      }),
      column.accessor((p) => p.requestedHoursBySemester.filter((s) => !s.callSemester).reduce((sum, s) => sum + s.hours, 0), {
        id: "laterSemesters",
        header: "Later semesters",
        cell: (info) => {
          const later = info.row.original.requestedHoursBySemester.filter((s) => !s.callSemester);
          return later.length ? (
            <span className="whitespace-nowrap tabular-nums">{later.map((s) => `${s.semesterCode} ${s.hours.toFixed(1)} h`).join(" · ")}</span>
          ) : (
            <span className="text-slate-400">—</span>
          );
        },
      }),
      column.accessor("lastChangeAt", { header: "Last change", cell: (info) => <span className="whitespace-nowrap">{utc(info.getValue())}</span> }),
    ],
    [],
  );
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1>My proposals</h1>
          <p className="mt-1 text-sm text-slate-600">Proposals you lead as PI or are invited to as Co-I. Drafts can be edited by the whole team; only the PI submits.</p>
        </div>
        {calls.length ? (
          <Link to="/proposals/new" className="btn">Start a proposal</Link>
        ) : (
          <p className="text-sm text-slate-600">No call is open at the moment.</p>
        )}
      </div>
      {deleted ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-4 py-2 text-sm text-emerald-900">The draft “{deleted}” was deleted.</p> : null}
      {proposals.length === 0 ? (
        <div className="card text-slate-700">
          <p>You have no proposals yet.</p>
          {calls.length ? (
            <p className="mt-2">
              Open {calls.length === 1 ? "call" : "calls"}:{" "}
              {calls.map((c, i) => (
                <span key={c.id}>
                  {i ? ", " : ""}
                  <Link to={`/proposals/new?call=${c.semesterCode}`}>{c.semesterCode}</Link> (deadline {utc(c.deadlineAt)})
                </span>
              ))}
              .
            </p>
          ) : null}
        </div>
      ) : (
        <>
          <div className="flex flex-wrap items-end gap-4">
            <div className="w-72">
              <label htmlFor="proposal-filter">Find</label>
              <input id="proposal-filter" className="input" placeholder="Title or code" value={globalFilter} onChange={(e) => setGlobalFilter(e.target.value)} />
            </div>
            <div>
              <label htmlFor="status-filter">State</label>
              <select id="status-filter" className="input" value={status} onChange={(e) => setStatus(e.target.value as typeof status)}>
                <option value="">Any</option>
                {proposalStatuses.map((s) => (
                  <option key={s} value={s}>{proposalStatusLabels[s]}</option>
                ))}
              </select>
            </div>
            <div>
              <label htmlFor="call-filter">Call</label>
              <select id="call-filter" className="input" value={semester} onChange={(e) => setSemester(e.target.value)}>
                <option value="">Any</option>
                {semesters.map((s) => (
                  <option key={s} value={s}>{s}</option>
                ))}
              </select>
            </div>
            <p className="ml-auto text-sm text-slate-600">{table.getFilteredRowModel().rows.length} of {proposals.length} proposals</p>
          </div>
          <SortableTable table={table} empty="No proposal matches." />
        </>
      )}
    </div>
  );
}
