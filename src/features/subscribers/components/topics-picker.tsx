import { useId } from "react";
import type { System } from "#shared/schemas/programme.ts";
import type { Topics } from "#shared/schemas/subscribers.ts";
import { FieldError } from "../../../components/ui/field.tsx";
import { SYSTEM_WORD } from "../../../lib/format.ts";

function Check({ label, checked, onChange }: { label: string; checked: boolean; onChange: (on: boolean) => void }) {
  return (
    <label className="flex items-center gap-2 py-1 text-sm">
      <input type="checkbox" className="size-4" checked={checked} onChange={(e) => onChange(e.target.checked)} />
      {label}
    </label>
  );
}

/**
 * Topics as a choice between everything and a chosen set of areas and plant systems.
 * `null` is everything; an item reaches the subscriber when it carries any chosen topic.
 */
export function TopicsPicker({
  value,
  onChange,
  areas,
  systems,
  error,
}: {
  value: Topics | null;
  onChange: (t: Topics | null) => void;
  areas: string[];
  systems: System[];
  error?: string;
}) {
  const name = useId();
  const chosen = value ?? { areas: [], systems: [] };
  const toggle = <K extends keyof Topics>(kind: K, item: Topics[K][number], on: boolean) => {
    const list = chosen[kind] as string[];
    const next = on ? [...list, item as string] : list.filter((x) => x !== item);
    onChange({ ...chosen, [kind]: next });
  };
  return (
    <fieldset className="flex flex-col gap-2" aria-describedby={error ? `${name}-error` : undefined}>
      <legend className="text-sm font-medium text-ink">Topics</legend>
      <label className="flex items-center gap-2 text-sm">
        <input type="radio" name={name} className="size-4" checked={value === null} onChange={() => onChange(null)} />
        Everything about this build
      </label>
      <label className="flex items-center gap-2 text-sm">
        <input type="radio" name={name} className="size-4" checked={value !== null} onChange={() => onChange(chosen)} />
        Only the areas and systems I choose
      </label>
      {value !== null ? (
        <div className="grid gap-4 border-l-2 border-rule pl-4 sm:grid-cols-2">
          {areas.length > 0 ? (
            <fieldset>
              <legend className="label-caps">Areas</legend>
              {areas.map((a) => (
                <Check key={a} label={a} checked={chosen.areas.includes(a)} onChange={(on) => toggle("areas", a, on)} />
              ))}
            </fieldset>
          ) : null}
          <fieldset>
            <legend className="label-caps">Plant and systems</legend>
            {systems.map((s) => (
              <Check key={s} label={SYSTEM_WORD[s]} checked={chosen.systems.includes(s)} onChange={(on) => toggle("systems", s, on)} />
            ))}
          </fieldset>
        </div>
      ) : null}
      <FieldError id={`${name}-error`} error={error} />
    </fieldset>
  );
}
