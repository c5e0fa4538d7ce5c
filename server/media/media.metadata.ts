import { crc32 } from "node:zlib";

/**
 * Removing location from an original without touching its pixels: the coded image data is
 * copied byte for byte and only metadata blocks are dropped or edited (decision 016).
 *
 * Kept: EXIF orientation and capture date (and the rest of the EXIF, less GPS and maker
 * notes), the ICC profile, JFIF/Adobe colour-transform markers, PNG colour chunks.
 * Removed: the GPS IFD and its pointer (EXIF 2.3 tag 0x8825; GPS tags 0x0000–0x001E),
 * maker notes (0x927C: several makers copy the position into them), XMP (exif:GPS…,
 * photoshop:City, Iptc4xmpCore:Location…), IPTC/Photoshop blocks (City, Sub-location), comments,
 * PNG text chunks (XMP lives there, and ImageMagick's "Raw profile type exif"), and whatever
 * follows a JPEG's first image (MPF secondary images and gain maps carry their own EXIF).
 */

export class LocationNotRemovable extends Error {
  override name = "LocationNotRemovable";
}

const fail = (why: string): never => {
  throw new LocationNotRemovable(why);
};

// ---------------------------------------------------------------- EXIF (TIFF structure)

/** EXIF 2.3 tags: pointers and the blocks that can hold a position. */
const TAG_EXIF_IFD = 0x8769;
const TAG_GPS_IFD = 0x8825;
const TAG_MAKER_NOTE = 0x927c;
/** GPSVersionID 0x0000 … GPSDifferential 0x001E (EXIF 2.3 §4.6.6), should one stray outside the GPS IFD. */
const LAST_GPS_TAG = 0x001e;
/** Bytes per value of each TIFF field type (TIFF 6.0 §2, plus 13 = IFD from TIFF Technical Note 1). */
const TYPE_SIZE: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8, 13: 4 };

/**
 * Removes GPS and maker notes from a TIFF-structured EXIF block in place. Entries are taken
 * out of their IFD (the rest move up, the count shrinks, the freed bytes are zeroed) and the
 * GPS IFD and maker-note bytes are zeroed, so no offset anywhere changes and the block keeps
 * its length. Returns whether anything was removed.
 */
export function scrubExifTiff(tiff: Buffer): boolean {
  if (tiff.length < 8) fail("EXIF block too short");
  const order = tiff.toString("latin1", 0, 2);
  const le = order === "II" ? true : order === "MM" ? false : fail("EXIF block has no byte order");
  const u16 = (o: number) => (inRange(o, 2) ? (le ? tiff.readUInt16LE(o) : tiff.readUInt16BE(o)) : fail("EXIF offset out of range"));
  const u32 = (o: number) => (inRange(o, 4) ? (le ? tiff.readUInt32LE(o) : tiff.readUInt32BE(o)) : fail("EXIF offset out of range"));
  const inRange = (o: number, n: number) => o >= 0 && o + n <= tiff.length;
  if (u16(2) !== 42) fail("EXIF block is not TIFF");

  let changed = false;
  const seen = new Set<number>();

  /** The byte ranges a field's values occupy outside its entry, if any. */
  const valueRange = (entry: number): [number, number] | null => {
    const size = (TYPE_SIZE[u16(entry + 2)] ?? 1) * u32(entry + 4);
    if (size <= 4) return null;
    const at = u32(entry + 8);
    return inRange(at, size) ? [at, at + size] : null;
  };

  const zeroIfd = (offset: number) => {
    if (offset === 0 || seen.has(offset) || !inRange(offset, 2)) return;
    seen.add(offset);
    const n = u16(offset);
    if (!inRange(offset, 2 + 12 * n + 4)) fail("EXIF directory out of range");
    for (let i = 0; i < n; i += 1) {
      const r = valueRange(offset + 2 + 12 * i);
      if (r) tiff.fill(0, r[0], r[1]);
    }
    tiff.fill(0, offset, offset + 2 + 12 * n + 4);
  };

  /** Drops the entries `drop` selects from the IFD at `offset`; returns the offsets the kept pointers name. */
  const pruneIfd = (offset: number, drop: (tag: number) => boolean): { exif: number | null; next: number } => {
    if (seen.has(offset)) fail("EXIF directories form a loop");
    seen.add(offset);
    const n = u16(offset);
    if (!inRange(offset, 2 + 12 * n + 4)) fail("EXIF directory out of range");
    const next = u32(offset + 2 + 12 * n);
    const kept: Buffer[] = [];
    let exif: number | null = null;
    for (let i = 0; i < n; i += 1) {
      const entry = offset + 2 + 12 * i;
      const tag = u16(entry);
      if (drop(tag)) {
        changed = true;
        if (tag === TAG_GPS_IFD) zeroIfd(u32(entry + 8));
        else {
          const r = valueRange(entry);
          if (r) tiff.fill(0, r[0], r[1]);
        }
        continue;
      }
      if (tag === TAG_EXIF_IFD) exif = u32(entry + 8);
      kept.push(Buffer.from(tiff.subarray(entry, entry + 12)));
    }
    if (kept.length !== n) {
      const start = offset + 2;
      tiff.fill(0, start, start + 12 * n + 4);
      if (le) tiff.writeUInt16LE(kept.length, offset);
      else tiff.writeUInt16BE(kept.length, offset);
      kept.forEach((e, i) => e.copy(tiff, start + 12 * i));
      const nextAt = start + 12 * kept.length;
      if (le) tiff.writeUInt32LE(next, nextAt);
      else tiff.writeUInt32BE(next, nextAt);
    }
    return { exif, next };
  };

  const locationTag = (tag: number) => tag === TAG_GPS_IFD || tag === TAG_MAKER_NOTE || tag <= LAST_GPS_TAG;
  // IFD0 (the main image), its EXIF IFD, then IFD1 (the thumbnail's tags) and any further.
  let ifd = u32(4);
  for (let guard = 0; ifd !== 0 && guard < 8; guard += 1) {
    const { exif, next } = pruneIfd(ifd, locationTag);
    if (exif !== null && exif !== 0 && !seen.has(exif)) pruneIfd(exif, locationTag);
    ifd = next;
  }
  return changed;
}

/** A copy of an EXIF payload with GPS and maker notes removed; the APP1 "Exif\0\0" prefix is kept where present. */
function scrubExifPayload(payload: Buffer): Buffer {
  const copy = Buffer.from(payload);
  const prefixed = copy.toString("latin1", 0, 6) === "Exif\0\0";
  scrubExifTiff(prefixed ? copy.subarray(6) : copy);
  return copy;
}

// ---------------------------------------------------------------- JPEG (ITU-T T.81 Annex B)

const APP1_EXIF = "Exif\0\0";
const APP2_ICC = "ICC_PROFILE\0";
const APP14_ADOBE = "Adobe";

function stripJpeg(data: Buffer): Buffer {
  if (data.length < 4 || data[0] !== 0xff || data[1] !== 0xd8) fail("not a JPEG");
  const out: Buffer[] = [data.subarray(0, 2)];
  let i = 2;
  let inScan = false;
  let copyFrom = -1;
  while (i < data.length) {
    if (inScan) {
      // Entropy-coded data: FF 00 is a stuffed byte and FF D0–D7 restart markers; anything else ends the scan.
      if (data[i] !== 0xff) {
        i += 1;
        continue;
      }
      const next = data[i + 1];
      if (next === undefined) break;
      if (next === 0x00 || (next >= 0xd0 && next <= 0xd7) || next === 0xff) {
        i += next === 0xff ? 1 : 2;
        continue;
      }
      out.push(data.subarray(copyFrom, i));
      inScan = false;
      continue;
    }
    if (data[i] !== 0xff) fail("JPEG marker expected");
    let m = i + 1;
    while (data[m] === 0xff) m += 1; // fill bytes before a marker
    const marker = data[m];
    if (marker === undefined) break;
    if (marker === 0xd9) {
      // End of the first image: whatever follows (MPF secondary images, gain maps) is not kept.
      out.push(Buffer.from([0xff, 0xd9]));
      return Buffer.concat(out);
    }
    if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) {
      out.push(Buffer.from([0xff, marker]));
      i = m + 1;
      continue;
    }
    if (m + 2 >= data.length) fail("JPEG segment cut short");
    const length = data.readUInt16BE(m + 1);
    const end = m + 1 + length;
    if (length < 2 || end > data.length) fail("JPEG segment out of range");
    const payload = data.subarray(m + 3, end);
    const header = (text: string) => payload.length >= text.length && payload.toString("latin1", 0, text.length) === text;
    const segment = (body: Buffer) => {
      const head = Buffer.from([0xff, marker, 0, 0]);
      head.writeUInt16BE(body.length + 2, 2);
      return Buffer.concat([head, body]);
    };
    const isApp = marker >= 0xe0 && marker <= 0xef;
    if (marker === 0xe1 && header(APP1_EXIF)) out.push(segment(scrubExifPayload(payload)));
    else if (marker === 0xe0 || (marker === 0xe2 && header(APP2_ICC)) || (marker === 0xee && header(APP14_ADOBE))) out.push(data.subarray(i, end));
    else if (isApp || marker === 0xfe) {
      // XMP, extended XMP, IPTC/Photoshop, MPF, FlashPix, maker segments, comments: dropped.
    } else out.push(data.subarray(i, end));
    i = end;
    if (marker === 0xda) {
      inScan = true;
      copyFrom = i;
    }
  }
  // No end-of-image marker: keep the rest of the scan as it came (the decoder accepted it).
  if (inScan) out.push(data.subarray(copyFrom));
  return Buffer.concat(out);
}

// ---------------------------------------------------------------- PNG (ISO/IEC 15948, PNG 3rd edition)

const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
/** Ancillary chunks that describe how to show the pixels; other ancillary chunks (text, time, private) go. */
const PNG_KEEP = new Set(["cHRM", "gAMA", "iCCP", "sBIT", "sRGB", "cICP", "mDCV", "cLLI", "bKGD", "hIST", "tRNS", "pHYs", "sPLT", "acTL", "fcTL", "fdAT"]);

function pngChunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, "latin1");
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])) >>> 0, 0);
  return Buffer.concat([head, data, crc]);
}

function stripPng(data: Buffer): Buffer {
  if (!data.subarray(0, 8).equals(PNG_SIGNATURE)) fail("not a PNG");
  const out: Buffer[] = [PNG_SIGNATURE];
  let i = 8;
  while (i + 12 <= data.length) {
    const length = data.readUInt32BE(i);
    const type = data.toString("latin1", i + 4, i + 8);
    const end = i + 12 + length;
    if (end > data.length) fail("PNG chunk out of range");
    const critical = (data[i + 4]! & 0x20) === 0;
    if (type === "eXIf") out.push(pngChunk(type, scrubExifPayload(data.subarray(i + 8, i + 8 + length))));
    else if (critical || PNG_KEEP.has(type)) out.push(data.subarray(i, end));
    i = end;
    if (type === "IEND") return Buffer.concat(out);
  }
  return fail("PNG has no IEND chunk");
}

// ---------------------------------------------------------------- WebP (RIFF container, RFC 9649)

const WEBP_KEEP = new Set(["VP8X", "ICCP", "ANIM", "ANMF", "ALPH", "VP8 ", "VP8L"]);
/** VP8X flags (RFC 9649 §2.7): EXIF and XMP present. */
const VP8X_EXIF = 0x08;
const VP8X_XMP = 0x04;

function stripWebp(data: Buffer): Buffer {
  if (data.length < 12 || data.toString("latin1", 0, 4) !== "RIFF" || data.toString("latin1", 8, 12) !== "WEBP") fail("not a WebP");
  const chunks: Buffer[] = [];
  let vp8x: Buffer | null = null;
  let hasExif = false;
  let i = 12;
  const riffEnd = Math.min(data.length, 8 + data.readUInt32LE(4));
  while (i + 8 <= riffEnd) {
    const type = data.toString("latin1", i, i + 4);
    const size = data.readUInt32LE(i + 4);
    const end = i + 8 + size + (size % 2);
    if (i + 8 + size > riffEnd) fail("WebP chunk out of range");
    if (type === "EXIF") {
      const body = scrubExifPayload(data.subarray(i + 8, i + 8 + size));
      chunks.push(Buffer.concat([data.subarray(i, i + 8), body, size % 2 ? Buffer.alloc(1) : Buffer.alloc(0)]));
      hasExif = true;
    } else if (WEBP_KEEP.has(type)) {
      const chunk = Buffer.from(data.subarray(i, Math.min(end, riffEnd)));
      if (type === "VP8X") vp8x = chunk;
      chunks.push(chunk);
    }
    i = end;
  }
  if (vp8x) vp8x[8] = (vp8x[8]! & ~(VP8X_XMP | VP8X_EXIF)) | (hasExif ? VP8X_EXIF : 0);
  const body = Buffer.concat(chunks);
  const head = Buffer.from("RIFF----WEBP", "latin1");
  head.writeUInt32LE(body.length + 4, 4);
  return Buffer.concat([head, body]);
}

/**
 * The file's bytes with every location-bearing block removed and its coded image data
 * untouched. Throws `LocationNotRemovable` for a container it cannot rewrite safely.
 *
 * @param data the uploaded file
 * @param mime the type the probe found in the bytes
 */
export function stripLocation(data: Buffer, mime: string): Buffer {
  switch (mime) {
    case "image/jpeg":
      return stripJpeg(data);
    case "image/png":
      return stripPng(data);
    case "image/webp":
      return stripWebp(data);
    default:
      return fail(`no lossless metadata rewrite for ${mime}`);
  }
}
