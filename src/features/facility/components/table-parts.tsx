import type { ColumnHelper, Table } from "@tanstack/react-table";
import type { ReactNode } from "react";
import { Button } from "../../../components/ui/button.tsx";
import { actionsColumn } from "../../../components/ui/data-table.tsx";

/**
 * The facility tables' "Change" column (id `edit`, which each table hides when it has no editor):
 * `cell` gives what a row shows there, its `EditButton` first.
 */
export const editColumn = <T,>(col: ColumnHelper<T>, cell: (row: T, table: Table<T>) => ReactNode) => actionsColumn(col, cell, { id: "edit", header: "Change" });

/** The button that opens a row's editor, named for the row. */
export function EditButton({ name, onEdit }: { name: string; onEdit: () => void }) {
  return (
    <Button size="sm" onClick={onEdit} aria-label={`Edit ${name}`}>
      Edit
    </Button>
  );
}
