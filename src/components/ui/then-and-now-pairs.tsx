import type { ThenAndNowPair } from "#shared/schemas/writing-help.ts";
import { formatDate } from "../../lib/format.ts";
import { Button } from "./button.tsx";
import { Picture } from "./picture.tsx";

/** How alike the two framings are, in words (the Hamming distance of their fingerprints, decision 063). */
export function likenessWords(distance: number): string {
  if (distance <= 3) return "almost the same framing";
  if (distance <= 8) return "the same framing";
  return "a similar framing";
}

function Side({ label, photo }: { label: string; photo: ThenAndNowPair["then"] }) {
  return (
    <figure className="flex min-w-0 flex-1 flex-col gap-1">
      <Picture picture={photo.picture} fit="cover" aspect={4 / 3} sizes="14rem" alt={photo.picture.altText ?? photo.caption ?? `${label} photo`} />
      <figcaption className="text-xs text-ink-soft">
        <span className="label-caps">{label}</span> · Taken {formatDate(photo.takenAt)}
      </figcaption>
    </figure>
  );
}

/**
 * Then-and-now pairs side by side, each with both capture dates, how far apart and how alike;
 * `action` puts one button under each pair (the story editor's "Add this pair").
 */
export function ThenAndNowPairs({ pairs, action }: { pairs: readonly ThenAndNowPair[]; action?: { label: string; onClick: (pair: ThenAndNowPair) => void } }) {
  return (
    <ul className="flex flex-col gap-4" aria-label="Then-and-now pairs">
      {pairs.map((pair) => (
        <li key={`${pair.then.mediaId}-${pair.now.mediaId}`} data-testid="then-and-now-pair" className="flex flex-col gap-2 border border-rule bg-paper p-3">
          <p className="text-sm">
            <span className="font-semibold">{pair.area}</span>
            <span className="text-ink-soft">
              {" "}
              · {pair.daysApart} days apart · {likenessWords(pair.distance)}
            </span>
          </p>
          <div className="flex gap-2">
            <Side label="Then" photo={pair.then} />
            <Side label="Now" photo={pair.now} />
          </div>
          {action ? (
            <div>
              <Button size="sm" onClick={() => action.onClick(pair)}>
                {action.label}
              </Button>
            </div>
          ) : null}
        </li>
      ))}
    </ul>
  );
}
