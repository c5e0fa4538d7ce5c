import { createColumnHelper, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import type { BlockAnswer, SystemAnswer, UnitAnswer } from "#shared/schemas/facility.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { DataTable } from "../../../components/ui/data-table.tsx";
import { formatFigure, formatHours, formatRating, KIND_WORD, signedKw } from "../words.ts";
import { EditButton, editColumn } from "./table-parts.tsx";
import { UnitRow } from "./unit-shapes.tsx";

export interface SystemTableActions {
  onEdit: (s: SystemAnswer) => void;
  onAddUnit: (s: SystemAnswer) => void;
  onEditUnit: (s: SystemAnswer, u: UnitAnswer) => void;
}

interface Meta {
  blockNames: Map<number, string>;
  actions?: SystemTableActions;
}

const col = createColumnHelper<SystemAnswer>();
const metaOf = (t: { options: { meta?: unknown } }) => t.options.meta as Meta;

/** Heat removal or fuel autonomy, marked as indicative (the caution is printed under the table). */
function Figures({ s }: { s: SystemAnswer }) {
  if (!s.heat && !s.fuel) return <span className="text-ink-faint">—</span>;
  return (
    <dl className="tabular min-w-44 text-xs" data-testid={`figures-${s.id}`}>
      {s.heat ? (
        <>
          <dt className="inline font-medium">Heat removal ≈ </dt>
          <dd className="inline">
            {formatFigure(s.heat.removalKw)} kW for {formatFigure(s.heat.loadKw)} kW IT ({signedKw(s.heat.marginKw)})
          </dd>
          {s.heat.inletBand ? <dd className="text-ink-soft">Supply air {s.heat.inletBand}</dd> : null}
        </>
      ) : null}
      {s.fuel ? (
        <>
          <dt className="font-medium">Fuel {formatFigure(s.fuel.usableLitres)} L usable</dt>
          <dd>
            ≈ {formatHours(s.fuel.autonomyHoursAtDesignLoad)} at the IT load ({formatFigure(s.fuel.designLoadKw)} kW)
          </dd>
          <dd>≈ {formatHours(s.fuel.autonomyHoursAtFullLoad)} at full generator load</dd>
        </>
      ) : null}
      <dd className="text-ink-faint">indicative *</dd>
    </dl>
  );
}

const columns = [
  col.accessor("name", {
    header: "System",
    cell: ({ row }) => (
      <div className="min-w-32">
        <span className="font-medium">{row.original.name}</span>
        <p className="text-xs text-ink-faint">{KIND_WORD[row.original.kind]}</p>
        <div className="mt-1">
          <AudienceMark audience={row.original.audience} />
        </div>
      </div>
    ),
  }),
  col.display({
    id: "design",
    header: "Design",
    cell: ({ row, table }) => {
      const s = row.original;
      const names = s.serves.map((id) => metaOf(table).blockNames.get(id)).filter(Boolean);
      return (
        <div className="tabular min-w-28 whitespace-nowrap text-xs">
          <p>N = {s.neededPerSystem}</p>
          <p>
            {s.independentSystems} system{s.independentSystems === 1 ? "" : "s"}
          </p>
          <p>{formatRating(s.ratingPerUnit, s.ratingUnit)} each</p>
          <p className="mt-1 whitespace-normal text-ink-soft">serves {names.length ? names.join(", ") : "no block yet"}</p>
        </div>
      );
    },
  }),
  col.display({
    id: "redundancy",
    header: "Redundancy",
    cell: ({ row }) => {
      const r = row.original.redundancy;
      return (
        <div className="min-w-36" data-testid={`redundancy-${row.original.id}`}>
          <p className="tabular">
            <span className="text-ink-soft">design</span> <span className="font-semibold">{r.design}</span>
          </p>
          <p className="tabular">
            <span className="text-ink-soft">now</span> <span className="font-semibold">{r.now}</span>{" "}
            <span aria-hidden>{r.shortfall === 0 ? "●" : "▲"}</span>
            <span className="sr-only">{r.shortfall === 0 ? "(design reached)" : `(${r.shortfall} short of design)`}</span>
          </p>
          <p className="text-xs text-ink-faint">
            {r.available} of {r.planned} available
          </p>
        </div>
      );
    },
  }),
  col.display({ id: "figures", header: "Figures", cell: ({ row }) => <Figures s={row.original} /> }),
  col.accessor("units", {
    header: "Units by stage",
    cell: ({ row, table }) => {
      const s = row.original;
      const actions = metaOf(table).actions;
      return (
        <div className="min-w-60">
          <UnitRow units={s.units} label={`Units of ${s.name}`} onOpen={actions ? (u) => actions.onEditUnit(s, u) : undefined} />
        </div>
      );
    },
  }),
  editColumn(col, (s, table) => {
    const actions = metaOf(table).actions;
    return actions ? (
      <div className="flex flex-col gap-1">
        <EditButton name={s.name} onEdit={() => actions.onEdit(s)} />
        <Button size="sm" onClick={() => actions.onAddUnit(s)} aria-label={`Add a unit to ${s.name}`}>
          + Unit
        </Button>
      </div>
    ) : null;
  }),
];

/** The plant systems: design, what they serve, redundancy at design and now, indicative figures and their units as shapes. */
export function SystemTable({ systems, blocks, actions }: { systems: SystemAnswer[]; blocks: BlockAnswer[]; actions?: SystemTableActions }) {
  const table = useReactTable({
    data: systems,
    columns,
    meta: { blockNames: new Map(blocks.map((b) => [b.id, b.name])), actions } satisfies Meta,
    getRowId: (s) => String(s.id),
    state: { columnVisibility: { edit: Boolean(actions) } },
    getCoreRowModel: getCoreRowModel(),
  });
  return <DataTable table={table} caption="Plant systems" empty="No plant system yet." dense rowProps={(row) => ({ "data-system-id": row.original.id })} />;
}
