import { flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type Cell, type ColumnHelper, type Row, type RowData, type SortingState, type Table, type TableOptions } from "@tanstack/react-table";
import { useState, type ComponentProps, type ReactNode } from "react";
import { useNarrow } from "../../lib/use-narrow.ts";

declare module "@tanstack/react-table" {
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface ColumnMeta<TData extends RowData, TValue> {
    /** A key fact of the row: at phone width it heads the row's card, without its label. */
    key?: boolean;
    /** The row's buttons and links: at phone width they close the card, full width of it. */
    actions?: boolean;
  }
}

const ROW_CLASS = "border-b border-rule last:border-b-0 hover:bg-paper";

type RowProps = ComponentProps<"tr"> & Record<`data-${string}`, string | number>;

const isActionsColumn = (column: { id: string; columnDef: { meta?: { actions?: boolean } } }) => column.id === "actions" || column.columnDef.meta?.actions === true;
const isActions = <T,>(cell: Cell<T, unknown>) => isActionsColumn(cell.column);

/**
 * The column of a row's buttons and links: kept in view when a wide table scrolls, last on a
 * phone's card. `cell` draws them for the row; `id` lets a table hide the column by name.
 */
export function actionsColumn<T>(col: ColumnHelper<T>, cell: (row: T, table: Table<T>) => ReactNode, { id = "actions", header = "" }: { id?: string; header?: string | (() => ReactNode) } = {}) {
  return col.display({ id, header, meta: { actions: true }, cell: ({ row, table }) => cell(row.original, table) });
}
// The actions column stays in view at the right edge when a wide table scrolls sideways.
const STICKY = "sticky right-0 bg-sheet shadow-[-1px_0_0_var(--color-rule)]";

/** The row's `data-*` and `aria-*` attributes, which mean the same on a card as on a row. */
function cardAttributes(props: RowProps | undefined): Record<string, unknown> {
  return Object.fromEntries(Object.entries(props ?? {}).filter(([k]) => k.startsWith("data-") || k.startsWith("aria-")));
}

/**
 * One row as a card: the key columns first (the first column when none is marked), then every
 * other column as label and value, then the row's actions, so a phone reaches them without
 * scrolling sideways.
 */
function RowCard<T>({ row, props }: { row: Row<T>; props: RowProps | undefined }) {
  const cells = row.getVisibleCells();
  const actions = cells.filter(isActions);
  const facts = cells.filter((c) => !isActions(c));
  const marked = facts.some((c) => c.column.columnDef.meta?.key);
  const isKey = (c: Cell<T, unknown>, i: number) => (marked ? c.column.columnDef.meta?.key === true : i === 0);
  const render = (c: Cell<T, unknown>) => flexRender(c.column.columnDef.cell, c.getContext());
  return (
    <li className="border border-rule bg-sheet p-3 text-sm" data-testid="row-card" {...cardAttributes(props)}>
      <div className="flex flex-col gap-1 font-medium">
        {facts.filter(isKey).map((c) => (
          <div key={c.id}>{render(c)}</div>
        ))}
      </div>
      <dl className="mt-2 flex flex-col gap-1">
        {facts
          .filter((c, i) => !isKey(c, i))
          .map((c) => {
            const header = c.column.columnDef.header;
            // The value sits beside its label while it fits and wraps under it when it does not
            // (a row of unit shapes, a menu); a column without a written heading (a checkbox) has none.
            return (
              <div key={c.id} className="flex flex-wrap items-baseline gap-x-3">
                {typeof header === "string" && header ? <dt className="text-ink-soft">{header}</dt> : null}
                <dd className="min-w-0 max-w-full break-words">{render(c)}</dd>
              </div>
            );
          })}
      </dl>
      {actions.map((c) => (
        <div key={c.id} className="mt-3 border-t border-rule pt-3">
          {render(c)}
        </div>
      ))}
    </li>
  );
}

/** The sorting headers of a table, as one menu above its cards. */
function CardSort<T>({ table, caption }: { table: Table<T>; caption: string }) {
  const columns = table.getAllLeafColumns().filter((c) => c.getCanSort() && typeof c.columnDef.header === "string" && c.columnDef.header);
  if (columns.length === 0) return null;
  const current = table.getState().sorting[0];
  return (
    <label className="flex items-center gap-2 text-sm">
      <span className="text-ink-soft">Sort {caption.toLowerCase()} by</span>
      <select
        className="rounded-sm border border-rule-strong bg-sheet px-2 py-1"
        value={current ? `${current.desc ? "desc" : "asc"}:${current.id}` : ""}
        onChange={(e) => {
          const [direction, ...id] = e.target.value.split(":");
          table.setSorting(direction ? [{ id: id.join(":"), desc: direction === "desc" }] : []);
        }}
      >
        <option value="">As listed</option>
        {columns.flatMap((c) => [
          <option key={`asc:${c.id}`} value={`asc:${c.id}`}>
            {String(c.columnDef.header)} ↑
          </option>,
          <option key={`desc:${c.id}`} value={`desc:${c.id}`}>
            {String(c.columnDef.header)} ↓
          </option>,
        ])}
      </select>
    </label>
  );
}

/**
 * A table its column heads sort, unsorted at first: `useReactTable` with the sorting kept here
 * and the core and sorted row models given.
 */
export function useSortedTable<T>(options: Omit<TableOptions<T>, "getCoreRowModel" | "getSortedRowModel" | "onSortingChange">): Table<T> {
  const [sorting, setSorting] = useState<SortingState>([]);
  return useReactTable({ ...options, state: { ...options.state, sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
}

/**
 * Renders a TanStack Table instance; sorting headers are buttons, so keyboards can use them.
 * Below 640 px each row becomes a card (see `RowCard`); columns mark their key facts and actions
 * in their `meta`.
 */
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
  /** The attributes of a row of data, class included (the default class marks the row under the pointer); on a card, its `data-*` and `aria-*` ones. */
  rowProps?: (row: Row<T>) => RowProps;
  /** The heading row of a group, for a table with a grouped row model; `colSpan` spans the visible columns. */
  renderGroupRow?: (row: Row<T>, colSpan: number) => ReactNode;
}) {
  const narrow = useNarrow();
  const rows = table.getRowModel().rows;
  const columns = table.getVisibleLeafColumns().length;
  // Sorting controls appear only on tables that were given a sorted row model.
  const sortable = Boolean(table.options.getSortedRowModel);
  const pad = dense ? "px-1.5" : "px-3";
  if (narrow) {
    if (rows.length === 0) return <p className="border border-rule bg-sheet px-3 py-6 text-center text-ink-soft">{empty}</p>;
    return (
      <div className="flex flex-col gap-2">
        {sortable ? <CardSort table={table} caption={caption} /> : null}
        <ul className="flex flex-col gap-2" aria-label={caption}>
        {rows.map((row) =>
          row.getIsGrouped() ? (
            <li key={row.id} className="pt-2">
              <h3 className="font-semibold">
                {String(row.groupingValue)} <span className="text-xs font-normal text-ink-faint">({row.subRows.length})</span>
              </h3>
            </li>
          ) : (
            <RowCard key={row.id} row={row} props={rowProps?.(row)} />
          ),
        )}
        </ul>
      </div>
    );
  }
  return (
    // Focusable and named, so a keyboard reader can scroll a wide table too.
    <div className="relative overflow-x-auto border border-rule bg-sheet" tabIndex={0} role="region" aria-label={caption}>
      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead>
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id} className="border-b-2 border-ink">
              {hg.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                return (
                  <th key={h.id} scope="col" className={`label-caps whitespace-nowrap ${pad} py-2 ${isActionsColumn(h.column) ? STICKY : ""}`} aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : undefined}>
                    {h.isPlaceholder ? null : sortable && h.column.getCanSort() ? (
                      <button type="button" className="inline-flex min-h-6 items-center gap-1 uppercase" onClick={h.column.getToggleSortingHandler()}>
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
                    <td key={cell.id} className={`${dense ? "px-1.5 py-1.5" : "px-3 py-2"} align-top ${isActions(cell) ? STICKY : ""}`}>
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
