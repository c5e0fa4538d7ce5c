import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { toast } from "sonner";
import { AudienceSchema, type Audience } from "#shared/schemas/common.ts";
import type { DraftSuggestion } from "#shared/schemas/writing-help.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { Notice, Sheet } from "../../../components/ui/sheet.tsx";
import { AUDIENCE_WORD } from "../../../lib/words.ts";
import { draftSuggestionQueryOptions, useDraftFromSuggestion } from "../api.ts";

const AUDIENCE_CHOICES = AudienceSchema.options.map((a) => ({ value: a, label: AUDIENCE_WORD[a] }));

function SuggestionBody({ s }: { s: DraftSuggestion }) {
  return (
    <div className="flex flex-col gap-3 text-sm">
      <p>
        <span className="text-ink-soft">Suggested title: </span>
        <strong data-testid="suggested-title">{s.title}</strong>
      </p>
      {s.groups.map((g) => (
        <section key={g.heading} aria-label={g.heading}>
          <h3 className="font-semibold">{g.heading}</h3>
          <ul className="ml-5 list-disc">
            {g.moves.map((m, i) => (
              <li key={`${m.kind}-${m.milestoneId ?? m.title}-${i}`}>
                {m.title}: {m.detail}
              </li>
            ))}
          </ul>
        </section>
      ))}
      {s.photos.length ? (
        <section aria-label="Suggested photographs">
          <h3 className="font-semibold">Photographs, best first</h3>
          <ul className="mt-1 flex flex-wrap gap-2">
            {s.photos.map((p) => (
              <li key={p.mediaId} className="w-28">
                {p.thumbUrl ? <img src={p.thumbUrl} alt={p.altCandidate} className="h-20 w-28 object-cover" loading="lazy" /> : null}
                <p className="mt-0.5 text-xs text-ink-soft">Shows {p.because.join(", ")}</p>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}

/**
 * Offered when an update is started: what happened since the last published update of the
 * chosen audience, and one button that makes a draft of it and opens it. "Start blank" leaves
 * the empty editor as it was (decision 061).
 */
export function DraftSuggestionPanel({ slug, onStartBlank }: { slug: string; onStartBlank: () => void }) {
  const navigate = useNavigate();
  const [audience, setAudience] = useState<Audience>("public");
  const suggestion = useQuery(draftSuggestionQueryOptions(slug, audience));
  const start = useDraftFromSuggestion(slug);
  const s = suggestion.data?.suggestion ?? null;
  const startFromThis = () =>
    start.mutate(audience, {
      onSuccess: (made) => navigate(`/office/updates/${made.id}?project=${slug}`),
      onError: (e) => toast.error(e instanceof Error ? e.message : "The draft could not be made."),
    });
  return (
    <Sheet title="Start from what happened" className="mb-4">
      <div className="flex flex-col gap-3" data-testid="draft-suggestion">
        <div className="max-w-xs">
          <SelectField label="Update for" value={audience} options={AUDIENCE_CHOICES} onChange={(e) => setAudience(AudienceSchema.parse(e.target.value))} />
        </div>
        {suggestion.isPending ? <p className="text-sm text-ink-soft">Looking at what happened since the last update…</p> : null}
        {suggestion.isError ? <Notice tone="error">The suggestion could not be read. Start blank, or try again.</Notice> : null}
        {suggestion.isSuccess && !s ? <Notice>Nothing has happened since the last published update for this audience.</Notice> : null}
        {s ? <SuggestionBody s={s} /> : null}
        <p className="text-xs text-ink-soft">A draft is only a start: nothing is published or sent until it goes through review as usual. Check each photo's alt text; it is suggested from the caption.</p>
        <div className="flex flex-wrap gap-2">
          {s ? (
            <Button variant="primary" busy={start.isPending} disabled={start.isPending} onClick={startFromThis}>
              Start from this
            </Button>
          ) : null}
          <Button variant={s ? "secondary" : "primary"} onClick={onStartBlank}>
            Start blank
          </Button>
        </div>
      </div>
    </Sheet>
  );
}
