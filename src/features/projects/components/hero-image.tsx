import type { Focal, MediaPicture } from "#shared/schemas/media.ts";
import { Picture } from "../../../components/ui/picture.tsx";

/**
 * The boxes a hero is cropped to: taller on a phone, where a wide band would be a sliver; wide on a
 * desktop. The site office's picker previews the same two (decision 055).
 */
export const HERO_FRAMES = {
  /** The project page: 4:3 on a phone, 21:9 from 640 px. */
  project: { className: "aspect-[4/3] sm:aspect-[21/9]", phone: 4 / 3, desktop: 21 / 9 },
  /** The home page with one build: 4:3 on a phone, 16:9 from 640 px. */
  home: { className: "aspect-[4/3] sm:aspect-[16/9]", phone: 4 / 3, desktop: 16 / 9 },
  /** A build's card in the home page's list. */
  card: { className: "aspect-[16/9]", phone: 16 / 9, desktop: 16 / 9 },
} as const;
export type HeroFrame = keyof typeof HERO_FRAMES;

/**
 * A photo cropped to its frame around a focal point (the hero's own, chosen in the site office,
 * which may differ from the photo's), from the responsive derivatives. The box holds its ratio
 * before the pixels arrive, so nothing below it moves.
 */
export function HeroImage({ picture, focus, frame, sizes, eager = false, alt }: { picture: MediaPicture; focus: Focal; frame: HeroFrame; sizes: string; eager?: boolean; alt?: string }) {
  const f = HERO_FRAMES[frame];
  return (
    <div className={`overflow-hidden border border-rule ${f.className}`} style={{ backgroundColor: picture.dominantColor ?? undefined }} data-testid="hero-image">
      <Picture picture={{ ...picture, focal: focus }} eager={eager} fit="cover" aspect={f.desktop} sizes={sizes} className="h-full" alt={alt} />
    </div>
  );
}

/** The "Illustration" mark in words, for a crop that may cut off the mark drawn on a generated picture. */
export function IllustrationMark() {
  return <span className="ml-2 border border-rule-strong px-1 text-xs font-semibold uppercase tracking-wide">Illustration</span>;
}
