/**
 * What the server's preload hints and the client's <Picture> must agree on byte for byte: a
 * preload whose `srcset` or `sizes` differs from the image's is a second download, not a head start.
 */

/** How wide a post's cover is drawn: the column's 768 px, or the phone's width less its margins. */
export const POST_COVER_SIZES = "(min-width: 800px) 768px, calc(100vw - 2rem)";

/** How wide a photo in a post's body is drawn: the text's 720 px, or the phone's width less its margins. */
export const POST_PHOTO_SIZES = "(min-width: 768px) 720px, calc(100vw - 2rem)";

/** How wide a project's hero is drawn (project page, home page): the page's 992 px column, or the phone's full width. */
export const HERO_SIZES = "(min-width: 1024px) 992px, 100vw";

/** How wide the home page draws its one build's hero: three fifths of the 992 px column beside the figures, the phone's full width. */
export const HOME_HERO_SIZES = "(min-width: 1024px) 592px, (min-width: 768px) 60vw, 100vw";

/** "a.avif 320w, b.avif 640w": narrowest first, one entry per width. */
export function srcSetOf<V extends { url: string; width: number }>(variants: readonly V[]): string {
  const byWidth = new Map<number, V>();
  for (const v of variants) if (!byWidth.has(v.width)) byWidth.set(v.width, v);
  return [...byWidth.values()]
    .sort((a, b) => a.width - b.width)
    .map((v) => `${v.url} ${v.width}w`)
    .join(", ");
}
