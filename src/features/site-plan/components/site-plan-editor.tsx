import { useRef, useState, type PointerEvent } from "react";
import type { SiteArea, SitePlan } from "#shared/schemas/site-plan.ts";
import { cellsBetween, type AreaCells } from "#shared/domain/site-plan.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { AREA_KIND_WORD, areaStatusWord, CELL, SitePlanDrawing } from "../../../components/ui/site-plan-drawing.tsx";
import { AreaForm } from "./area-form.tsx";

type Editing = { area: SiteArea | null; cells: AreaCells };

/** The cell under a pointer, from the SVG's own box (it scales with the page). */
function cellAt(e: PointerEvent<SVGRectElement>, plan: SitePlan): { x: number; y: number } {
  const box = (e.currentTarget.ownerSVGElement ?? e.currentTarget).getBoundingClientRect();
  const clamp = (v: number, max: number) => Math.max(0, Math.min(max - 1, Math.floor(v)));
  return { x: clamp(((e.clientX - box.left) / box.width) * plan.grid.columns, plan.grid.columns), y: clamp(((e.clientY - box.top) / box.height) * plan.grid.rows, plan.grid.rows) };
}

/**
 * The office's plan editor: drag across empty cells to draw an area (mouse, pen or finger — the
 * grid takes the touch, so the page does not scroll under the drag), tap an area to rename, move,
 * resize or delete it in its form. The "New area" button and the form's cells are the keyboard's
 * way to do all of it; the list below the plan names every area with its audience and status.
 */
export function SitePlanEditor({ slug, plan, areaNames, editable }: { slug: string; plan: SitePlan; areaNames: readonly string[]; editable: boolean }) {
  const [editing, setEditing] = useState<Editing | null>(null);
  const [drag, setDrag] = useState<{ from: { x: number; y: number }; to: { x: number; y: number } } | null>(null);
  // Where the drag began: a ref, so the pointer-up handler reads it whatever has rendered since.
  const start = useRef<{ x: number; y: number } | null>(null);
  const width = plan.grid.columns * CELL;
  const height = plan.grid.rows * CELL;
  const drawn = drag ? cellsBetween(drag.from, drag.to) : null;

  const grid = (
    <g aria-hidden>
      {Array.from({ length: plan.grid.columns + 1 }, (_, i) => (
        <line key={`c${i}`} x1={i * CELL} y1={0} x2={i * CELL} y2={height} stroke="#d9d3c4" strokeWidth={0.8} />
      ))}
      {Array.from({ length: plan.grid.rows + 1 }, (_, i) => (
        <line key={`r${i}`} x1={0} y1={i * CELL} x2={width} y2={i * CELL} stroke="#d9d3c4" strokeWidth={0.8} />
      ))}
      {editable ? (
        <rect
          x={0}
          y={0}
          width={width}
          height={height}
          fill="transparent"
          style={{ touchAction: "none" }}
          data-testid="site-plan-grid"
          onPointerDown={(e) => {
            e.currentTarget.setPointerCapture(e.pointerId);
            const c = cellAt(e, plan);
            start.current = c;
            setDrag({ from: c, to: c });
          }}
          onPointerMove={(e) => {
            const from = start.current;
            if (from) setDrag({ from, to: cellAt(e, plan) });
          }}
          onPointerUp={(e) => {
            const from = start.current;
            if (!from) return;
            start.current = null;
            const cells = cellsBetween(from, cellAt(e, plan));
            setDrag(null);
            setEditing({ area: null, cells });
          }}
          onPointerCancel={() => {
            start.current = null;
            setDrag(null);
          }}
        />
      ) : null}
    </g>
  );

  return (
    <div className="flex flex-col gap-4">
      {editable ? <p className="text-sm text-ink-soft">Drag across empty cells to draw an area, or tap an area to change it. The plan is a diagram: no scale, no map.</p> : null}
      <SitePlanDrawing plan={plan} title="Site plan" underlay={grid} onPick={editable ? (a) => setEditing({ area: a, cells: a }) : undefined}>
        {drawn ? <rect x={drawn.x * CELL} y={drawn.y * CELL} width={drawn.w * CELL} height={drawn.h * CELL} fill="#fdeee4" fillOpacity={0.6} stroke="#1d1f24" strokeDasharray="6 4" strokeWidth={2} pointerEvents="none" /> : null}
      </SitePlanDrawing>
      {editable ? (
        <div>
          <Button onClick={() => setEditing({ area: null, cells: { x: 0, y: 0, w: 2, h: 2 } })}>New area</Button>
        </div>
      ) : null}
      <ul className="divide-y divide-rule border-y border-rule" aria-label="Areas of the plan">
        {plan.areas.map((a) => (
          <li key={a.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2">
            <span className="font-medium">{a.name}</span>
            <span className="text-sm text-ink-soft">{AREA_KIND_WORD[a.kind]}</span>
            {a.audience ? <AudienceMark audience={a.audience} /> : null}
            <span className="text-sm">{areaStatusWord(a.status)}</span>
            <span className="text-sm text-ink-faint">
              column {a.x}, row {a.y}, {a.w} × {a.h} cells
            </span>
            {editable ? (
              <Button size="sm" className="ml-auto" onClick={() => setEditing({ area: a, cells: a })} aria-label={`Edit ${a.name}`}>
                Edit
              </Button>
            ) : null}
          </li>
        ))}
        {plan.areas.length === 0 ? <li className="py-2 text-sm text-ink-soft">No area drawn yet.</li> : null}
      </ul>
      {editing ? <AreaForm key={editing.area?.id ?? `new-${editing.cells.x}-${editing.cells.y}`} slug={slug} area={editing.area} cells={editing.cells} areaNames={areaNames} onClose={() => setEditing(null)} /> : null}
    </div>
  );
}
