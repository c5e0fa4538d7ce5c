import { lazy, Suspense } from "react";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import { Notice, Sheet, Spinner } from "../../../components/ui/sheet.tsx";
import { useFacilityRead } from "../facility-api.ts";
import { blockFigures, PLANT_KIND_WORD, readyInWords } from "../facility-words.ts";
import { Missing } from "./facility-block-card.tsx";
import { SystemUnits, UnitKey } from "./facility-units.tsx";

// recharts is large; it loads only when the investor room shows the ramp.
const RampChart = lazy(() => import("./facility-ramp-chart.tsx").then((m) => ({ default: m.CapacityRampChart })));

function ReadinessByBlock({ blocks }: { blocks: FacilityAnswer["blocks"] }) {
  if (blocks.length === 0) return <p className="text-sm text-ink-soft">No capacity blocks are shared yet.</p>;
  return (
    <ul className="divide-y divide-rule border-y border-rule" data-testid="readiness-by-block">
      {blocks.map((b) => (
        <li key={b.id} className="flex flex-col gap-1 py-3" data-block-id={b.id}>
          <p className="flex flex-wrap items-baseline justify-between gap-x-3">
            <span className="font-semibold">{b.name}</span>
            <span className="tabular text-sm text-ink-soft">{blockFigures(b)}</span>
          </p>
          <p className="flex items-center gap-1.5 text-[0.95rem]">
            <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0">
              {b.readyForService ? <circle cx="6" cy="6" r="5" fill="currentColor" /> : <circle cx="6" cy="6" r="4.2" fill="none" stroke="currentColor" strokeWidth="1.6" />}
            </svg>
            {readyInWords(b)}
            {b.slipWorkingDays ? <span className="tabular text-sm text-ink-soft">({b.slipWorkingDays > 0 ? "+" : "−"}{Math.abs(b.slipWorkingDays)} working days)</span> : null}
          </p>
          {!b.readyForService && b.missing.length > 0 ? <Missing items={b.missing} /> : null}
        </li>
      ))}
    </ul>
  );
}

function RedundancyBySystem({ systems }: { systems: FacilityAnswer["systems"] }) {
  if (systems.length === 0) return <p className="text-sm text-ink-soft">No plant systems are shared yet.</p>;
  return (
    <div className="flex flex-col gap-4">
      <UnitKey />
      <ul className="grid gap-4 md:grid-cols-2" data-testid="redundancy-by-system">
        {systems.map((s) => (
          <li key={s.id} className="flex min-w-0 flex-col gap-1 border border-rule p-3">
            <p className="label-caps">{PLANT_KIND_WORD[s.kind]}</p>
            <p className="font-semibold">{s.name}</p>
            <SystemUnits system={s} showKey={false} />
          </li>
        ))}
      </ul>
    </div>
  );
}

/**
 * The investor room's view of the facility: the capacity ramp (baseline against forecast),
 * each block's readiness, and each system's redundancy at design and today. Computed on the
 * server over what the caller may see.
 */
export function InvestorFacility({ slug }: { slug: string }) {
  const facility = useFacilityRead(slug);
  if (facility.isPending) return <Spinner label="Reading the facility" />;
  if (facility.isError) return <Notice tone="error">{facility.error.message}</Notice>;
  const f = facility.data;
  return (
    <div id="facility" className="flex scroll-mt-4 flex-col gap-6">
      <Sheet label="Facility" title="Capacity ramp">
        {f.ramp.length === 0 ? (
          <p className="text-sm text-ink-soft">No block has dates to draw yet.</p>
        ) : (
          <Suspense fallback={<Spinner label="Loading the chart" />}>
            <RampChart ramp={f.ramp} />
          </Suspense>
        )}
      </Sheet>
      <Sheet label="Facility" title="Readiness by block">
        <ReadinessByBlock blocks={f.blocks} />
      </Sheet>
      <Sheet label="Facility" title="Redundancy, design and today">
        <RedundancyBySystem systems={f.systems} />
        <p className="mt-4 text-xs text-ink-soft">{f.caution}</p>
      </Sheet>
    </div>
  );
}
