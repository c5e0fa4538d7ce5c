import { useId } from "react";
import { Link } from "react-router-dom";
import type { FacilityAnswer, FeatureAnswer, FeatureKind, FeatureStatus, SystemAnswer } from "#shared/schemas/facility.ts";
import { FEATURE_HEADING, FEATURE_STATUS_LOOK, LAYER_IN_WORDS, longDay, tenths, whole } from "../facility-words.ts";

/** A feature's status as shape and word: open ring planned, half disc under way, full disc done. */
export function FeatureStatusMark({ status }: { status: FeatureStatus }) {
  const look = FEATURE_STATUS_LOOK[status];
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap text-sm font-medium" data-status={status}>
      <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" data-shape={look.shape}>
        <circle cx="6" cy="6" r="4.6" fill={look.shape === "disc" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.4" />
        {look.shape === "half" ? <path d="M6 1.4A4.6 4.6 0 0 1 6 10.6Z" fill="currentColor" /> : null}
      </svg>
      {look.word}
    </span>
  );
}

/** The engineering figures worth a prospect's question: fuel autonomy and heat removal, each marked indicative. */
function Figures({ systems, cautionId }: { systems: SystemAnswer[]; cautionId: string }) {
  const fuel = systems.filter((s) => s.fuel);
  const heat = systems.filter((s) => s.heat);
  if (fuel.length === 0 && heat.length === 0) return null;
  const mark = (
    <span className="ml-1 whitespace-nowrap text-xs text-ink-faint" aria-describedby={cautionId}>
      (indicative)
    </span>
  );
  return (
    <ul className="flex flex-col gap-3" data-testid="engineering-figures">
      {fuel.map((s) => {
        const f = s.fuel!;
        return (
          <li key={`fuel-${s.id}`} data-testid="fuel-fact">
            <p className="font-medium">Fuel autonomy · {s.name}</p>
            <p className="text-[0.95rem]">
              {f.autonomyHoursAtDesignLoad !== null ? `About ${tenths(f.autonomyHoursAtDesignLoad)} hours at the design load of the blocks served (${whole(f.designLoadKw)} kW)` : "No design load to work from yet"}
              {f.autonomyHoursAtFullLoad !== null && f.fullLoadKw !== null ? `; ${tenths(f.autonomyHoursAtFullLoad)} hours with the generators at full load (${whole(f.fullLoadKw)} kW)` : ""}.
              {mark}
            </p>
            <p className="text-sm text-ink-soft">
              From {whole(f.usableLitres)} L of usable fuel at {f.specificFuelConsumption} L per kWh.
            </p>
          </li>
        );
      })}
      {heat.map((s) => {
        const h = s.heat!;
        const margin = h.marginKw >= 0 ? `a margin of ${whole(h.marginKw)} kW` : `${whole(-h.marginKw)} kW short`;
        return (
          <li key={`heat-${s.id}`} data-testid="heat-fact">
            <p className="font-medium">Heat removal · {s.name}</p>
            <p className="text-[0.95rem]">
              About {whole(h.removalKw)} kW against {whole(h.loadKw)} kW of IT load: {margin}.{mark}
            </p>
            {h.inletBand && s.design.supplyAirC !== null ? (
              <p className="text-sm text-ink-soft">
                Supply air at {tenths(s.design.supplyAirC)} °C: {h.inletBand}.
              </p>
            ) : null}
          </li>
        );
      })}
    </ul>
  );
}

const FEATURE_ORDER: readonly FeatureKind[] = ["security", "client", "connectivity", "certification"];
const LAYER_ORDER = ["perimeter", "building", "hall", "rack"] as const;

function FeatureList({ kind, features }: { kind: FeatureKind; features: FeatureAnswer[] }) {
  const sorted = kind === "security" ? [...features].sort((a, b) => LAYER_ORDER.indexOf(a.layer ?? "rack") - LAYER_ORDER.indexOf(b.layer ?? "rack")) : features;
  return (
    <section aria-labelledby={`facts-${kind}`} data-testid={`features-${kind}`}>
      <h3 id={`facts-${kind}`} className="label-caps mb-2">
        {FEATURE_HEADING[kind]}
      </h3>
      <ul className="divide-y divide-rule border-y border-rule">
        {sorted.map((f) => (
          <li key={f.id} className="flex flex-col gap-0.5 py-2 sm:flex-row sm:items-baseline sm:justify-between sm:gap-4">
            <div className="min-w-0">
              <p className="font-medium">
                {f.layer ? <span className="text-ink-soft">{LAYER_IN_WORDS[f.layer]}: </span> : null}
                {f.name}
              </p>
              {f.detail ? <p className="text-sm text-ink-soft">{f.detail}</p> : null}
            </div>
            <p className="shrink-0 sm:text-right">
              <FeatureStatusMark status={f.status} />
              {f.statusDate ? <span className="block text-xs text-ink-soft">{FEATURE_STATUS_LOOK[f.status].shape === "disc" ? "since" : "expected"} {longDay(f.statusDate)}</span> : null}
            </p>
          </li>
        ))}
      </ul>
    </section>
  );
}

/**
 * The key facts a prospect asks for beside the blocks: fuel autonomy and heat removal (with
 * the indicative caution), security layer by layer, what a client's team finds on site,
 * connectivity and certifications, and the site rules wherever visits are mentioned.
 */
export function KeyFacts({ facility, slug, visitsOffered }: { facility: Pick<FacilityAnswer, "systems" | "features" | "caution">; slug: string; visitsOffered: boolean }) {
  const cautionId = useId();
  const byKind = (k: FeatureKind) => facility.features.filter((f) => f.kind === k);
  return (
    <div className="flex flex-col gap-6">
      <div className="flex flex-col gap-3">
        <Figures systems={facility.systems} cautionId={cautionId} />
        <p id={cautionId} className="border-l-4 border-watch bg-sheet px-3 py-2 text-sm text-ink-soft" data-testid="indicative-caution">
          <span className="font-semibold text-ink">Indicative only. </span>
          {facility.caution}
        </p>
      </div>
      <div className="grid gap-6 lg:grid-cols-2">
        {FEATURE_ORDER.filter((k) => byKind(k).length > 0).map((k) => (
          <FeatureList key={k} kind={k} features={byKind(k)} />
        ))}
      </div>
      {visitsOffered ? (
        <p className="border-l-4 border-ink bg-sheet px-3 py-2 text-sm" data-testid="visit-safety">
          <span className="font-semibold">Visiting the site: </span>a construction site is hazardous. Visits are escorted at all times; every visitor takes the site induction and wears the protective equipment issued.{" "}
          <Link to={`/projects/${slug}/enquire`} className="font-medium underline underline-offset-4">
            Ask for a visit
          </Link>
        </p>
      ) : null}
    </div>
  );
}
