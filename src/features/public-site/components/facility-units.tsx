import type { SystemAnswer, UnitAnswer } from "#shared/schemas/facility.ts";
import { UNIT_LOOK_WORD, UNIT_LOOKS, unitInWords, unitLook, type UnitLook } from "../facility-words.ts";

/*
 * A system's units drawn as a row of small squares, one per unit, so a reader counts them:
 * the shape says the stage and a filled square is a unit that can carry load. The key says
 * the same in words, and each square's name is read out; colour adds nothing the shape lacks.
 */

const SIZE = 18;

/** One unit's square, by its stage: filled, half-filled, outlined with a dot, outlined, dashed. */
export function UnitShape({ look, size = SIZE }: { look: UnitLook; size?: number }) {
  const s = size;
  const inset = 1.5;
  const box = { x: inset, y: inset, width: s - inset * 2, height: s - inset * 2 };
  return (
    <svg aria-hidden width={s} height={s} viewBox={`0 0 ${s} ${s}`} className="inline-block shrink-0" data-look={look}>
      {look === "available" ? <rect {...box} fill="currentColor" stroke="currentColor" strokeWidth={1.5} /> : null}
      {look === "commissioning" ? (
        <>
          <rect {...box} fill="none" stroke="currentColor" strokeWidth={1.5} />
          <path d={`M${inset} ${s - inset}L${s - inset} ${inset}V${s - inset}Z`} fill="currentColor" />
        </>
      ) : null}
      {look === "installed" ? (
        <>
          <rect {...box} fill="none" stroke="currentColor" strokeWidth={1.5} />
          <circle cx={s / 2} cy={s / 2} r={s / 7} fill="currentColor" />
        </>
      ) : null}
      {look === "delivered" ? <rect {...box} fill="none" stroke="currentColor" strokeWidth={1.5} /> : null}
      {look === "ordered" ? <rect {...box} fill="none" stroke="currentColor" strokeWidth={1.2} strokeDasharray="3 2.4" /> : null}
    </svg>
  );
}

function UnitSquares({ units }: { units: UnitAnswer[] }) {
  return (
    <ul className="flex flex-wrap gap-1.5" aria-label={`${units.length} units`}>
      {units.map((u) => (
        <li key={u.id} title={unitInWords(u)} data-testid="unit-shape" data-look={unitLook(u)}>
          <UnitShape look={unitLook(u)} />
          <span className="sr-only">{unitInWords(u)}</span>
        </li>
      ))}
    </ul>
  );
}

/** The key to the unit shapes: only the stages the drawing shows, unless `all`. */
export function UnitKey({ looks = UNIT_LOOKS }: { looks?: readonly UnitLook[] }) {
  return (
    <ul aria-label="Key to the unit shapes" className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
      {UNIT_LOOKS.filter((l) => looks.includes(l)).map((l) => (
        <li key={l} className="flex items-center gap-1.5">
          <UnitShape look={l} size={12} />
          {UNIT_LOOK_WORD[l]}
        </li>
      ))}
    </ul>
  );
}

/**
 * A system's units and its redundancy in words: "design N+1 · now N", with the count of units
 * that can carry load. A 2N design draws each independent system on its own row.
 */
export function SystemUnits({ system, showKey = true }: { system: Pick<SystemAnswer, "name" | "units" | "redundancy" | "neededPerSystem" | "independentSystems">; showKey?: boolean }) {
  const { redundancy: r, units } = system;
  const trains = Array.from({ length: Math.max(1, system.independentSystems) }, (_, i) => i + 1);
  const shown = new Set(units.map(unitLook));
  return (
    <div className="flex flex-col gap-2" data-testid="system-units">
      <p className="tabular text-[0.95rem]" data-testid="redundancy-words">
        <span className="font-semibold">
          design {r.design} · now {r.now}
        </span>
        <span className="text-ink-soft">
          {" "}
          ({r.available} of {r.planned} {r.planned === 1 ? "unit carries" : "units carry"} load{r.shortfall > 0 ? `; ${r.shortfall} more needed for the design` : ""})
        </span>
      </p>
      {units.length === 0 ? (
        <p className="text-sm text-ink-soft">No units recorded yet.</p>
      ) : trains.length === 1 ? (
        <UnitSquares units={units} />
      ) : (
        <div className="flex flex-col gap-1.5">
          {trains.map((t) => (
            <div key={t} className="flex items-center gap-2">
              <span className="w-16 shrink-0 text-xs text-ink-soft">System {String.fromCharCode(64 + t)}</span>
              <UnitSquares units={units.filter((u) => u.train === t)} />
            </div>
          ))}
        </div>
      )}
      <p className="text-xs text-ink-soft">
        {system.neededPerSystem} {system.neededPerSystem === 1 ? "unit carries" : "units carry"} the design load{trains.length > 1 ? ` in each of ${trains.length} independent systems` : ""}.
      </p>
      {showKey && units.length > 0 ? <UnitKey looks={[...shown]} /> : null}
    </div>
  );
}
