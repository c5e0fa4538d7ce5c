import { useState } from "react";
import { AudienceSchema, type Audience } from "#shared/schemas/common.ts";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ThenAndNowPairs } from "../../../components/ui/then-and-now-pairs.tsx";
import { useLibraryPairs } from "../api.ts";

const FOR: Record<Audience, string> = { public: "A public story", investor: "An investor story", internal: "An internal story" };

/**
 * The library's then-and-now pairs (decision 063): photos of one area taken at least a month
 * apart from the same spot, for a story of the audience chosen. Asked for only when opened.
 */
export function ThenAndNowList({ slug }: { slug: string }) {
  const [open, setOpen] = useState(false);
  const [audience, setAudience] = useState<Audience>("public");
  const pairs = useLibraryPairs(slug, { audience, limit: 24 }, open);
  return (
    <details className="border border-rule bg-sheet" onToggle={(e) => setOpen(e.currentTarget.open)}>
      <summary className="cursor-pointer px-4 py-3">
        <span className="label-caps">Then and now</span> <span className="font-semibold">Pairs found for you</span>
      </summary>
      <div className="flex flex-col gap-3 border-t border-rule px-4 py-3">
        <p className="text-sm text-ink-soft">Two photos of one area, taken at least a month apart from the same spot, found by likeness; add them to a photo story from its editor.</p>
        <label className="flex w-full flex-col gap-1 text-sm sm:w-72">
          <span className="font-medium">For</span>
          <select value={audience} onChange={(e) => setAudience(AudienceSchema.parse(e.target.value))} className="border border-rule-strong bg-sheet px-2 py-1.5">
            {AudienceSchema.options.map((a) => (
              <option key={a} value={a}>
                {FOR[a]}
              </option>
            ))}
          </select>
        </label>
        {open && pairs.isPending ? <p className="text-sm text-ink-soft">Looking for pairs…</p> : null}
        {pairs.isError ? <Notice tone="error">The pairs could not be found: {pairs.error.message}</Notice> : null}
        {pairs.isSuccess && pairs.data.pairs.length === 0 ? <p className="text-sm text-ink-soft">No pair found for this audience yet.</p> : null}
        {pairs.data && pairs.data.pairs.length > 0 ? <ThenAndNowPairs pairs={pairs.data.pairs} /> : null}
      </div>
    </details>
  );
}
