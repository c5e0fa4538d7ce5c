import type { Audience } from "#shared/schemas/common.ts";
import type { ThenAndNowPair } from "#shared/schemas/writing-help.ts";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ThenAndNowPairs } from "../../../components/ui/then-and-now-pairs.tsx";
import { useStoryPairs } from "../api.ts";

const WORDS: Record<Audience, string> = {
  public: "cleared for the public",
  investor: "cleared for investors",
  internal: "of the site office",
};

/**
 * Then-and-now pairs found among the project's photos for the story's audience: two photos of one
 * area taken months apart from the same spot. "Add this pair" adds them as a then-and-now item;
 * pairs the story already holds are not offered again.
 */
export function ThenAndNowPanel({ slug, audience, inStory, onAdd }: { slug: string; audience: Audience; inStory: ReadonlySet<string>; onAdd: (pair: ThenAndNowPair) => void }) {
  const pairs = useStoryPairs(slug, { audience, limit: 12 });
  const offered = (pairs.data?.pairs ?? []).filter((p) => !inStory.has(`${p.then.mediaId}-${p.now.mediaId}`));
  return (
    <section aria-labelledby="pairs-h" className="flex flex-col gap-3">
      <div>
        <h2 id="pairs-h" className="font-semibold">
          Then and now
        </h2>
        <p className="text-sm text-ink-soft">Photos {WORDS[audience]} of one area, taken at least a month apart from the same spot, found by likeness. Check both before you add them.</p>
      </div>
      {pairs.isPending ? <p className="text-sm text-ink-soft">Looking for pairs…</p> : null}
      {pairs.isError ? <Notice tone="error">The pairs could not be found: {pairs.error.message}</Notice> : null}
      {pairs.isSuccess && offered.length === 0 ? <p className="text-sm text-ink-soft">No pair found for this audience yet.</p> : null}
      {offered.length > 0 ? <ThenAndNowPairs pairs={offered} action={{ label: "Add this pair", onClick: onAdd }} /> : null}
    </section>
  );
}
