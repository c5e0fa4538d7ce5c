import type { ReactNode } from "react";
import type { SystemAnswer } from "#shared/schemas/facility.ts";
import { PLANT_KIND_WORD, tenths } from "../facility-words.ts";
import { SystemUnits } from "./facility-units.tsx";

const RATING_UNIT_TEXT = { kW: "kW", kVA: "kVA", L: "L", "m3/s": "m³/s" } as const;

/** A plant system: what it is, its units drawn, its redundancy at design and today. */
export function SystemCard({ system, blockNames, photos }: { system: SystemAnswer; blockNames: string[]; photos?: ReactNode }) {
  const rating = system.ratingPerUnit !== null && system.ratingUnit ? `${tenths(system.ratingPerUnit)} ${RATING_UNIT_TEXT[system.ratingUnit]}${system.units.length > 1 ? " each" : ""}` : null;
  return (
    <article aria-labelledby={`system-${system.id}`} className="flex min-w-0 flex-col gap-3 border border-rule bg-sheet p-4" data-testid="system-card" data-system-id={system.id}>
      <header>
        <p className="label-caps">{PLANT_KIND_WORD[system.kind]}</p>
        <h3 id={`system-${system.id}`} className="font-semibold">
          {system.name}
        </h3>
        <p className="text-sm text-ink-soft">
          {[rating, blockNames.length > 0 ? `serves ${blockNames.join(", ")}` : null].filter(Boolean).join(" · ")}
        </p>
      </header>
      <SystemUnits system={system} />
      {system.notes ? <p className="whitespace-pre-line text-sm text-ink-soft">{system.notes}</p> : null}
      {photos}
    </article>
  );
}
