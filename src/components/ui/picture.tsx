import { useCallback, useState, type CSSProperties } from "react";
import { srcSetOf } from "#shared/domain/picture-sizes.ts";

/** One encoded derivative of a photo, as the media service describes it. */
export interface PictureVariant {
  url: string;
  /** Pixels. */
  width: number;
  /** Pixels. */
  height: number;
  format: "avif" | "webp" | "jpeg";
}

/**
 * What <Picture> needs of a photo. The media service's MediaPicture has this shape (and
 * more); the primitive asks only for the structure so it never depends on a feature.
 */
export interface PictureData {
  id: number;
  /** Oriented width of the original, pixels. */
  width: number;
  /** Oriented height of the original, pixels. */
  height: number;
  altText: string | null;
  placeholder?: string | null;
  dominantColor?: string | null;
  focal?: { x: number; y: number } | null;
  sources: { avif: PictureVariant[]; webp: PictureVariant[]; jpeg: PictureVariant[] };
}

const MIME = { avif: "image/avif", webp: "image/webp", jpeg: "image/jpeg" } as const;

// Shared with the server's preload hints, which must write the very same srcset.
export { srcSetOf };

/**
 * The `src` for browsers that read neither `srcset` nor `<source>`: the JPEG nearest
 * 1024 px wide (a sensible middle), else the widest of any format.
 */
function fallbackOf(p: PictureData): PictureVariant | null {
  const pool = p.sources.jpeg.length ? p.sources.jpeg : [...p.sources.webp, ...p.sources.avif];
  if (pool.length === 0) return null;
  return [...pool].sort((a, b) => Math.abs(a.width - 1024) - Math.abs(b.width - 1024))[0] ?? null;
}

export interface PictureProps {
  picture: PictureData;
  /** The `sizes` attribute: how wide the image is drawn at each viewport width. */
  sizes: string;
  /** Above the fold (a hero): load at once with high priority; otherwise lazily. */
  eager?: boolean;
  /** Overrides the photo's own alt text (e.g. "" where a caption beside it says the same). */
  alt?: string;
  /**
   * `natural` spans the width at the photo's own proportions; `cover` fills a box of the
   * given `aspect` (width / height), cropping around the focal point; `contain` fits
   * inside limits the caller sets through `imgClassName` (a lightbox).
   */
  fit?: "natural" | "cover" | "contain";
  aspect?: number;
  className?: string;
  imgClassName?: string;
}

/**
 * A photo as `<picture>`: AVIF and WebP `<source>`s and a JPEG `<img>`, each with
 * `srcset` and `sizes`, so the browser fetches the smallest file that fills the space.
 * `width`/`height` reserve the box before the bytes arrive (nothing shifts), and the
 * dominant colour and blurred placeholder paint it meanwhile.
 */
/** `{ x: 0.25, y: 0.8 }` → "25.0% 80.0%": the CSS `object-position` that keeps a focal point in any crop. */
export function objectPositionOf(focal: { x: number; y: number }): string {
  return `${(focal.x * 100).toFixed(1)}% ${(focal.y * 100).toFixed(1)}%`;
}

export function Picture({ picture, sizes, eager = false, alt, fit = "natural", aspect, className = "", imgClassName = "" }: PictureProps) {
  const [loaded, setLoaded] = useState(false);
  // A cached image can finish before React attaches onLoad; the ref catches that case.
  const ref = useCallback((img: HTMLImageElement | null) => {
    if (img?.complete && img.naturalWidth > 0) setLoaded(true);
  }, []);
  const fallback = fallbackOf(picture);
  const focal = picture.focal ?? { x: 0.5, y: 0.5 };
  const style: CSSProperties = {
    backgroundColor: loaded ? undefined : (picture.dominantColor ?? "#d9d3c4"),
    backgroundImage: loaded || !picture.placeholder ? undefined : `url("${picture.placeholder}")`,
    backgroundSize: "cover",
    backgroundPosition: "center",
    objectPosition: objectPositionOf(focal),
  };
  if (fit === "cover") style.aspectRatio = String(aspect ?? picture.width / picture.height);
  const fitClass = fit === "cover" ? "h-full w-full object-cover" : fit === "contain" ? "h-auto w-auto object-contain" : "h-auto w-full";
  return (
    <picture className={`block ${className}`} data-media-id={picture.id}>
      {(["avif", "webp"] as const).map((f) =>
        picture.sources[f].length ? <source key={f} type={MIME[f]} srcSet={srcSetOf(picture.sources[f])} sizes={sizes} /> : null,
      )}
      <img
        ref={ref}
        src={fallback?.url}
        srcSet={picture.sources.jpeg.length ? srcSetOf(picture.sources.jpeg) : undefined}
        sizes={sizes}
        width={picture.width}
        height={picture.height}
        alt={alt ?? picture.altText ?? ""}
        loading={eager ? "eager" : "lazy"}
        decoding="async"
        // React 19 passes fetchPriority through as the `fetchpriority` attribute.
        fetchPriority={eager ? "high" : "auto"}
        // Keep the placeholder until the pixels are decoded, so nothing flashes blank in between.
        onLoad={(e) => {
          const img = e.currentTarget;
          void (typeof img.decode === "function" ? img.decode() : Promise.resolve()).catch(() => undefined).finally(() => setLoaded(true));
        }}
        className={`block max-w-full ${fitClass} ${imgClassName}`}
        style={style}
      />
    </picture>
  );
}
