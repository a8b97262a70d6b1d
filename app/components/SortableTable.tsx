import { flexRender, type Table } from "@tanstack/react-table";

/** A TanStack table with clickable, announced sort headers and a message when no row matches. */
export function SortableTable<Row>({ table, empty, rowClassName }: { table: Table<Row>; empty: string; rowClassName?: (row: Row) => string | undefined }) {
  const columnCount = table.getVisibleLeafColumns().length;
  return (
    <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
      <table className="table-base">
        <thead>
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => {
                const sorted = header.column.getIsSorted();
                return (
                  <th key={header.id} aria-sort={sorted ? (sorted === "asc" ? "ascending" : "descending") : undefined}>
                    <button type="button" className="font-semibold" onClick={header.column.getToggleSortingHandler()}>
                      {flexRender(header.column.columnDef.header, header.getContext())}
                      <span className="ml-1 text-slate-400">{sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : ""}</span>
                    </button>
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => (
            <tr key={row.id} className={rowClassName?.(row.original) ?? "hover:bg-night-50"}>
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id}>{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>
              ))}
            </tr>
          ))}
          {table.getRowModel().rows.length === 0 ? (
            <tr>
              <td colSpan={columnCount} className="py-6 text-center text-slate-500">{empty}</td>
            </tr>
          ) : null}
        </tbody>
      </table>
    </div>
  );
}
