import type { StagePreview } from "../preview.ts";

/** A readiness as word and shape: a filled disc for ready, an open ring for not yet. */
export function ReadyMark({ ready }: { ready: boolean }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap font-medium" data-ready={ready}>
      <span aria-hidden>{ready ? "●" : "○"}</span>
      {ready ? "Ready for service" : "Not ready"}
    </span>
  );
}

/** What stands between a block and service, folded under its count: the list is long while a build is young. */
export function MissingList({ name, missing }: { name: string; missing: readonly string[] }) {
  return (
    <details className="text-xs text-ink-soft" data-testid="missing">
      <summary className="cursor-pointer underline decoration-rule-strong underline-offset-2">
        {missing.length} thing{missing.length === 1 ? "" : "s"} still missing
      </summary>
      <ul className="mt-1 list-disc pl-5" aria-label={`Still missing for ${name}`}>
        {missing.map((m) => (
          <li key={m}>{m}</li>
        ))}
      </ul>
    </details>
  );
}

function Change({ before, after }: { before: string; after: string }) {
  const changed = before !== after;
  return (
    <span className="tabular inline-flex flex-wrap items-baseline gap-x-1.5">
      <span className={changed ? "text-ink-faint line-through decoration-1" : ""}>{before}</span>
      <span aria-hidden>→</span>
      <span className="sr-only">becomes</span>
      <span className={changed ? "font-semibold text-ink" : ""}>{after}</span>
    </span>
  );
}

/**
 * What saving the unit's new stage does, before it is saved: the system's now-label
 * against its design label, and each block it serves, ready or not with what is missing.
 */
export function StagePreviewPanel({ preview }: { preview: StagePreview }) {
  const { before, after } = preview;
  return (
    <section aria-label="Before you save" aria-live="polite" className="border-2 border-ink bg-accent-wash/40 p-3" data-testid="stage-preview">
      <p className="label-caps text-ink">Before you save</p>
      {preview.error ? (
        <p role="alert" className="mt-1 text-sm text-bad">
          ▲ {preview.error}
        </p>
      ) : null}
      <dl className="mt-2 flex flex-col gap-2 text-[0.95rem]">
        <div data-testid="preview-label">
          <dt className="font-semibold">{preview.systemName}</dt>
          <dd>
            now <Change before={before.now} after={after.now} /> <span className="text-ink-soft">· design {after.design}</span>
          </dd>
          <dd className="text-xs text-ink-soft">
            {after.available} of {after.planned} available to carry load
            {after.shortfall > 0 ? `; ${after.shortfall} more to reach the design label` : "; the design label is reached"}
          </dd>
        </div>
        {preview.blocks.map((b) => (
          <div key={b.id} data-testid="preview-block" data-block-id={b.id}>
            <dt className="font-semibold">{b.name}</dt>
            <dd className="flex flex-wrap items-center gap-x-1.5">
              <ReadyMark ready={b.before.ready} />
              <span aria-hidden>→</span>
              <span className="sr-only">becomes</span>
              <ReadyMark ready={b.after.ready} />
            </dd>
            {b.after.missing.length > 0 ? (
              <dd>
                <MissingList name={b.name} missing={b.after.missing} />
              </dd>
            ) : null}
          </div>
        ))}
      </dl>
      {preview.blocks.length === 0 ? <p className="mt-1 text-xs text-ink-soft">This system serves no capacity block yet.</p> : null}
    </section>
  );
}
