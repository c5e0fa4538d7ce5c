import type { ReactNode } from "react";
import { Link } from "react-router-dom";
import type { BlockAnswer, SystemAnswer } from "#shared/schemas/facility.ts";
import { CONTAINMENT_IN_WORDS, readyInWords, tenths, whole } from "../facility-words.ts";

/** Ready or not, as a shape and a word: a filled disc for ready, an open ring for not yet. */
function ReadyMark({ ready }: { ready: boolean }) {
  return (
    <span className="inline-flex items-center gap-1.5 text-sm font-medium" data-ready={ready}>
      <svg aria-hidden width="12" height="12" viewBox="0 0 12 12">
        {ready ? <circle cx="6" cy="6" r="5" fill="currentColor" /> : <circle cx="6" cy="6" r="4.2" fill="none" stroke="currentColor" strokeWidth="1.6" />}
      </svg>
      {ready ? "Ready for service" : "Not yet ready for service"}
    </span>
  );
}

/** How many of the missing conditions show before the rest fold away: a phone shows the card, not a list. */
const MISSING_SHOWN = 3;

/** What still stands between the block and service: the first few, the rest behind "N more". */
export function Missing({ items }: { items: string[] }) {
  const first = items.slice(0, MISSING_SHOWN);
  const rest = items.slice(MISSING_SHOWN);
  return (
    <div className="mt-1 text-sm" data-testid="block-missing">
      <p className="font-medium">Still to do before service:</p>
      <ul className="mt-0.5 list-disc pl-5 text-ink-soft">
        {first.map((m) => (
          <li key={m}>{m}</li>
        ))}
      </ul>
      {rest.length > 0 ? (
        <details className="mt-1">
          <summary className="cursor-pointer underline underline-offset-4">
            {rest.length} more {rest.length === 1 ? "thing" : "things"} to do
          </summary>
          <ul className="mt-0.5 list-disc pl-5 text-ink-soft">
            {rest.map((m) => (
              <li key={m}>{m}</li>
            ))}
          </ul>
        </details>
      ) : null}
    </div>
  );
}

function Figure({ label, value, unit }: { label: string; value: string; unit?: string }) {
  return (
    <div className="flex flex-col">
      <dt className="text-xs text-ink-soft">{label}</dt>
      <dd className="tabular text-2xl font-semibold leading-tight">
        {value}
        {unit ? <span className="ml-1 text-base font-normal text-ink-soft">{unit}</span> : null}
      </dd>
    </div>
  );
}

/**
 * One capacity block as a prospect reads it: racks, IT load and density first, then when it
 * is ready for service against the original plan, what still stands in the way, how it is
 * cooled, the plant serving it, and the two ways on: the updates about it and the enquiry.
 */
export function BlockCard({ block, systems, slug, updatesHref, photos }: { block: BlockAnswer; systems: SystemAnswer[]; slug: string; updatesHref: string; photos?: ReactNode }) {
  const serving = systems.filter((s) => block.systemIds.includes(s.id));
  const cooling = [block.coolingApproach, block.containment !== "none" ? CONTAINMENT_IN_WORDS[block.containment] : ""].filter(Boolean).join(", ");
  const headingId = `block-${block.id}`;
  return (
    <article aria-labelledby={headingId} className="flex min-w-0 flex-col gap-4 border border-rule bg-sheet p-4 sm:p-5" data-testid="block-card" data-block-id={block.id}>
      <header className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <h3 id={headingId} className="text-xl font-semibold">
          {block.name}
        </h3>
        {block.stage ? <p className="label-caps">{block.stage}</p> : null}
      </header>
      <dl className="grid grid-cols-3 gap-3 border-y border-rule py-3">
        <Figure label="Racks" value={whole(block.racks)} />
        <Figure label="IT load" value={whole(block.itKw)} unit="kW" />
        <Figure label="Up to" value={tenths(block.maxKwPerRack)} unit="kW/rack" />
      </dl>
      <div className="flex flex-col gap-1">
        <ReadyMark ready={block.readyForService} />
        <p className="text-[0.95rem]" data-testid="block-ready">
          {readyInWords(block)}
        </p>
        {!block.readyForService && block.missing.length > 0 ? <Missing items={block.missing} /> : null}
      </div>
      {cooling ? (
        <p className="text-sm">
          <span className="font-medium">Cooling:</span> {cooling}
        </p>
      ) : null}
      {serving.length > 0 ? (
        <div className="text-sm">
          <p className="font-medium">Plant serving it</p>
          <dl className="mt-0.5 grid grid-cols-[minmax(0,1fr)_auto] gap-x-3">
            {serving.map((s) => (
              <div key={s.id} className="contents">
                <dt>{s.name}</dt>
                <dd className="tabular text-right text-ink-soft">
                  design {s.redundancy.design} · now {s.redundancy.now}
                </dd>
              </div>
            ))}
          </dl>
        </div>
      ) : null}
      {block.notes ? <p className="whitespace-pre-line font-serif text-[0.95rem] text-ink-soft">{block.notes}</p> : null}
      {photos}
      <footer className="mt-auto flex flex-wrap items-center gap-x-4 gap-y-3 pt-1">
        <Link
          to={`/projects/${slug}/enquire?block=${block.id}`}
          className="inline-flex items-center rounded-sm border border-ink bg-sheet px-4 py-2 font-medium text-ink hover:bg-paper"
          aria-label={`Ask about this block: ${block.name}`}
        >
          Ask about this block
        </Link>
        <Link to={updatesHref} className="text-sm font-medium underline underline-offset-4">
          Updates about {block.name} →
        </Link>
      </footer>
    </article>
  );
}
