import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import exifr from "exifr";
import { fileTypeFromFile } from "file-type";
import sharp, { type Metadata } from "sharp";
import { derivativeLimitProblem } from "./media.pipeline.ts";

/** Why an upload was refused; `status` is the HTTP status the upload route answers with. */
export type ProbeRefusalCode = "empty" | "too_large" | "unsupported_type" | "too_many_pixels" | "corrupt" | "derivative_too_large";

export interface ProbeRefusal {
  ok: false;
  code: ProbeRefusalCode;
  status: 400 | 413 | 415 | 422;
  message: string;
}

/** The image formats the media library accepts (HEIC/HEIF only where it can be decoded). */
export type AcceptedMime = "image/jpeg" | "image/png" | "image/webp" | "image/heic" | "image/heif";

export interface ProbedImage {
  ok: true;
  /** The type found in the bytes, never the file name or the client's claim. */
  mime: AcceptedMime;
  /** The decoder's name for it: jpeg, png, webp or heif. */
  format: string;
  /** Displayed width in pixels, after applying the EXIF orientation (swapped for 5–8). */
  width: number;
  /** Displayed height in pixels, after applying the EXIF orientation (swapped for 5–8). */
  height: number;
  /** EXIF Orientation 1–8 (1 when the file carries none). */
  orientation: number;
  /**
   * DateTimeOriginal as ISO 8601: `YYYY-MM-DDTHH:mm:ss[.sss]`, local time as the camera
   * recorded it, with the `±HH:MM` of OffsetTimeOriginal when the camera wrote one; null
   * when absent or unreadable. Never shifted through this server's time zone.
   */
  takenAt: string | null;
  /** Whether the original carries location data (EXIF GPS IFD with tags, or XMP GPS). */
  hasGps: boolean;
  /** SHA-256 of the file's bytes, lower-case hex: identical uploads share it. */
  sha256: string;
}

export type ProbeResult = ProbedImage | ProbeRefusal;

export interface ProbeOptions {
  /** Most pixels (declared width × height) accepted; default 100 million. */
  maxPixels?: number;
  /** Largest file accepted, in bytes; no limit when omitted (the upload layer has its own). */
  maxBytes?: number;
}

const ALWAYS_ACCEPTED = new Set(["image/jpeg", "image/png", "image/webp"]);
const HEIF_FAMILY = new Set(["image/heic", "image/heif"]);

/**
 * Whether the libvips inside this sharp build can decode HEIC/HEIF photos (HEVC-coded).
 * The prebuilt sharp binaries carry an AV1 decoder only, so libvips advertises `.avif`
 * alone; a build with an HEVC decoder also advertises `.heic`/`.heif`.
 */
export function canDecodeHeic(): boolean {
  const heif = sharp.format.heif;
  if (!heif?.input?.file) return false;
  const suffixes = heif.input.fileSuffix ?? [];
  return suffixes.some((suffix) => suffix === ".heic" || suffix === ".heif");
}

function refuse(code: ProbeRefusalCode, message: string): ProbeRefusal {
  const status = ({ empty: 400, too_large: 413, too_many_pixels: 413, unsupported_type: 415, corrupt: 422, derivative_too_large: 422 } as const)[code];
  return { ok: false, code, status, message };
}

/**
 * Checks an uploaded file before any processing: its real type from the bytes, its size,
 * its declared pixel count (from the header, without decoding) and then that its pixel data
 * decodes completely. Returns what the library stores about the photo, or a refusal that
 * the upload route turns into the given status.
 *
 * @param filePath the uploaded file on local disk
 * @param options  `maxPixels` (default 100 000 000 px) and `maxBytes` (bytes, optional)
 */
export async function probeImage(filePath: string, options: ProbeOptions = {}): Promise<ProbeResult> {
  const maxPixels = options.maxPixels ?? 100_000_000;
  const { size } = await stat(filePath);
  if (size === 0) return refuse("empty", "The file is empty.");
  if (options.maxBytes !== undefined && size > options.maxBytes) {
    return refuse("too_large", `The file is ${formatBytes(size)}; the limit is ${formatBytes(options.maxBytes)}.`);
  }

  const detected = await fileTypeFromFile(filePath);
  // file-type stops at "<?xml" and cannot tell text apart; look closer at those.
  const mime = detected && detected.mime !== "application/xml" ? detected.mime : await sniffText(filePath);
  if (!ALWAYS_ACCEPTED.has(mime) && !HEIF_FAMILY.has(mime)) {
    return refuse("unsupported_type", `The file's contents are ${describeType(mime)}; only JPEG, PNG and WebP photos${canDecodeHeic() ? " and HEIC/HEIF" : ""} are accepted.`);
  }
  if (HEIF_FAMILY.has(mime) && !canDecodeHeic()) {
    return refuse("unsupported_type", "The file is a HEIC/HEIF photo, which this server's image library cannot decode; export it as JPEG and upload again.");
  }

  let header: Metadata;
  try {
    // metadata() parses the header only; limitInputPixels is off so that the declared size
    // is read and refused here with a clear reason rather than as a decode failure.
    header = await sharp(filePath, { limitInputPixels: false }).metadata();
  } catch (error) {
    return refuse("corrupt", `The file looks like ${describeType(mime)} but its header cannot be read (${reason(error)}).`);
  }
  const declaredPixels = header.width * header.height;
  if (declaredPixels > maxPixels) {
    return refuse(
      "too_many_pixels",
      `The image declares ${header.width} × ${header.height} pixels (${formatPixels(declaredPixels)}); the limit is ${formatPixels(maxPixels)}.`,
    );
  }

  // Refused now, not three failed attempts later in the worker: every derivative must fit its format.
  const orientation = header.orientation && header.orientation >= 1 && header.orientation <= 8 ? header.orientation : 1;
  const swap = orientation >= 5;
  const width = swap ? header.height : header.width;
  const height = swap ? header.width : header.height;
  const problem = derivativeLimitProblem(width, height);
  if (problem) return refuse("derivative_too_large", problem);

  try {
    // A real decode of every pixel; shrink-on-load keeps it cheap for JPEG while still
    // reading the whole entropy-coded stream. failOn 'error' refuses truncated and damaged
    // data but lets through the harmless warnings many cameras' files raise.
    await sharp(filePath, { failOn: "error", limitInputPixels: maxPixels, sequentialRead: true })
      .resize(256, 256, { fit: "inside", withoutEnlargement: true })
      .raw()
      .toBuffer();
  } catch (error) {
    return refuse("corrupt", `The image data is truncated or damaged (${reason(error)}).`);
  }

  const exif = await readExif(header.exif);
  return {
    ok: true,
    mime: mime as AcceptedMime,
    format: header.format,
    width,
    height,
    orientation,
    takenAt: exif.takenAt,
    hasGps: exif.hasGps || xmpHasGps(header.xmp),
    sha256: await hashFile(filePath),
  };
}

/**
 * Whether an image still carries a location the probe would see (EXIF GPS tags or XMP GPS):
 * the check after an original's metadata was rewritten.
 */
export async function hasLocation(data: Buffer): Promise<boolean> {
  const header = await sharp(data, { limitInputPixels: false }).metadata();
  return (await readExif(header.exif)).hasGps || xmpHasGps(header.xmp);
}

/** EXIF tag numbers (EXIF 2.3 / CIPA DC-008; 0x9011 from EXIF 2.31). */
const TAG_DATE_TIME_ORIGINAL = 0x9003;
const TAG_OFFSET_TIME_ORIGINAL = 0x9011;
const TAG_SUBSEC_TIME_ORIGINAL = 0x9291;

/**
 * Reads the capture time and the presence of GPS tags from the EXIF block sharp extracted,
 * which works the same for JPEG, PNG, WebP and HEIF (exifr itself cannot open WebP).
 */
async function readExif(exifBlock: Buffer | undefined): Promise<{ takenAt: string | null; hasGps: boolean }> {
  if (!exifBlock || exifBlock.length < 8) return { takenAt: null, hasGps: false };
  // libvips hands the block over with its APP1 "Exif\0\0" prefix; exifr wants the TIFF.
  const tiff = exifBlock.toString("latin1", 0, 6) === "Exif\0\0" ? exifBlock.subarray(6) : exifBlock;
  let parsed: { exif?: Record<number, unknown>; gps?: Record<number, unknown> } | undefined;
  try {
    parsed = await exifr.parse(tiff, {
      tiff: true,
      ifd1: false,
      exif: true,
      gps: true,
      interop: false,
      xmp: false,
      icc: false,
      iptc: false,
      jfif: false,
      ihdr: false,
      translateKeys: false,
      translateValues: false,
      reviveValues: false,
      mergeOutput: false,
    });
  } catch {
    // An unreadable EXIF block is not a reason to refuse the photo; it carries nothing.
    return { takenAt: null, hasGps: false };
  }
  const gps = parsed?.gps;
  const hasGps = gps !== undefined && Object.keys(gps).length > 0;
  const exif = parsed?.exif;
  const takenAt = exif
    ? toIsoLocal(exif[TAG_DATE_TIME_ORIGINAL], exif[TAG_SUBSEC_TIME_ORIGINAL], exif[TAG_OFFSET_TIME_ORIGINAL])
    : null;
  return { takenAt, hasGps };
}

/**
 * EXIF writes "YYYY:MM:DD HH:MM:SS" (EXIF 2.3, DateTimeOriginal), with optional
 * sub-seconds (SubSecTimeOriginal) and offset "±HH:MM" (OffsetTimeOriginal, EXIF 2.31).
 */
function toIsoLocal(dateTime: unknown, subSec: unknown, offset: unknown): string | null {
  if (typeof dateTime !== "string") return null;
  const match = /^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/.exec(dateTime.trim());
  if (!match) return null;
  const [, y, mo, d, h, mi, s] = match;
  const month = Number(mo);
  const day = Number(d);
  if (Number(y) < 1 || month < 1 || month > 12 || day < 1 || day > 31 || Number(h) > 23 || Number(mi) > 59 || Number(s) > 60) {
    return null;
  }
  let iso = `${y}-${mo}-${d}T${h}:${mi}:${s}`;
  const fraction = typeof subSec === "string" || typeof subSec === "number" ? String(subSec).trim() : "";
  if (/^\d+$/.test(fraction)) iso += `.${fraction.padEnd(3, "0").slice(0, 3)}`;
  if (typeof offset === "string" && /^[+-]\d{2}:\d{2}$/.test(offset.trim())) iso += offset.trim();
  return iso;
}

/** XMP can carry a location too (exif:GPSLatitude / GPSLongitude in the EXIF namespace). */
function xmpHasGps(xmp: Buffer | undefined): boolean {
  if (!xmp) return false;
  return /GPS(Latitude|Longitude)/.test(xmp.toString("utf8"));
}

async function hashFile(filePath: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(filePath)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

/**
 * file-type recognises binary signatures only; name the common text uploads (SVG, HTML,
 * XML, plain text) so that the refusal says what was actually sent.
 */
async function sniffText(filePath: string): Promise<string> {
  const handle = await open(filePath, "r");
  try {
    const { buffer, bytesRead } = await handle.read(Buffer.alloc(4096), 0, 4096, 0);
    const head = buffer.subarray(0, bytesRead);
    const text = head.toString("utf8").replace(/^\uFEFF/, "").trimStart().toLowerCase();
    if (/<svg[\s>]/.test(text)) return "image/svg+xml";
    if (text.startsWith("<!doctype html") || text.startsWith("<html")) return "text/html";
    if (text.startsWith("<?xml")) return "application/xml";
    // NUL or C0 controls other than tab, line feed, form feed and carriage return.
    const binary = head.some((byte) => byte < 0x20 && byte !== 0x09 && byte !== 0x0a && byte !== 0x0c && byte !== 0x0d);
    return binary ? "application/octet-stream" : "text/plain";
  } finally {
    await handle.close();
  }
}

function describeType(mime: string): string {
  const names: Record<string, string> = {
    "image/svg+xml": "an SVG drawing (image/svg+xml)",
    "text/plain": "plain text (text/plain)",
    "text/html": "an HTML page (text/html)",
    "application/xml": "an XML document (application/xml)",
    "application/octet-stream": "not a recognised file type",
    "image/gif": "a GIF image (image/gif)",
    "application/pdf": "a PDF document (application/pdf)",
    "image/avif": "an AVIF image (image/avif)",
    "image/jpeg": "a JPEG image",
    "image/png": "a PNG image",
    "image/webp": "a WebP image",
    "image/heic": "a HEIC photo",
    "image/heif": "a HEIF photo",
  };
  return names[mime] ?? `of type ${mime}`;
}

function formatPixels(pixels: number): string {
  return pixels >= 1e6 ? `${Number((pixels / 1e6).toFixed(1))} MP` : `${pixels} pixels`;
}

function formatBytes(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1)} MB` : `${bytes} bytes`;
}

function reason(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  // libvips messages can run to several lines; the first names the fault.
  return text.split("\n")[0]?.trim() || "unknown error";
}
