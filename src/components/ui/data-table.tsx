import { flexRender, type Row, type Table } from "@tanstack/react-table";
import type { ComponentProps, ReactNode } from "react";

const ROW_CLASS = "border-b border-rule last:border-b-0 hover:bg-paper";

/** Renders a TanStack Table instance; sorting headers are buttons, so keyboards can use them. */
export function DataTable<T>({
  table,
  caption,
  empty = "Nothing to show yet.",
  dense = false,
  rowProps,
  renderGroupRow,
}: {
  table: Table<T>;
  caption: string;
  empty?: string;
  /** Tighter cells, for a table with many columns of inputs. */
  dense?: boolean;
  /** The attributes of a row of data, class included (the default class marks the row under the pointer). */
  rowProps?: (row: Row<T>) => ComponentProps<"tr"> & Record<`data-${string}`, string | number>;
  /** The heading row of a group, for a table with a grouped row model; `colSpan` spans the visible columns. */
  renderGroupRow?: (row: Row<T>, colSpan: number) => ReactNode;
}) {
  const rows = table.getRowModel().rows;
  const columns = table.getVisibleLeafColumns().length;
  // Sorting controls appear only on tables that were given a sorted row model.
  const sortable = Boolean(table.options.getSortedRowModel);
  const pad = dense ? "px-1.5" : "px-3";
  return (
    <div className="relative overflow-x-auto border border-rule bg-sheet">
      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead>
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id} className="border-b-2 border-ink">
              {hg.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                return (
                  <th key={h.id} scope="col" className={`label-caps whitespace-nowrap ${pad} py-2`} aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : undefined}>
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
              <td colSpan={columns} className="px-3 py-6 text-center text-ink-soft">
                {empty}
              </td>
            </tr>
          ) : (
            rows.map((row) =>
              renderGroupRow && row.getIsGrouped() ? (
                renderGroupRow(row, columns)
              ) : (
                <tr key={row.id} className={ROW_CLASS} {...rowProps?.(row)}>
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className={dense ? "px-1.5 py-1.5 align-top" : "px-3 py-2 align-top"}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ),
            )
          )}
        </tbody>
      </table>
    </div>
  );
}
