import { useState } from "react";
import type { MediaItem, VariantFormat } from "#shared/schemas/media.ts";

const TYPES: Record<VariantFormat, string> = { avif: "image/avif", webp: "image/webp", jpeg: "image/jpeg" };

function srcSet(item: MediaItem, format: VariantFormat): string {
  return item.variants
    .filter((v) => v.format === format)
    .sort((a, b) => a.width - b.width)
    .map((v) => `${v.url} ${v.width}w`)
    .join(", ");
}

/**
 * A library photo as `<picture>` (AVIF, WebP, JPEG), cropped to its box around the focal
 * point; the dominant colour and the blurred placeholder show until the image has loaded.
 */
export function MediaPicture({ item, sizes, className = "", fit = "cover", alt }: { item: MediaItem; sizes: string; className?: string; fit?: "cover" | "contain"; alt?: string }) {
  const [loaded, setLoaded] = useState(false);
  const jpeg = item.variants.filter((v) => v.format === "jpeg").sort((a, b) => a.width - b.width);
  const fallback = jpeg.find((v) => v.width >= 640) ?? jpeg[jpeg.length - 1];
  const position = `${Math.round(item.focal.x * 100)}% ${Math.round(item.focal.y * 100)}%`;
  return (
    <div
      className={`relative overflow-hidden ${className}`}
      style={{
        backgroundColor: item.dominantColor ?? "#d9d3c4",
        backgroundImage: item.placeholder ? `url("${item.placeholder}")` : undefined,
        backgroundSize: "cover",
        backgroundPosition: position,
      }}
      data-loaded={loaded ? "true" : "false"}
    >
      {fallback ? (
        <picture>
          {(["avif", "webp"] as const).map((f) => (srcSet(item, f) ? <source key={f} type={TYPES[f]} srcSet={srcSet(item, f)} sizes={sizes} /> : null))}
          <img
            src={fallback.url}
            srcSet={srcSet(item, "jpeg")}
            sizes={sizes}
            width={item.width}
            height={item.height}
            alt={alt ?? item.altText ?? `${item.name} (no alt text yet)`}
            loading="lazy"
            decoding="async"
            onLoad={() => setLoaded(true)}
            className={`h-full w-full transition-opacity duration-300 ${fit === "cover" ? "object-cover" : "object-contain"} ${loaded ? "opacity-100" : "opacity-0"}`}
            style={{ objectPosition: position }}
          />
        </picture>
      ) : (
        <span role="img" aria-label={`${item.name}: not processed yet`} className="absolute inset-0 backdrop-blur-sm" />
      )}
    </div>
  );
}
