import { UNIT_STAGES, type UnitStage } from "#shared/schemas/facility.ts";
import { stageRank } from "#shared/domain/facility-record.ts";
import { STAGE_MEANING, STAGE_SHORT, unitStageWords } from "../words.ts";

/**
 * A unit's stage as a shape of our own: a square that fills as the unit progresses.
 * Ordered is a dashed outline, delivered a solid outline, installed adds a floor line,
 * and each commissioning level L1…L5 fills another fifth from the bottom. A unit that
 * carries load (at or past the project's level) gets a heavier frame. The word is always
 * printed beside it, so no one has to read the shape alone.
 */
export function UnitShape({ stage, available, size = 22 }: { stage: UnitStage; available: boolean; size?: number }) {
  const i = stageRank(stage);
  const level = Math.max(0, i - 2); // 0 before L1, 5 at L5
  const inner = 16;
  const fill = (inner * Math.min(level, 5)) / 5;
  return (
    <svg aria-hidden width={size} height={size} viewBox="0 0 22 22" className="shrink-0" data-shape={stage} data-available={available || undefined}>
      {fill > 0 ? <rect x={3} y={3 + inner - fill} width={inner} height={fill} fill="currentColor" /> : null}
      {stage === "installed" ? <line x1={3} y1={16} x2={19} y2={16} stroke="currentColor" strokeWidth={2} /> : null}
      <rect
        x={available ? 1.75 : 2.5}
        y={available ? 1.75 : 2.5}
        width={available ? 18.5 : 17}
        height={available ? 18.5 : 17}
        fill="none"
        stroke="currentColor"
        strokeWidth={available ? 3 : 1.5}
        strokeDasharray={stage === "ordered" ? "3 2" : undefined}
      />
    </svg>
  );
}

export interface UnitMark {
  id: number;
  label: string;
  stage: UnitStage;
  available: boolean;
}

/** One unit: its shape over its label and stage, named for screen readers in full. */
export function UnitChip({ unit }: { unit: UnitMark }) {
  return (
    <span
      role="img"
      aria-label={unitStageWords(unit.label, unit.stage, unit.available)}
      data-unit-id={unit.id}
      data-stage={unit.stage}
      className="inline-flex w-[4.25rem] flex-col items-center gap-0.5 px-0.5 py-1 text-center text-ink"
    >
      <UnitShape stage={unit.stage} available={unit.available} />
      <span className="line-clamp-2 w-full break-words text-[0.7rem] leading-tight">{unit.label}</span>
      <span className="text-[0.7rem] font-semibold leading-tight">{STAGE_SHORT[unit.stage]}</span>
    </span>
  );
}

/** A system's units as a row of shapes, in their order; with `onOpen` each opens its unit (for those who keep the record). */
export function UnitRow<U extends UnitMark>({ units, label, onOpen }: { units: readonly U[]; label: string; onOpen?: (u: U) => void }) {
  if (units.length === 0) return <p className="text-xs text-ink-faint">No units yet.</p>;
  return (
    <ul aria-label={label} className="flex flex-wrap gap-1">
      {units.map((u) => (
        <li key={u.id}>
          {onOpen ? (
            <button type="button" className="rounded-sm border border-transparent hover:border-rule-strong" aria-label={`Edit ${unitStageWords(u.label, u.stage, u.available)}`} onClick={() => onOpen(u)}>
              <UnitChip unit={u} />
            </button>
          ) : (
            <UnitChip unit={u} />
          )}
        </li>
      ))}
    </ul>
  );
}

/** The key to the shapes: every stage with its meaning, and the heavier frame of a unit that carries load. */
export function StageKey({ availableFromLevel, className = "" }: { availableFromLevel: number; className?: string }) {
  return (
    <div className={`text-xs text-ink-soft ${className}`}>
      <ul aria-label="Unit stage key" className="flex flex-wrap gap-x-3 gap-y-1">
        {UNIT_STAGES.map((s) => (
          <li key={s} className="inline-flex items-center gap-1">
            <UnitShape stage={s} available={false} size={14} />
            <span>
              <span className="font-semibold text-ink">{STAGE_SHORT[s]}</span>
              {s.startsWith("L") ? ` ${STAGE_MEANING[s]}` : ""}
            </span>
          </li>
        ))}
        <li className="inline-flex items-center gap-1">
          <UnitShape stage={`L${availableFromLevel}` as UnitStage} available size={14} />
          <span>heavy frame: carries load (from L{availableFromLevel})</span>
        </li>
      </ul>
    </div>
  );
}
