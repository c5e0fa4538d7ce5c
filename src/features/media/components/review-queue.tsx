import { toast } from "sonner";
import type { MediaItem } from "#shared/schemas/media.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { SYSTEM_WORD } from "../../../lib/format.ts";
import { useReview } from "../api.ts";
import { formatTakenAt } from "../words.ts";
import { MediaPicture } from "./media-picture.tsx";
import { MissingAlt, SecurityFlag } from "./marks.tsx";

function QueueItem({ item, slug }: { item: MediaItem; slug: string }) {
  const review = useReview(slug);
  const decide = (sensitivity: "cleared" | "restricted") =>
    review.mutate(
      { id: item.id, sensitivity },
      { onSuccess: () => toast.success(sensitivity === "cleared" ? `${item.name} is cleared for publishing` : `${item.name} is restricted to staff`) },
    );
  const headingId = `review-${item.id}`;
  return (
    <li className="grid gap-3 border border-rule bg-sheet p-3 sm:grid-cols-[minmax(0,18rem)_1fr]" aria-labelledby={headingId} data-review-id={item.id} data-media-name={item.name}>
      <MediaPicture item={item} sizes="(min-width: 640px) 18rem, 92vw" className="aspect-[4/3] w-full" />
      <div className="flex min-w-0 flex-col gap-2">
        <h2 id={headingId} className="break-all font-semibold">
          {item.name}
        </h2>
        {item.flaggedForReview ? (
          <div className="flex flex-col gap-1 border-l-4 border-bad bg-[#fbeaea] px-3 py-2 text-sm">
            <SecurityFlag />
            <p>Tagged with the security system. Before clearing, check for door hardware, card readers, cameras, fence lines and anything that shows the site's layout or its location.</p>
          </div>
        ) : null}
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5 text-sm">
          <dt className="text-ink-faint">Taken</dt>
          <dd>{formatTakenAt(item.takenAt)}</dd>
          <dt className="text-ink-faint">Tags</dt>
          <dd>{[...item.tags.areas, ...item.tags.systems.map((s) => SYSTEM_WORD[s])].join(", ") || "None"}</dd>
          <dt className="text-ink-faint">Caption</dt>
          <dd>{item.caption ?? "None"}</dd>
          <dt className="text-ink-faint">Alt text</dt>
          <dd>{item.altText ?? <MissingAlt />}</dd>
          <dt className="text-ink-faint">Uploaded by</dt>
          <dd>{item.uploadedBy ?? "—"}</dd>
        </dl>
        <div className="mt-auto flex flex-wrap gap-2">
          <Button onClick={() => decide("cleared")} busy={review.isPending && review.variables?.sensitivity === "cleared"} disabled={review.isPending}>
            <span aria-hidden>✓</span>
            <span>
              Clear<span className="sr-only"> {item.name}</span> for publishing
            </span>
          </Button>
          <Button variant="danger" onClick={() => decide("restricted")} busy={review.isPending && review.variables?.sensitivity === "restricted"} disabled={review.isPending}>
            <span aria-hidden>■</span>
            <span>
              Restrict<span className="sr-only"> {item.name}</span>
            </span>
          </Button>
        </div>
      </div>
    </li>
  );
}

/** Unreviewed photos, security-flagged first: a lead clears each for publishing or restricts it to staff. */
export function ReviewQueue({ items, slug }: { items: MediaItem[]; slug: string }) {
  if (items.length === 0) return <Notice title="Nothing to review">Every photo of this project has been cleared or restricted.</Notice>;
  return (
    <ul className="flex flex-col gap-3" aria-label="Photos waiting for review">
      {items.map((item) => (
        <QueueItem key={item.id} item={item} slug={slug} />
      ))}
    </ul>
  );
}
