import type { MediaPicture } from "#shared/schemas/media.ts";
import { Picture } from "../../../components/ui/picture.tsx";
import { capturedOn, monthWords } from "../words.ts";

/**
 * A gallery thumbnail (decision 055): the whole photo at its own ratio, never cropped, so the mark
 * drawn on an illustration stays in view; its caption and date under it.
 */
export function GalleryThumb({ photo, onOpen }: { photo: MediaPicture & { month: string | null }; onOpen: () => void }) {
  const on = capturedOn(photo.takenAt) ?? (photo.month ? monthWords(photo.month) : null);
  const words = photo.caption || photo.altText;
  return (
    <figure className="flex h-full flex-col" data-testid="gallery-thumb">
      <button
        type="button"
        onClick={onOpen}
        className="block w-full border border-rule bg-paper text-left hover:border-ink"
        aria-label={`Open photo: ${photo.altText || photo.caption || "site photograph"}`}
        data-testid="gallery-photo"
      >
        <Picture picture={photo} fit="cover" aspect={photo.width / photo.height} sizes="(min-width: 1280px) 15rem, (min-width: 640px) 30vw, 50vw" />
      </button>
      <figcaption className="mt-1.5 text-sm leading-snug">
        {words ? <span className="line-clamp-2 block" data-testid="gallery-caption">{words}</span> : null}
        <span className="block text-xs text-ink-soft" data-testid="gallery-date">
          {on ?? "Date not recorded"}
          {photo.isIllustration ? " · Illustration" : ""}
        </span>
      </figcaption>
    </figure>
  );
}
