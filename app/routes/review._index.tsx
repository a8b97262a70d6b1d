import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { useEffect, useState } from "react";
import { Link } from "react-router";
import { Countdown } from "~/components/Countdown";
import { SortableTable } from "~/components/SortableTable";
import { scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { listMyAssignments, type DeskRow, requireDeskUser } from "~/lib/review/desk.server";
import { reviewStatusLabels } from "~/lib/review/vocabulary";
import { formatUtc } from "~/lib/format";
import type { Route } from "./+types/review._index";

export function meta() {
  return [{ title: "Review desk · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireDeskUser(request);
  return { name: user.name ?? user.email, rows: await listMyAssignments({ user }), now: new Date().toISOString() };
}

const column = createColumnHelper<DeskRow>();

/** The deadline in the reader's own time zone (after hydration) and in UTC. */
function LocalTime({ iso }: { iso: string }) {
  const [local, setLocal] = useState<string | null>(null);
  useEffect(() => {
    setLocal(new Date(iso).toLocaleString(undefined, { year: "numeric", month: "short", day: "numeric", hour: "2-digit", minute: "2-digit", timeZoneName: "short" }));
  }, [iso]);
  return <span>{local ? `${local} · ` : ""}{formatUtc(iso)}</span>;
}

export default function ReviewDesk({ loaderData }: Route.ComponentProps) {
  const { rows, now, name } = loaderData;
  const [sorting, setSorting] = useState<SortingState>([{ id: "code", desc: false }]);
  const columns = [
    column.accessor((r) => r.code ?? "", {
      id: "code",
      header: "Code",
      cell: (c) => (c.row.original.status === "conflict" ? c.getValue() : <Link to={`/review/${c.row.original.proposalId}`}>{c.getValue() || `#${c.row.original.proposalId}`}</Link>),
    }),
    column.accessor("title", { header: "Title" }),
    column.accessor((r) => scienceCategoryLabel(r.category) ?? "", { id: "category", header: "Category" }),
    column.accessor("status", { header: "Your status", cell: (c) => reviewStatusLabels[c.getValue()] }),
    column.accessor((r) => r.editableUntil ?? "", {
      id: "deadline",
      header: "Review deadline",
      cell: (c) => (c.row.original.editableUntil ? (
        <div>
          <LocalTime iso={c.row.original.editableUntil} />
          {c.row.original.status !== "submitted" && c.row.original.status !== "conflict" ? <Countdown until={c.row.original.editableUntil} renderedAt={now} label={`Time left for ${c.row.original.code}`} /> : null}
        </div>
      ) : "not set"),
    }),
  ];
  const table = useReactTable({ data: rows, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1>Review desk</h1>
        <Link to="/review/settings">The categories you know</Link>
      </div>
      <p className="text-slate-700">{name}, these are the proposals the chair assigned to you. Open one to read it, declare a conflict or write your grade.</p>
      <SortableTable table={table} empty="No assignment is waiting for you." />
    </div>
  );
}
