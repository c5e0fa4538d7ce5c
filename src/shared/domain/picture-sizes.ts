/**
 * What the server's preload hints and the client's <Picture> must agree on byte for byte: a
 * preload whose `srcset` or `sizes` differs from the image's is a second download, not a head start.
 */

/** How wide a post's cover is drawn: the column's 768 px, or the phone's width less its margins. */
export const POST_COVER_SIZES = "(min-width: 800px) 768px, calc(100vw - 2rem)";

/** "a.avif 320w, b.avif 640w": narrowest first, one entry per width. */
export function srcSetOf<V extends { url: string; width: number }>(variants: readonly V[]): string {
  const byWidth = new Map<number, V>();
  for (const v of variants) if (!byWidth.has(v.width)) byWidth.set(v.width, v);
  return [...byWidth.values()]
    .sort((a, b) => a.width - b.width)
    .map((v) => `${v.url} ${v.width}w`)
    .join(", ");
}
