import { closestCenter, DndContext, KeyboardSensor, PointerSensor, useSensor, useSensors, type DragEndEvent } from "@dnd-kit/core";
import { arrayMove, SortableContext, sortableKeyboardCoordinates, useSortable, verticalListSortingStrategy } from "@dnd-kit/sortable";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Picture } from "../../../components/ui/picture.tsx";
import { ProblemAlerts } from "../../../components/ui/publishing-editor.tsx";
import { formatDate } from "../../../lib/format.ts";

export type EditItem =
  | { key: string; kind: "photo"; mediaId: number | null; caption: string }
  | { key: string; kind: "pair"; area: string; beforeMediaId: number | null; afterMediaId: number | null; caption: string };

export type PickTarget = { key: string; slot: "photo" | "before" | "after" };

const dayOf = (takenAt: string | null | undefined) => (takenAt && /^\d{4}-\d{2}-\d{2}/.test(takenAt) ? takenAt.slice(0, 10) : null);

function Slot({ picture, label, onPick, date }: { picture: MediaPicture | null | undefined; label: string; onPick: () => void; date?: string | null }) {
  return (
    <div className="flex min-w-0 flex-1 flex-col gap-1">
      <span className="label-caps">{label}</span>
      {picture ? <Picture picture={picture} fit="cover" aspect={4 / 3} sizes="16rem" /> : <div className="flex aspect-[4/3] items-center justify-center border border-dashed border-rule-strong bg-paper text-sm text-ink-soft">No photo yet</div>}
      {date !== undefined ? <span className="text-xs text-ink-soft">{date ? `Taken ${formatDate(date)}` : "▲ No capture date: a pair needs one"}</span> : null}
      <Button size="sm" onClick={onPick}>
        {picture ? "Change photo…" : "Choose photo…"}
      </Button>
    </div>
  );
}

function ItemCard({
  item,
  index,
  count,
  pictures,
  problems,
  onChange,
  onMove,
  onRemove,
  onPick,
}: {
  item: EditItem;
  index: number;
  count: number;
  pictures: ReadonlyMap<number, MediaPicture>;
  problems: readonly PublishingProblem[];
  onChange: (item: EditItem) => void;
  onMove: (to: number) => void;
  onRemove: () => void;
  onPick: (slot: PickTarget["slot"]) => void;
}) {
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, transition, isDragging } = useSortable({ id: item.key });
  const ids = item.kind === "photo" ? [item.mediaId] : [item.beforeMediaId, item.afterMediaId];
  const mine = problems.filter((p) => p.mediaId !== undefined && ids.includes(p.mediaId));
  const style = {
    transform: transform ? `translate3d(${Math.round(transform.x)}px, ${Math.round(transform.y)}px, 0)` : undefined,
    transition,
  };
  const label = item.kind === "photo" ? "Photo" : `Then and now${item.area ? `: ${item.area}` : ""}`;
  const before = item.kind === "pair" && item.beforeMediaId ? pictures.get(item.beforeMediaId) : null;
  const after = item.kind === "pair" && item.afterMediaId ? pictures.get(item.afterMediaId) : null;
  const reversed = before && after && dayOf(before.takenAt) && dayOf(after.takenAt) && dayOf(before.takenAt)! > dayOf(after.takenAt)!;
  return (
    <li
      ref={setNodeRef}
      style={style}
      className={`border-2 bg-sheet ${isDragging ? "z-10 border-accent shadow-lg" : mine.length ? "border-bad" : "border-rule"}`}
      data-testid="story-item"
      data-kind={item.kind}
    >
      <div className="flex items-center justify-between gap-2 border-b border-rule px-3 py-2">
        <div className="flex items-center gap-2">
          <button
            type="button"
            ref={setActivatorNodeRef}
            {...attributes}
            {...listeners}
            aria-label={`Drag to reorder item ${index + 1}: ${label}`}
            className="cursor-grab touch-none rounded-sm border border-rule-strong px-1.5 py-0.5 text-ink-soft active:cursor-grabbing"
          >
            <span aria-hidden>⠿</span>
          </button>
          <span className="text-sm font-semibold">
            <span className="tabular">{index + 1}.</span> {label}
          </span>
        </div>
        <div className="flex flex-wrap gap-1">
          <Button size="sm" variant="ghost" disabled={index === 0} onClick={() => onMove(index - 1)} aria-label={`Move item ${index + 1} up`}>
            ↑ Up
          </Button>
          <Button size="sm" variant="ghost" disabled={index === count - 1} onClick={() => onMove(index + 1)} aria-label={`Move item ${index + 1} down`}>
            ↓ Down
          </Button>
          <Button size="sm" variant="ghost" onClick={onRemove} aria-label={`Remove item ${index + 1}`}>
            Remove
          </Button>
        </div>
      </div>
      <div className="flex flex-col gap-3 p-3">
        {item.kind === "photo" ? (
          <div className="max-w-xs">
            <Slot picture={item.mediaId ? pictures.get(item.mediaId) : null} label="Photo" onPick={() => onPick("photo")} />
          </div>
        ) : (
          <>
            <label className="flex flex-col gap-1 text-sm">
              <span className="font-medium">Area both photos show</span>
              <input value={item.area} onChange={(e) => onChange({ ...item, area: e.target.value })} placeholder="e.g. Hall 2A" maxLength={100} className="rounded-sm border border-rule-strong bg-sheet px-2 py-1.5" />
            </label>
            <div className="flex flex-col gap-3 sm:flex-row">
              <Slot picture={before} label="Then (earlier)" date={item.beforeMediaId ? dayOf(before?.takenAt) : undefined} onPick={() => onPick("before")} />
              <Slot picture={after} label="Now (later)" date={item.afterMediaId ? dayOf(after?.takenAt) : undefined} onPick={() => onPick("after")} />
            </div>
            {reversed ? (
              <p className="flex flex-wrap items-center gap-2 text-sm text-bad">
                ▲ The “then” photo was taken after the “now” one.
                <Button size="sm" onClick={() => onChange({ ...item, beforeMediaId: item.afterMediaId, afterMediaId: item.beforeMediaId })}>
                  Swap them
                </Button>
              </p>
            ) : null}
          </>
        )}
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-medium">Caption</span>
          <textarea rows={2} value={item.caption} onChange={(e) => onChange({ ...item, caption: e.target.value })} maxLength={1000} className="rounded-sm border border-rule-strong bg-sheet px-2 py-1.5 font-serif" />
        </label>
        <ProblemAlerts problems={mine} />
      </div>
    </li>
  );
}

/**
 * The story's items in order. Drag a handle to reorder (pointer, touch, or the keyboard:
 * focus the handle, Space, arrows, Space), or use the Up and Down buttons.
 */
export function StoryItemsEditor({
  items,
  pictures,
  problems,
  onChange,
  onPick,
}: {
  items: EditItem[];
  pictures: ReadonlyMap<number, MediaPicture>;
  problems: readonly PublishingProblem[];
  onChange: (items: EditItem[]) => void;
  onPick: (t: PickTarget) => void;
}) {
  const sensors = useSensors(useSensor(PointerSensor, { activationConstraint: { distance: 6 } }), useSensor(KeyboardSensor, { coordinateGetter: sortableKeyboardCoordinates }));
  const onDragEnd = (e: DragEndEvent) => {
    if (!e.over || e.active.id === e.over.id) return;
    const from = items.findIndex((i) => i.key === e.active.id);
    const to = items.findIndex((i) => i.key === e.over!.id);
    if (from >= 0 && to >= 0) onChange(arrayMove(items, from, to));
  };
  return (
    <DndContext sensors={sensors} collisionDetection={closestCenter} onDragEnd={onDragEnd}>
      <SortableContext items={items.map((i) => i.key)} strategy={verticalListSortingStrategy}>
        <ol className="flex flex-col gap-3" aria-label="Items of the story, in order">
          {items.map((item, index) => (
            <ItemCard
              key={item.key}
              item={item}
              index={index}
              count={items.length}
              pictures={pictures}
              problems={problems}
              onChange={(next) => onChange(items.map((i) => (i.key === item.key ? next : i)))}
              onMove={(to) => onChange(arrayMove(items, index, to))}
              onRemove={() => onChange(items.filter((i) => i.key !== item.key))}
              onPick={(slot) => onPick({ key: item.key, slot })}
            />
          ))}
        </ol>
      </SortableContext>
    </DndContext>
  );
}
