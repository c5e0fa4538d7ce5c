import { useMemo, useState } from "react";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { WorkingCalendar } from "#shared/domain/calendar.ts";
import { SelectField } from "../../../components/ui/field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { WalkSteps } from "../../../components/ui/walk-frame.tsx";
import { UnitHistory } from "./unit-history.tsx";
import { UnitStageForm } from "./unit-stage-form.tsx";

/** Every unit as the walk visits them: system by system, in each system's order. */
export function walkOrder(facility: FacilityAnswer, systemId: number | null): Array<{ unitId: number; systemId: number }> {
  return facility.systems.filter((s) => systemId === null || s.id === systemId).flatMap((s) => s.units.map((u) => ({ unitId: u.id, systemId: s.id })));
}

/**
 * The plant walk: one unit at a time, grouped by system, with the stage set in two taps
 * and its effect shown before saving; for a lead with a phone in one hand.
 */
export function FacilityWalk({ slug, facility, milestones, calendar, timeZone }: { slug: string; facility: FacilityAnswer; milestones: readonly Milestone[]; calendar: WorkingCalendar; timeZone: string }) {
  const [systemId, setSystemId] = useState<number | null>(null);
  const [index, setIndex] = useState(0);
  // Unit ids do not change when a stage is saved, so the order stays put as the record refreshes.
  const order = useMemo(() => walkOrder(facility, systemId), [facility, systemId]);
  const step = order[index];
  const system = step ? facility.systems.find((s) => s.id === step.systemId) : undefined;
  const unit = system?.units.find((u) => u.id === step?.unitId);
  return (
    <div className="mx-auto flex w-full max-w-md flex-col gap-4">
      <SelectField
        label="Walk through"
        value={systemId === null ? "" : String(systemId)}
        onChange={(e) => {
          setSystemId(e.target.value === "" ? null : Number(e.target.value));
          setIndex(0);
        }}
        options={[{ value: "", label: "Every system" }, ...facility.systems.map((s) => ({ value: String(s.id), label: `${s.name} (${s.units.length})` }))]}
      />
      {order.length === 0 ? (
        <Notice title="No units here">Add the units of a system on the facility page, then walk through them.</Notice>
      ) : index >= order.length ? (
        <Notice title="Walk finished">
          You have been through all {order.length} units.{" "}
          <button type="button" className="underline underline-offset-4" onClick={() => setIndex(0)}>
            Start again
          </button>
        </Notice>
      ) : unit && system ? (
        <>
          <UnitStageForm
            key={`${unit.id}-${unit.version}`}
            slug={slug}
            unit={unit}
            system={system}
            facility={facility}
            milestones={milestones}
            calendar={calendar}
            position={`${index + 1} of ${order.length}`}
            thenNext
            onSaved={() => setIndex((i) => i + 1)}
          />
          <UnitHistory unitId={unit.id} timeZone={timeZone} />
        </>
      ) : null}
      <WalkSteps index={index} count={order.length} setIndex={setIndex} />
    </div>
  );
}
