import { createHash } from "node:crypto";
import { availableParallelism } from "node:os";
import { parse as parseIcc } from "icc";
import sharp, { type AvifOptions, type JpegOptions, type Sharp, type SharpOptions, type WebpOptions } from "sharp";
import { runLimited } from "../core/run-limited.ts";
import { fingerprintOf } from "./media.fingerprint.ts";

/** The encodings every photo is published in: AVIF and WebP, with JPEG as the fallback. */
export type DerivativeFormat = "avif" | "webp" | "jpeg";

/** One encoded derivative, ready to be stored under a content-hashed key. */
export interface Variant {
  /** Pixels. */
  width: number;
  /** Pixels. */
  height: number;
  format: DerivativeFormat;
  buffer: Buffer;
  /** Length of `buffer` in bytes. */
  bytes: number;
  /** First 16 hex characters of the SHA-256 of `buffer`, for cache-forever file names. */
  hash: string;
  contentType: "image/avif" | "image/webp" | "image/jpeg";
}

/** A point of interest as fractions of the displayed width and height (0..1, from top left). */
export interface FocalPoint {
  x: number;
  y: number;
}

export interface Derivatives {
  /** Displayed (auto-oriented) width of the original, pixels. */
  width: number;
  /** Displayed (auto-oriented) height of the original, pixels. */
  height: number;
  /** A tiny blurred WebP as a `data:image/webp;base64,…` URL, painted while loading. */
  placeholder: string;
  /** The most common colour, `#rrggbb` in sRGB, for the box behind the placeholder. */
  dominantColor: string;
  /** The focal point passed in, checked, for crops made by the caller; null when none. */
  focal: FocalPoint | null;
  /** Every width × format, largest width first. */
  variants: Variant[];
  /** The perceptual fingerprint (media.fingerprint.ts), from the smallest derivative: 16 hex digits. */
  fingerprint: string;
}

export interface DerivativeOptions {
  /** Target widths in pixels; widths above the original's are dropped. */
  widths?: readonly number[];
  formats?: readonly DerivativeFormat[];
  focal?: FocalPoint;
  /** Refuse inputs with more pixels than this (the probe refuses first; this is the backstop). */
  maxPixels?: number;
}

/**
 * The width ladder (decision 058). 1200 is there for phones at 3× density: a 375 px phone
 * draws a full-width photo 343 CSS px wide, 1,029 device px, and 390–430 px phones need
 * 1,074–1,194; without it they all fetched 1600 (1.8× the pixels of 1200). 960 serves 2×
 * phones (686–798 device px) and a 1× desktop column in place of 1024.
 */
export const DEFAULT_WIDTHS: readonly number[] = [320, 640, 960, 1200, 1600, 2400];
export const DEFAULT_FORMATS: readonly DerivativeFormat[] = ["avif", "webp", "jpeg"];

/**
 * Encoder settings, chosen by measurement on a 24 MP photographic test image (see
 * tests/bench/images.bench.ts; SSIM on luma against a Lanczos downscale of the full decode,
 * compared output by output with ImageMagick's full-decode set at common web settings):
 * - AVIF at the fastest effort (0): effort 1 made the set 2–7 % smaller at equal SSIM for
 *   twice the encoding time, efforts 2 and 3 were slower again for little more, and the
 *   default effort 4 matched libheif's default encoder in bytes at 30× the time. 4:2:0
 *   chroma was smaller and faster than 4:4:4.
 * - WebP effort 4 (libwebp's default method) was 13 % smaller than effort 2 at equal SSIM,
 *   for twice the time; effort 6 saved 4 % more at 2.4× that.
 * - JPEG, the fallback few browsers still take: the standard tables, progressive with
 *   optimised Huffman coding. Quantisation table 3 came out 3 % larger at equal SSIM,
 *   trellis quantisation no smaller; mozjpeg's full preset saved 4 % for 5× the time, so
 *   it is left off.
 * Each quality is the one whose mean SSIM over the widths of the time (320–2400) matched ImageMagick's
 * Derivatives carry no ICC profile: they are sRGB, which browsers assume when untagged.
 */
export const ENCODER_SETTINGS = {
  avif: { quality: 58, effort: 0, chromaSubsampling: "4:2:0" },
  webp: { quality: 81, effort: 4 },
  jpeg: { quality: 82, progressive: true, optimiseCoding: true },
} as const satisfies {
  avif: AvifOptions;
  webp: WebpOptions;
  jpeg: JpegOptions;
};

const CONTENT_TYPES = { avif: "image/avif", webp: "image/webp", jpeg: "image/jpeg" } as const;

/** Relative encoding time per pixel at ENCODER_SETTINGS, for longest-first scheduling. */
const ENCODE_TIME_PER_PIXEL = { avif: 3, webp: 6, jpeg: 1 } as const;
const PLACEHOLDER_WIDTH = 16;

/** Taller than this (height / width) is a strip or a long drawing, laid out by width: no cap. */
const TALLEST_CAPPED_SHAPE = 2;

/**
 * The widths to make for an original `originalWidth` × `originalHeight` pixels (as displayed):
 * the requested widths that do not upscale it, plus the original's own width when it is
 * narrower than the largest requested one (so every photo gets at least one derivative).
 * Ascending, pixels.
 *
 * A portrait photo (up to 1:2) is capped on its long side instead: no derivative is taller
 * than the largest width is wide, and the width that makes it exactly that tall replaces the
 * ones above it. Its largest derivative then has the pixels of a landscape one (1600 × 2400,
 * not 2400 × 3600), which no screen needs more of, and costs the same to make (decision 058).
 */
export function planWidths(originalWidth: number, requested: readonly number[] = DEFAULT_WIDTHS, originalHeight = 0): number[] {
  const wanted = [...new Set(requested.filter((w) => Number.isInteger(w) && w > 0))].sort((a, b) => a - b);
  if (wanted.length === 0) throw new RangeError("makeDerivatives: at least one positive integer width is required");
  const largest = wanted[wanted.length - 1] ?? 0;
  const portrait = originalHeight > originalWidth && originalHeight <= TALLEST_CAPPED_SHAPE * originalWidth;
  const limit = portrait ? Math.min(originalWidth, Math.max(1, Math.floor((largest * originalWidth) / originalHeight))) : originalWidth;
  const kept = wanted.filter((w) => w <= limit);
  if (limit < largest && !kept.includes(limit)) kept.push(limit);
  return kept;
}

/**
 * The largest side each encoder writes, pixels. Source: sharp 0.35.5, src/common.cc
 * `AssertImageTypeDimensions` ("Processed image is too large for the … format"): WebP 16,383
 * (the WebP bitstream's 14-bit dimensions), HEIF/AVIF 16,384, JPEG 65,535 (16-bit in the SOF
 * header); each measured here with this build (libvips 8.18.7, libheif 1.23.5, aom 3.15.1): one
 * pixel more is refused.
 */
export const MAX_SIDE: Readonly<Record<DerivativeFormat, number>> = { webp: 16_383, avif: 16_384, jpeg: 65_535 };
const FORMAT_NAMES: Record<DerivativeFormat, string> = { avif: "AVIF", webp: "WebP", jpeg: "JPEG" };

/**
 * Why the pipeline could not write every derivative of a photo displayed `width` × `height`
 * (after orientation), or null when it can: each planned width in each format, and the WebP
 * placeholder made from the smallest. Says which derivative, which side and which limit.
 */
export function derivativeLimitProblem(width: number, height: number, options: Pick<DerivativeOptions, "widths" | "formats"> = {}): string | null {
  const formats = [...new Set(options.formats ?? DEFAULT_FORMATS)];
  const sizes = planWidths(width, options.widths ?? DEFAULT_WIDTHS, height).map((w) => ({ w, h: scaledHeight(w, width, height) }));
  const smallest = sizes[0] ?? { w: width, h: height };
  const placeholderW = Math.min(PLACEHOLDER_WIDTH, smallest.w);
  const checks = [
    ...[...sizes].reverse().map((size) => ({ ...size, formats, what: `the ${size.w} px wide derivative` })),
    { w: placeholderW, h: scaledHeight(placeholderW, smallest.w, smallest.h), formats: ["webp" as const], what: "the loading placeholder" },
  ];
  for (const c of checks) {
    // The tightest limit first: it is the one to crop to.
    const over = c.formats.filter((f) => c.w > MAX_SIDE[f] || c.h > MAX_SIDE[f]).sort((a, b) => MAX_SIDE[a] - MAX_SIDE[b]);
    const tightest = over[0];
    if (!tightest) continue;
    const limit = MAX_SIDE[tightest];
    const side = c.h > limit ? "height" : "width";
    const named = over.map((f) => `${FORMAT_NAMES[f]} (at most ${MAX_SIDE[f].toLocaleString("en-GB")} px per side)`).join(" and ");
    const advice = side === "height" ? `Crop it to at most ${Math.floor((limit * width) / c.w)} px tall at this width, or split it into several photos.` : "Crop it or split it into several photos.";
    return `At ${width} × ${height} px, ${c.what} would be ${c.w} × ${c.h} px: its ${side} is over the limit of ${named}. ${advice}`;
  }
  return null;
}

/** A photo whose derivatives would not fit their formats: trying again cannot help. */
export class DerivativeLimitError extends Error {
  override name = "DerivativeLimitError";
}

interface RawLevel {
  data: Buffer;
  width: number;
  height: number;
  channels: 1 | 2 | 3 | 4;
}

/**
 * Makes every derivative of one photo: auto-oriented from its EXIF orientation,
 * converted to sRGB, every metadata block dropped (EXIF, GPS, XMP, IPTC and ICC: sharp
 * writes none unless asked, and this module never asks), at each width that does not
 * upscale, in each format.
 *
 * The input is decoded once: the largest width is made from it (JPEG shrink-on-load does
 * most of that work), each smaller width from the previous one in memory, and all encodes
 * run from those raw buffers, at most one per CPU core at a time.
 *
 * @param input a file path or the file's bytes
 */
export async function makeDerivatives(input: string | Buffer, options: DerivativeOptions = {}): Promise<Derivatives> {
  const formats = [...new Set(options.formats ?? DEFAULT_FORMATS)];
  if (formats.length === 0) throw new RangeError("makeDerivatives: at least one format is required");
  const focal = options.focal ? checkFocal(options.focal) : null;
  const inputOptions: SharpOptions = {
    failOn: "error",
    limitInputPixels: options.maxPixels ?? 100_000_000,
    sequentialRead: true,
  };

  const header = await sharp(input, inputOptions).metadata();
  // A profile that already says sRGB needs no transform into sRGB: skipping it saves a pass
  // over every decoded pixel (about 145 ms on a 24 MP photo shrunk to 6 MP on load; decision 072).
  if (isSrgbProfile(header.icc)) inputOptions.ignoreIcc = true;
  const orientation = header.orientation ?? 1;
  const swap = orientation >= 5 && orientation <= 8;
  const width = swap ? header.height : header.width;
  const height = swap ? header.width : header.height;
  // The upload probe refuses these first; a job queued before that check fails once, for good.
  const problem = derivativeLimitProblem(width, height, options);
  if (problem) throw new DerivativeLimitError(problem);
  const widths = planWidths(width, options.widths ?? DEFAULT_WIDTHS, height).reverse();

  // The one decode: orient, convert to sRGB (through the embedded ICC profile, if any) and
  // shrink straight to the largest width (JPEG shrink-on-load where the ratio allows).
  const first = widths[0] ?? width;
  const levels: RawLevel[] = [
    await toRaw(
      sharp(input, inputOptions)
        .rotate()
        .toColourspace("srgb")
        .resize(first, scaledHeight(first, width, height), { fit: "fill" }),
    ),
  ];
  for (const w of widths.slice(1)) {
    const previous = levels[levels.length - 1] as RawLevel;
    levels.push(await toRaw(fromRaw(previous).resize(w, scaledHeight(w, width, height), { fit: "fill" })));
  }

  const jobs = levels.flatMap((level) =>
    formats.map((format) => ({
      level,
      format,
      time: level.width * level.height * ENCODE_TIME_PER_PIXEL[format],
    })),
  );
  // Longest first (AVIF at the largest width dominates), so the cores finish together.
  jobs.sort((a, b) => b.time - a.time);
  const smallest = levels[levels.length - 1] as RawLevel;

  const [variants, placeholder, dominantColor, fingerprint] = await Promise.all([
    // One encode per core. On glibc sharp's default libvips concurrency is 1 thread per
    // image, so this keeps every core busy without oversubscribing; measured on 2 cores it
    // beat one encode at a time with concurrency 2 (WebP and JPEG encode single-threaded).
    runLimited(jobs, availableParallelism(), ({ level, format }) => encode(level, format)),
    makePlaceholder(smallest),
    findDominantColour(smallest),
    fingerprintOf(fromRaw(smallest)),
  ]);
  variants.sort((a, b) => b.width - a.width || formats.indexOf(a.format) - formats.indexOf(b.format));
  return { width, height, placeholder, dominantColor, focal, variants, fingerprint };
}

/**
 * Whether an embedded ICC profile is an sRGB display profile, by its header and description
 * ("sRGB", "sRGB IEC61966-2.1", "sRGB IEC61966-2-1 black scaled", …), so that the pixels are
 * sRGB as stored. Any other profile (Display P3, Adobe RGB, CMYK) or one that does not parse is
 * converted as before.
 */
export function isSrgbProfile(icc: Buffer | undefined): boolean {
  if (!icc) return false;
  try {
    const p = parseIcc(icc);
    return p.colorSpace === "RGB" && p.deviceClass === "Monitor" && /^sRGB\b/i.test(p.description ?? "");
  } catch {
    return false;
  }
}

function checkFocal(focal: FocalPoint): FocalPoint {
  const inRange = (n: number) => Number.isFinite(n) && n >= 0 && n <= 1;
  if (!inRange(focal.x) || !inRange(focal.y)) {
    throw new RangeError(`makeDerivatives: focal point must lie within 0..1, got (${focal.x}, ${focal.y})`);
  }
  return { x: focal.x, y: focal.y };
}

/** Height for a width, keeping the original's aspect ratio, pixels (at least 1). */
function scaledHeight(targetWidth: number, width: number, height: number): number {
  return Math.max(1, Math.round((targetWidth * height) / width));
}

async function toRaw(image: Sharp): Promise<RawLevel> {
  const { data, info } = await image.raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height, channels: info.channels };
}

function fromRaw(level: RawLevel): Sharp {
  return sharp(level.data, { raw: { width: level.width, height: level.height, channels: level.channels } });
}

async function encode(level: RawLevel, format: DerivativeFormat): Promise<Variant> {
  let image = fromRaw(level);
  if (format === "avif") image = image.avif(ENCODER_SETTINGS.avif);
  else if (format === "webp") image = image.webp(ENCODER_SETTINGS.webp);
  else image = (level.channels % 2 === 0 ? image.flatten({ background: "#ffffff" }) : image).jpeg(ENCODER_SETTINGS.jpeg);
  const buffer = await image.toBuffer();
  return {
    width: level.width,
    height: level.height,
    format,
    buffer,
    bytes: buffer.length,
    hash: createHash("sha256").update(buffer).digest("hex").slice(0, 16),
    contentType: CONTENT_TYPES[format],
  };
}

async function makePlaceholder(level: RawLevel): Promise<string> {
  const w = Math.min(PLACEHOLDER_WIDTH, level.width);
  const h = scaledHeight(w, level.width, level.height);
  const buffer = await fromRaw(level)
    .resize(w, h, { fit: "fill" })
    .blur(0.6)
    .webp({ quality: 40, effort: 6, alphaQuality: 40 })
    .toBuffer();
  return `data:image/webp;base64,${buffer.toString("base64")}`;
}

async function findDominantColour(level: RawLevel): Promise<string> {
  const { dominant } = await fromRaw(level).stats();
  const hex = (n: number) => Math.max(0, Math.min(255, Math.round(n))).toString(16).padStart(2, "0");
  return `#${hex(dominant.r)}${hex(dominant.g)}${hex(dominant.b)}`;
}

