import zlib from "node:zlib";
import sharp, { type Sharp } from "sharp";

/** An RGB colour as three 0–255 channel values. */
export type Rgb = readonly [number, number, number];

/** The corner colours of the upright orientation test picture (distinct in every channel). */
export const QUADRANT_COLOURS = {
  topLeft: [220, 30, 30],
  topRight: [30, 200, 60],
  bottomLeft: [30, 60, 220],
  bottomRight: [230, 210, 40],
} as const satisfies Record<string, Rgb>;

/** A tightly packed 8-bit RGB picture. */
export interface RawRgb {
  data: Buffer;
  width: number;
  height: number;
}

/** A plain-colour picture encoded as JPEG, PNG or WebP. */
export async function makeSolidImage(options: {
  width: number;
  height: number;
  colour: Rgb;
  format?: "jpeg" | "png" | "webp";
}): Promise<Buffer> {
  const [r, g, b] = options.colour;
  const image = sharp({
    create: { width: options.width, height: options.height, channels: 3, background: { r, g, b } },
  });
  return encode(image, options.format ?? "jpeg");
}

/** A diagonal two-colour gradient: smooth content that still changes across the frame. */
export async function makeGradientImage(options: {
  width: number;
  height: number;
  from?: string;
  to?: string;
  format?: "jpeg" | "png" | "webp";
}): Promise<Buffer> {
  const { width, height } = options;
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
    <defs><linearGradient id="g" x1="0" y1="0" x2="1" y2="1">
      <stop offset="0" stop-color="${options.from ?? "#1d4e89"}"/>
      <stop offset="1" stop-color="${options.to ?? "#f2a541"}"/>
    </linearGradient></defs>
    <rect width="100%" height="100%" fill="url(#g)"/>
  </svg>`;
  return encode(sharp(Buffer.from(svg)), options.format ?? "jpeg");
}

/**
 * A picture with edges, stripes and shapes, so that resizing and encoding have detail to
 * keep. `noise` adds seeded per-pixel sensor-like grain and `texture` a coarser mottle
 * (noise drawn at a third of the size and enlarged), which survives downscaling the way
 * gravel, concrete and foliage do in real photographs; both are what make encoders work.
 * Standard deviations are in 0–255 units.
 */
export async function makePatternedImage(options: {
  width: number;
  height: number;
  noise?: number;
  texture?: number;
  seed?: number;
  format?: "jpeg" | "png" | "webp";
  quality?: number;
}): Promise<Buffer> {
  const { width, height } = options;
  const seed = options.seed ?? 7;
  const base = sharp(Buffer.from(sceneSvg(width, height, seed)));
  let image = base;
  const noise = options.noise ?? 0;
  const texture = options.texture ?? 0;
  if (noise > 0 || texture > 0) {
    const rendered = await base.removeAlpha().raw().toBuffer();
    if (texture > 0) {
      const tw = Math.max(1, Math.round(width / 3));
      const th = Math.max(1, Math.round(height / 3));
      const coarse = Buffer.alloc(tw * th, 128);
      addGrain(coarse, texture, seed + 101);
      const mottle = await sharp(coarse, { raw: { width: tw, height: th, channels: 1 } })
        .resize(width, height, { fit: "fill", kernel: "cubic" })
        .raw()
        .toBuffer();
      for (let i = 0; i < rendered.length; i += 1) {
        const value = (rendered[i] ?? 0) + (mottle[Math.floor(i / 3)] ?? 128) - 128;
        rendered[i] = value < 0 ? 0 : value > 255 ? 255 : value;
      }
    }
    if (noise > 0) addGrain(rendered, noise, seed);
    image = sharp(rendered, { raw: { width, height, channels: 3 } });
  }
  return encode(image, options.format ?? "jpeg", options.quality);
}

/**
 * A site-like scene drawn in SVG: a sky gradient, ground, a building shell with a grid of
 * panels, a crane, plant boxes, cable runs and small repeated detail. Invented content.
 */
function sceneSvg(width: number, height: number, seed: number): string {
  const random = seededRandom(seed);
  const u = width / 100;
  const v = height / 100;
  const parts: string[] = [];
  parts.push(`<rect width="${width}" height="${height}" fill="url(#sky)"/>`);
  parts.push(`<rect y="${62 * v}" width="${width}" height="${38 * v}" fill="url(#ground)"/>`);
  parts.push(`<rect x="${12 * u}" y="${28 * v}" width="${52 * u}" height="${36 * v}" fill="#8c929b"/>`);
  for (let col = 0; col < 26; col += 1) {
    for (let row = 0; row < 12; row += 1) {
      const shade = 120 + Math.floor(random() * 80);
      parts.push(
        `<rect x="${(12.4 + col * 2) * u}" y="${(28.6 + row * 2.95) * v}" width="${1.7 * u}" height="${2.6 * v}" fill="rgb(${shade},${shade + 6},${shade + 14})"/>`,
      );
    }
  }
  parts.push(`<rect x="${74 * u}" y="${8 * v}" width="${1.2 * u}" height="${56 * v}" fill="#e0b422"/>`);
  parts.push(`<rect x="${48 * u}" y="${8 * v}" width="${44 * u}" height="${1.2 * v}" fill="#e0b422"/>`);
  for (let i = 0; i < 40; i += 1) {
    const x = 48 + i * 1.1;
    parts.push(`<line x1="${x * u}" y1="${8 * v}" x2="${(x + 1.1) * u}" y2="${9.2 * v}" stroke="#7a5f10" stroke-width="${0.12 * u}"/>`);
  }
  for (let i = 0; i < 6; i += 1) {
    const x = 68 + i * 5;
    parts.push(`<rect x="${x * u}" y="${66 * v}" width="${4.2 * u}" height="${9 * v}" rx="${0.3 * u}" fill="#d7dde3" stroke="#505a64" stroke-width="${0.15 * u}"/>`);
    parts.push(`<circle cx="${(x + 2.1) * u}" cy="${68.5 * v}" r="${1.4 * u}" fill="#3c4650"/>`);
  }
  for (let i = 0; i < 300; i += 1) {
    const x = random() * width;
    const y = (64 + random() * 36) * v;
    const r = (0.05 + random() * 0.35) * u;
    const tone = 70 + Math.floor(random() * 90);
    parts.push(`<circle cx="${x}" cy="${y}" r="${r}" fill="rgb(${tone + 20},${tone + 10},${tone})"/>`);
  }
  for (let i = 0; i < 5; i += 1) {
    const y = (80 + i * 3) * v;
    parts.push(`<path d="M0 ${y} C ${30 * u} ${y - 4 * v}, ${60 * u} ${y + 4 * v}, ${width} ${y - v}" stroke="#1a1a1a" stroke-width="${0.25 * u}" fill="none"/>`);
  }
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
    <defs>
      <linearGradient id="sky" x1="0" y1="0" x2="0" y2="1">
        <stop offset="0" stop-color="#5b8fd1"/><stop offset="1" stop-color="#dfe9f5"/>
      </linearGradient>
      <radialGradient id="ground" cx="0.4" cy="0.1" r="1">
        <stop offset="0" stop-color="#b49a76"/><stop offset="1" stop-color="#5e4f3c"/>
      </radialGradient>
    </defs>
    ${parts.join("\n")}
  </svg>`;
}

/** Adds seeded, roughly Gaussian grain of the given standard deviation (0–255 units). */
function addGrain(rgb: Buffer, sigma: number, seed: number): void {
  const random = seededRandom(seed * 7919 + 1);
  for (let i = 0; i < rgb.length; i += 1) {
    // Irwin–Hall with n = 4 has variance 1/3; scale to unit variance.
    const gaussian = (random() + random() + random() + random() - 2) * 1.7320508;
    const value = (rgb[i] ?? 0) + gaussian * sigma;
    rgb[i] = value < 0 ? 0 : value > 255 ? 255 : value;
  }
}

/** mulberry32: a small seeded generator, so test and benchmark images repeat exactly. */
export function seededRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

async function encode(image: Sharp, format: "jpeg" | "png" | "webp", quality = 92): Promise<Buffer> {
  if (format === "png") return image.png().toBuffer();
  if (format === "webp") return image.webp({ quality }).toBuffer();
  return image.jpeg({ quality, chromaSubsampling: "4:4:4" }).toBuffer();
}

/** The upright orientation test picture: four distinct quadrants. */
export function makeQuadrantPicture(width = 40, height = 20): RawRgb {
  const data = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const top = y < height / 2;
      const left = x < width / 2;
      const colour = top
        ? left
          ? QUADRANT_COLOURS.topLeft
          : QUADRANT_COLOURS.topRight
        : left
          ? QUADRANT_COLOURS.bottomLeft
          : QUADRANT_COLOURS.bottomRight;
      data.set(colour, (y * width + x) * 3);
    }
  }
  return { data, width, height };
}

/**
 * Lays out an upright picture as a camera would store it for an EXIF Orientation value,
 * so that a reader applying the tag shows the upright picture again.
 *
 * Each case maps a stored pixel (sx, sy) to where it is displayed, from the meaning of the
 * tag: which visual side the stored row 0 and column 0 lie on.
 * Source: EXIF 2.3 (CIPA DC-008) tag 0x0112 — 1 row 0 top / col 0 left; 2 top/right;
 * 3 bottom/right; 4 bottom/left; 5 left/top; 6 right/top; 7 right/bottom; 8 left/bottom.
 */
export function storeForOrientation(upright: RawRgb, orientation: number): RawRgb {
  const swap = orientation >= 5;
  const width = swap ? upright.height : upright.width;
  const height = swap ? upright.width : upright.height;
  const dw = upright.width;
  const dh = upright.height;
  const data = Buffer.alloc(width * height * 3);
  for (let sy = 0; sy < height; sy += 1) {
    for (let sx = 0; sx < width; sx += 1) {
      let dx: number;
      let dy: number;
      switch (orientation) {
        case 1: [dx, dy] = [sx, sy]; break;
        case 2: [dx, dy] = [dw - 1 - sx, sy]; break;
        case 3: [dx, dy] = [dw - 1 - sx, dh - 1 - sy]; break;
        case 4: [dx, dy] = [sx, dh - 1 - sy]; break;
        case 5: [dx, dy] = [sy, sx]; break;
        case 6: [dx, dy] = [dw - 1 - sy, sx]; break;
        case 7: [dx, dy] = [dw - 1 - sy, dh - 1 - sx]; break;
        case 8: [dx, dy] = [sy, dh - 1 - sx]; break;
        default: throw new RangeError(`EXIF orientation must be 1–8, got ${orientation}`);
      }
      upright.data.copy(data, (sy * width + sx) * 3, (dy * dw + dx) * 3, (dy * dw + dx) * 3 + 3);
    }
  }
  return { data, width, height };
}

/**
 * A JPEG of the quadrant picture stored for the given EXIF Orientation (1–8), with the tag
 * set, so that auto-orienting it gives the upright 40 × 20 picture.
 */
export async function makeOrientedJpeg(orientation: number, width = 40, height = 20): Promise<Buffer> {
  const stored = storeForOrientation(makeQuadrantPicture(width, height), orientation);
  return sharp(stored.data, { raw: { width: stored.width, height: stored.height, channels: 3 } })
    .jpeg({ quality: 95, chromaSubsampling: "4:4:4" })
    .withMetadata({ orientation })
    .toBuffer();
}

/** Degrees, minutes and seconds as EXIF rationals ("n/d n/d n/d"), seconds to 1/100. */
function toDmsRationals(degrees: number): string {
  const abs = Math.abs(degrees);
  const d = Math.floor(abs);
  const m = Math.floor((abs - d) * 60);
  const s = Math.round(((abs - d) * 60 - m) * 60 * 100);
  return `${d}/1 ${m}/1 ${s}/100`;
}

/**
 * A JPEG carrying a GPS IFD (latitude, longitude, altitude) and, optionally, a
 * DateTimeOriginal ("YYYY:MM:DD HH:MM:SS", as EXIF writes it). Coordinates are invented.
 */
export async function makeJpegWithGps(options: {
  latitude: number;
  longitude: number;
  dateTimeOriginal?: string;
  offsetTimeOriginal?: string;
  width?: number;
  height?: number;
  /** Also embed an XMP packet (e.g. from makeXmpWithGps). */
  xmp?: string;
  /** Also embed this ICC profile ("p3" converts the picture into Display P3 first). */
  icc?: "p3";
  /** Also embed an IPTC caption in an APP13 segment. */
  iptcCaption?: string;
}): Promise<Buffer> {
  const picture = await makeGradientImage({ width: options.width ?? 64, height: options.height ?? 48 });
  const exifIfd: Record<string, string> = {};
  if (options.dateTimeOriginal) exifIfd.DateTimeOriginal = options.dateTimeOriginal;
  if (options.offsetTimeOriginal) exifIfd.OffsetTimeOriginal = options.offsetTimeOriginal;
  let image = sharp(picture).jpeg({ quality: 90 });
  if (options.xmp) image = image.withXmp(options.xmp);
  if (options.icc) image = image.withIccProfile(options.icc);
  const jpeg = await image
    .withExif({
      IFD0: { Make: "Plumbline test rig", Model: "Orientation and GPS fixture" },
      IFD2: exifIfd,
      IFD3: {
        GPSLatitudeRef: options.latitude >= 0 ? "N" : "S",
        GPSLatitude: toDmsRationals(options.latitude),
        GPSLongitudeRef: options.longitude >= 0 ? "E" : "W",
        GPSLongitude: toDmsRationals(options.longitude),
        GPSAltitude: "42/1",
      },
    })
    .toBuffer();
  return options.iptcCaption ? insertJpegSegment(jpeg, 0xed, makeIptcSegment(options.iptcCaption)) : jpeg;
}

/** A JPEG with only a DateTimeOriginal (and optional offset) in its EXIF block. */
export async function makeJpegTakenAt(dateTimeOriginal: string, offsetTimeOriginal?: string): Promise<Buffer> {
  const picture = await makeGradientImage({ width: 48, height: 32 });
  const exifIfd: Record<string, string> = { DateTimeOriginal: dateTimeOriginal };
  if (offsetTimeOriginal) exifIfd.OffsetTimeOriginal = offsetTimeOriginal;
  return sharp(picture).jpeg({ quality: 90 }).withExif({ IFD2: exifIfd }).toBuffer();
}

/**
 * Inserts a marker segment (APPn) straight after a JPEG's SOI marker.
 * Source: ITU-T T.81 Annex B (B.1.1.4, from memory) — a marker segment is 0xFF, the
 * marker, a 16-bit big-endian length that counts itself, then the payload.
 */
export function insertJpegSegment(jpeg: Buffer, marker: number, payload: Buffer): Buffer {
  if (jpeg[0] !== 0xff || jpeg[1] !== 0xd8) throw new Error("insertJpegSegment: not a JPEG");
  if (payload.length + 2 > 0xffff) throw new Error("insertJpegSegment: payload too long for one segment");
  const header = Buffer.from([0xff, marker, 0, 0]);
  header.writeUInt16BE(payload.length + 2, 2);
  return Buffer.concat([jpeg.subarray(0, 2), header, payload, jpeg.subarray(2)]);
}

/**
 * A solid-colour JPEG whose stored values are `colour` in the colour space of `icc`, with
 * that profile embedded as-is (no conversion on the way in).
 * Source: ICC.1 (ICC profile specification) annex "Embedding ICC profiles", JPEG: APP2
 * "ICC_PROFILE\0", sequence number, count, profile bytes (annex number from memory).
 */
export async function makeJpegTaggedWith(icc: Buffer, colour: Rgb, width = 32, height = 32): Promise<Buffer> {
  const [r, g, b] = colour;
  const plain = await sharp({ create: { width, height, channels: 3, background: { r, g, b } } })
    .jpeg({ quality: 100, chromaSubsampling: "4:4:4" })
    .toBuffer();
  const payload = Buffer.concat([Buffer.from("ICC_PROFILE\0", "latin1"), Buffer.from([1, 1]), icc]);
  return insertJpegSegment(plain, 0xe2, payload);
}

/**
 * An APP13 Photoshop segment holding an IPTC record (2:120 caption) — the block IPTC
 * metadata travels in inside JPEGs, which sharp cannot write itself.
 * Source: IPTC IIM 4.2 (dataset tag 0x1C, record, dataset number, 16-bit length) and the
 * Adobe Photoshop image resource block "8BIM" 0x0404 layout (section numbers from memory).
 */
export function makeIptcSegment(caption: string): Buffer {
  const text = Buffer.from(caption, "utf8");
  const dataset = Buffer.concat([Buffer.from([0x1c, 2, 120, text.length >> 8, text.length & 0xff]), text]);
  const padded = dataset.length % 2 ? Buffer.concat([dataset, Buffer.from([0])]) : dataset;
  const size = Buffer.alloc(4);
  size.writeUInt32BE(dataset.length);
  return Buffer.concat([
    Buffer.from("Photoshop 3.0\0", "latin1"),
    Buffer.from("8BIM", "latin1"),
    Buffer.from([0x04, 0x04, 0, 0]),
    size,
    padded,
  ]);
}

/** An XMP packet that carries a location in the EXIF namespace (as phones write it). */
export function makeXmpWithGps(latitude: string, longitude: string): string {
  return `<?xpacket begin="\uFEFF" id="W5M0MpCehiHzreSzNTczkc9d"?><x:xmpmeta xmlns:x="adobe:ns:meta/"><rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#"><rdf:Description rdf:about="" xmlns:exif="http://ns.adobe.com/exif/1.0/" exif:GPSLatitude="${latitude}" exif:GPSLongitude="${longitude}"/></rdf:RDF></x:xmpmeta><?xpacket end="w"?>`;
}

const CRC_TABLE = (() => {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n += 1) {
    let c = n;
    for (let k = 0; k < 8; k += 1) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

/** CRC-32 as PNG defines it (ISO 3309 polynomial, over chunk type and data). */
export function pngCrc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const byte of bytes) c = (CRC_TABLE[(c ^ byte) & 0xff] ?? 0) ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function pngChunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, "latin1"), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(pngCrc32(body));
  return Buffer.concat([length, body, crc]);
}

/**
 * A PNG whose IHDR declares width × height (8-bit RGB) followed by a few rows of real
 * image data only: a decompression-bomb header that must be refused before any decode.
 * Source: PNG specification (ISO/IEC 15948, W3C PNG 2nd ed.) §5.2 signature, §5.3 chunk
 * layout with CRC-32 over type and data, §11.2.2 IHDR fields.
 */
export function makePngDeclaring(width: number, height: number): Buffer {
  const signature = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: truecolour
  ihdr[10] = 0; // compression: deflate
  ihdr[11] = 0; // filter method 0
  ihdr[12] = 0; // no interlace
  // Two rows of filter byte 0 + zeros: far less than the header promises.
  const rows = Buffer.alloc(2 * (1 + Math.min(width, 4096) * 3));
  const idat = zlib.deflateSync(rows);
  return Buffer.concat([signature, pngChunk("IHDR", ihdr), pngChunk("IDAT", idat), pngChunk("IEND", Buffer.alloc(0))]);
}

/** A metadata block found in an encoded image's container. */
export interface MetadataBlock {
  kind: "exif" | "xmp" | "icc" | "iptc" | "other-app";
  where: string;
}

/**
 * Walks a JPEG's marker segments, a WebP's RIFF chunks or an AVIF's boxes and lists every
 * block that carries EXIF, XMP, ICC or IPTC — independently of any image library.
 * Sources: JPEG (ITU-T T.81 Annex B marker segments; EXIF 2.3 APP1 "Exif\0\0", XMP
 * APP1, ICC APP2 "ICC_PROFILE", Photoshop/IPTC APP13); WebP container (RFC 9649, extended
 * format: EXIF, "XMP " and ICCP chunks); HEIF/AVIF (ISO/IEC 23008-12 'Exif' and 'mime'
 * items; ISO/IEC 14496-12 'colr' with 'prof'/'rICC'). Section numbers from memory.
 */
export function listMetadataBlocks(bytes: Buffer): MetadataBlock[] {
  if (bytes[0] === 0xff && bytes[1] === 0xd8) return listJpegBlocks(bytes);
  if (bytes.toString("latin1", 0, 4) === "RIFF" && bytes.toString("latin1", 8, 12) === "WEBP") return listWebpBlocks(bytes);
  if (bytes.toString("latin1", 4, 8) === "ftyp") return listIsoBlocks(bytes);
  throw new Error("listMetadataBlocks: not a JPEG, WebP or AVIF file");
}

function listJpegBlocks(bytes: Buffer): MetadataBlock[] {
  const found: MetadataBlock[] = [];
  let offset = 2;
  while (offset + 4 <= bytes.length) {
    if (bytes[offset] !== 0xff) throw new Error(`JPEG: expected a marker at ${offset}`);
    const marker = bytes[offset + 1] ?? 0;
    if (marker === 0xd9 || marker === 0xda) break; // EOI or start of scan: no more headers
    if (marker === 0xff) { offset += 1; continue; }
    const length = bytes.readUInt16BE(offset + 2);
    const body = bytes.subarray(offset + 4, offset + 2 + length);
    const where = `APP${marker - 0xe0}@${offset}`;
    if (marker === 0xe1 && body.toString("latin1", 0, 6) === "Exif\0\0") found.push({ kind: "exif", where });
    else if (marker === 0xe1 && body.toString("latin1", 0, 28).startsWith("http://ns.adobe.com/xap/1.0/")) found.push({ kind: "xmp", where });
    else if (marker === 0xe2 && body.toString("latin1", 0, 11) === "ICC_PROFILE") found.push({ kind: "icc", where });
    else if (marker === 0xed) found.push({ kind: "iptc", where });
    else if (marker >= 0xe1 && marker <= 0xef) found.push({ kind: "other-app", where });
    offset += 2 + length;
  }
  return found;
}

function listWebpBlocks(bytes: Buffer): MetadataBlock[] {
  const found: MetadataBlock[] = [];
  let offset = 12;
  while (offset + 8 <= bytes.length) {
    const fourcc = bytes.toString("latin1", offset, offset + 4);
    const size = bytes.readUInt32LE(offset + 4);
    const where = `${fourcc}@${offset}`;
    if (fourcc === "EXIF") found.push({ kind: "exif", where });
    if (fourcc === "XMP ") found.push({ kind: "xmp", where });
    if (fourcc === "ICCP") found.push({ kind: "icc", where });
    offset += 8 + size + (size % 2);
  }
  return found;
}

const ISO_CONTAINERS = new Set(["meta", "iprp", "ipco", "iinf"]);

function listIsoBlocks(bytes: Buffer): MetadataBlock[] {
  const found: MetadataBlock[] = [];
  const walk = (start: number, end: number, path: string): void => {
    let offset = start;
    while (offset + 8 <= end) {
      let size = bytes.readUInt32BE(offset);
      const type = bytes.toString("latin1", offset + 4, offset + 8);
      let header = 8;
      if (size === 1) { size = Number(bytes.readBigUInt64BE(offset + 8)); header = 16; }
      if (size === 0) size = end - offset;
      if (size < header) throw new Error(`ISO box ${type} has a bad size at ${offset}`);
      const where = `${path}/${type}@${offset}`;
      if (type === "meta") walk(offset + header + 4, offset + size, where); // full box: version + flags
      else if (type === "iinf") {
        const version = bytes[offset + header] ?? 0;
        walk(offset + header + 4 + (version === 0 ? 2 : 4), offset + size, where);
      } else if (ISO_CONTAINERS.has(type)) walk(offset + header, offset + size, where);
      else if (type === "infe") {
        const version = bytes[offset + header] ?? 0;
        if (version >= 2) {
          const idBytes = version === 2 ? 2 : 4;
          const itemType = bytes.toString("latin1", offset + header + 4 + idBytes + 2, offset + header + 4 + idBytes + 6);
          if (itemType === "Exif") found.push({ kind: "exif", where });
          if (itemType === "mime") found.push({ kind: "xmp", where });
        }
      } else if (type === "colr") {
        const colourType = bytes.toString("latin1", offset + header, offset + header + 4);
        if (colourType === "prof" || colourType === "rICC") found.push({ kind: "icc", where });
      }
      offset += size;
    }
  };
  walk(0, bytes.length, "");
  return found;
}
