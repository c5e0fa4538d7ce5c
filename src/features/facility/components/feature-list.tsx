import { FeatureKindSchema, type FeatureAnswer, type FeatureKind, type FeatureStatus } from "#shared/schemas/facility.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { formatDate } from "../../../lib/format.ts";
import { FEATURE_KIND_WORD, FEATURE_STATUS_WORD, LAYER_WORD } from "../words.ts";

/** How far a feature has got, as a shape: an open ring (planned), a half disc (on the way), a filled disc (in place, certified). */
const STATUS_GLYPH: Record<FeatureStatus, string> = { planned: "○", in_progress: "◐", contracted: "◐", in_audit: "◐", in_place: "●", certified: "●" };

/** The site features a prospect asks about, by kind, each with its status by word and shape. */
export function FeatureList({ features, onEdit, onAdd }: { features: FeatureAnswer[]; onEdit?: (f: FeatureAnswer) => void; onAdd?: (kind: FeatureKind) => void }) {
  return (
    <div className="grid gap-4 md:grid-cols-2">
      {FeatureKindSchema.options.map((kind) => {
        const list = features.filter((f) => f.kind === kind);
        return (
          <section key={kind} aria-labelledby={`features-${kind}`} className="flex flex-col gap-2 border border-rule bg-sheet p-3" data-testid={`features-${kind}`}>
            <div className="flex items-center justify-between gap-2">
              <h3 id={`features-${kind}`} className="font-semibold">
                {FEATURE_KIND_WORD[kind]}
              </h3>
              {onAdd ? (
                <Button size="sm" onClick={() => onAdd(kind)} aria-label={`Add to ${FEATURE_KIND_WORD[kind]}`}>
                  + Add
                </Button>
              ) : null}
            </div>
            {list.length === 0 ? (
              <p className="text-sm text-ink-faint">Nothing recorded yet.</p>
            ) : (
              <ul className="flex flex-col divide-y divide-rule text-sm">
                {list.map((f) => (
                  <li key={f.id} className="flex flex-wrap items-start justify-between gap-2 py-2">
                    <div className="min-w-0 flex-1">
                      <p className="font-medium">
                        {f.layer ? <span className="label-caps mr-1">{LAYER_WORD[f.layer]}</span> : null}
                        {f.name}
                      </p>
                      {f.detail ? <p className="text-xs text-ink-soft">{f.detail}</p> : null}
                      <p className="mt-0.5 flex flex-wrap items-center gap-2 text-xs">
                        <span className="inline-flex items-center gap-1 font-medium" data-status={f.status}>
                          <span aria-hidden>{STATUS_GLYPH[f.status]}</span>
                          {FEATURE_STATUS_WORD[f.status]}
                          {f.statusDate ? ` · ${formatDate(f.statusDate)}` : ""}
                        </span>
                        <AudienceMark audience={f.audience} />
                      </p>
                    </div>
                    {onEdit ? (
                      <Button size="sm" onClick={() => onEdit(f)} aria-label={`Edit ${f.name}`}>
                        Edit
                      </Button>
                    ) : null}
                  </li>
                ))}
              </ul>
            )}
          </section>
        );
      })}
    </div>
  );
}
