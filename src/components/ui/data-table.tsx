import { flexRender, type Table } from "@tanstack/react-table";

/** Renders a TanStack Table instance; sorting headers are buttons, so keyboards can use them. */
export function DataTable<T>({ table, caption, empty = "Nothing to show yet." }: { table: Table<T>; caption: string; empty?: string }) {
  const rows = table.getRowModel().rows;
  // Sorting controls appear only on tables that were given a sorted row model.
  const sortable = Boolean(table.options.getSortedRowModel);
  return (
    <div className="overflow-x-auto border border-rule bg-sheet">
      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead>
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id} className="border-b-2 border-ink">
              {hg.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                return (
                  <th key={h.id} scope="col" className="label-caps whitespace-nowrap px-3 py-2" aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : undefined}>
                    {h.isPlaceholder ? null : sortable && h.column.getCanSort() ? (
                      <button type="button" className="inline-flex items-center gap-1 uppercase" onClick={h.column.getToggleSortingHandler()}>
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden>{sorted === "asc" ? "↑" : sorted === "desc" ? "↓" : "↕"}</span>
                      </button>
                    ) : (
                      flexRender(h.column.columnDef.header, h.getContext())
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {rows.length === 0 ? (
            <tr>
              <td colSpan={table.getAllLeafColumns().length} className="px-3 py-6 text-center text-ink-soft">
                {empty}
              </td>
            </tr>
          ) : (
            rows.map((row) => (
              <tr key={row.id} className="border-b border-rule last:border-b-0 hover:bg-paper">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2 align-top">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))
          )}
        </tbody>
      </table>
    </div>
  );
}
