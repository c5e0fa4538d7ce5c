import { createHash } from "node:crypto";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import exifr from "exifr";
import sharp from "sharp";
import { afterAll, beforeEach, describe, expect, it, vi } from "vitest";
import { DEFAULT_FORMATS, isSrgbProfile, makeDerivatives, planWidths, type Variant } from "../../server/media/media.pipeline.ts";
import { canDecodeHeic, probeImage } from "../../server/media/media.probe.ts";
import { POST_COVER_SIZES, POST_PHOTO_SIZES, srcSetOf } from "../../src/shared/domain/picture-sizes.ts";
import {
  QUADRANT_COLOURS,
  listMetadataBlocks,
  makeGradientImage,
  makeJpegTaggedWith,
  makeJpegTakenAt,
  makeJpegWithGps,
  makeOrientedJpeg,
  makePatternedImage,
  makePngDeclaring,
  makeQuadrantPicture,
  makeSolidImage,
  makeXmpWithGps,
  storeForOrientation,
  type Rgb,
} from "../helpers/images.ts";

// Every construction of a sharp pipeline is recorded with its input, so the tests can tell
// how often an upload's own bytes were opened (header reads and decodes).
const sharpInputs = vi.hoisted(() => ({ list: [] as unknown[] }));
vi.mock("sharp", async (importOriginal) => {
  const actual = (await importOriginal<typeof import("sharp")>()).default;
  const recording = (...args: Parameters<typeof actual>) => {
    sharpInputs.list.push(args[0]);
    return actual(...args);
  };
  return { default: Object.assign(recording, actual) };
});

const dir = mkdtempSync(path.join(tmpdir(), "plumbline-media-test-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
beforeEach(() => {
  sharpInputs.list.length = 0;
});

function writeFixture(name: string, bytes: Buffer | string): string {
  const file = path.join(dir, name);
  writeFileSync(file, bytes);
  return file;
}

const sha256 = (bytes: Buffer) => createHash("sha256").update(bytes).digest("hex");

async function pixelAt(encoded: Buffer, x: number, y: number): Promise<Rgb> {
  const { data, info } = await sharp(encoded).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const i = (y * info.width + x) * 3;
  return [data[i] ?? -1, data[i + 1] ?? -1, data[i + 2] ?? -1];
}

const distance = (a: Rgb, b: Rgb) => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);

/** The quadrant colour nearest to a sampled pixel. */
function nearestQuadrant(sample: Rgb): keyof typeof QUADRANT_COLOURS {
  const entries = Object.entries(QUADRANT_COLOURS) as [keyof typeof QUADRANT_COLOURS, Rgb][];
  return entries.reduce((best, entry) => (distance(sample, entry[1]) < distance(sample, best[1]) ? entry : best))[0];
}

/** Each quadrant of the upright test picture (makeQuadrantPicture) is where it belongs. */
async function expectQuadrantsUpright(variant: Variant): Promise<void> {
  const w = variant.width;
  const h = variant.height;
  const samples = {
    topLeft: await pixelAt(variant.buffer, Math.floor(w / 4), Math.floor(h / 4)),
    topRight: await pixelAt(variant.buffer, Math.floor((3 * w) / 4), Math.floor(h / 4)),
    bottomLeft: await pixelAt(variant.buffer, Math.floor(w / 4), Math.floor((3 * h) / 4)),
    bottomRight: await pixelAt(variant.buffer, Math.floor((3 * w) / 4), Math.floor((3 * h) / 4)),
  };
  for (const [corner, sample] of Object.entries(samples) as [keyof typeof QUADRANT_COLOURS, Rgb][]) {
    expect(nearestQuadrant(sample), `${variant.format} ${w}×${h} at ${corner}: ${sample}`).toBe(corner);
    expect(distance(sample, QUADRANT_COLOURS[corner])).toBeLessThan(40);
  }
}

/** Byte offset of `needle` in `hay`, or -1. */
const find = (hay: Buffer, needle: number[]) => hay.indexOf(Buffer.from(needle));

describe("probeImage: the real type from the bytes", () => {
  it("accepts a JPEG, a PNG and a WebP with the right type, size and SHA-256", async () => {
    const cases = [
      { format: "jpeg", mime: "image/jpeg" },
      { format: "png", mime: "image/png" },
      { format: "webp", mime: "image/webp" },
    ] as const;
    for (const c of cases) {
      const bytes = await makeGradientImage({ width: 120, height: 80, format: c.format });
      const result = await probeImage(writeFixture(`site.${c.format}`, bytes));
      expect(result).toMatchObject({ ok: true, mime: c.mime, format: c.format, width: 120, height: 80, orientation: 1, takenAt: null, hasGps: false });
      // Source: FIPS 180-4 SHA-256, as computed by Node's crypto (OpenSSL).
      if (result.ok) expect(result.sha256).toBe(sha256(bytes));
    }
  });

  it("goes by the bytes, not the name: a JPEG named .png is a JPEG", async () => {
    const result = await probeImage(writeFixture("really-a-jpeg.png", await makeGradientImage({ width: 40, height: 30 })));
    expect(result).toMatchObject({ ok: true, mime: "image/jpeg", format: "jpeg" });
  });

  it("refuses a text file named .jpg with 415 and says it is text", async () => {
    const result = await probeImage(writeFixture("not-a-photo.jpg", "Pour record for Hall 2A, slab bay 4.\nNo photograph here.\n"));
    expect(result).toMatchObject({ ok: false, code: "unsupported_type", status: 415 });
    if (!result.ok) expect(result.message).toMatch(/plain text/);
  });

  it("refuses an SVG carrying a script with 415 and names SVG", async () => {
    const svg = `<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="100" height="100"><script>alert(document.cookie)</script><rect width="100" height="100" fill="red"/></svg>`;
    for (const name of ["drawing.svg", "drawing.jpg"]) {
      const result = await probeImage(writeFixture(name, svg));
      expect(result).toMatchObject({ ok: false, code: "unsupported_type", status: 415 });
      if (!result.ok) expect(result.message).toMatch(/SVG/);
    }
  });

  it("refuses GIF and PDF with 415, naming what they are", async () => {
    const gif = await sharp({ create: { width: 8, height: 8, channels: 3, background: "#336699" } }).gif().toBuffer();
    const gifResult = await probeImage(writeFixture("anim.gif", gif));
    expect(gifResult).toMatchObject({ ok: false, code: "unsupported_type", status: 415 });
    if (!gifResult.ok) expect(gifResult.message).toMatch(/GIF/);

    const pdf = "%PDF-1.7\n%\u00e2\u00e3\u00cf\u00d3\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n";
    const pdfResult = await probeImage(writeFixture("drawing.jpg", Buffer.from(pdf, "latin1")));
    expect(pdfResult).toMatchObject({ ok: false, code: "unsupported_type", status: 415 });
    if (!pdfResult.ok) expect(pdfResult.message).toMatch(/PDF/);
  });

  it("treats HEIC according to what this sharp build can decode", async () => {
    // An ISO BMFF 'ftyp' box with the 'heic' brand (ISO/IEC 23008-12), then no image.
    const ftyp = Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from("ftypheic\0\0\0\0mif1heic", "latin1")]);
    const result = await probeImage(writeFixture("phone.heic", Buffer.concat([ftyp, Buffer.alloc(64)])));
    if (canDecodeHeic()) {
      expect(result).toMatchObject({ ok: false, code: "corrupt", status: 422 });
    } else {
      expect(result).toMatchObject({ ok: false, code: "unsupported_type", status: 415 });
      if (!result.ok) expect(result.message).toMatch(/HEIC.*cannot decode/);
    }
  });
});

describe("probeImage: bad input", () => {
  it("refuses an empty file with 400", async () => {
    expect(await probeImage(writeFixture("empty.jpg", Buffer.alloc(0)))).toMatchObject({ ok: false, code: "empty", status: 400 });
  });

  it("refuses a file over maxBytes with 413", async () => {
    const file = writeFixture("big.jpg", await makeGradientImage({ width: 200, height: 200 }));
    expect(await probeImage(file, { maxBytes: 100 })).toMatchObject({ ok: false, code: "too_large", status: 413 });
  });

  it("refuses a PNG declaring 30000 × 30000 with 413 from the header alone, fast and without decoding", async () => {
    const bomb = makePngDeclaring(30_000, 30_000);
    expect(bomb.length).toBeLessThan(64 * 1024);
    const file = writeFixture("bomb.png", bomb);
    // The crafted header must really declare that size to an independent reader.
    // Source: PNG (ISO/IEC 15948) §11.2.2 — IHDR width and height, big-endian, at 16 and 20.
    expect([bomb.readUInt32BE(16), bomb.readUInt32BE(20)]).toEqual([30_000, 30_000]);

    const rssBefore = process.memoryUsage().rss;
    const started = performance.now();
    const result = await probeImage(file);
    const elapsedMs = performance.now() - started;
    expect(result).toMatchObject({ ok: false, code: "too_many_pixels", status: 413 });
    if (!result.ok) expect(result.message).toMatch(/30000 × 30000/);
    expect(elapsedMs).toBeLessThan(1000);
    // Decoding 900 MP of RGB would need 2.7 GB; a header read needs next to nothing.
    expect(process.memoryUsage().rss - rssBefore).toBeLessThan(64 * 1024 * 1024);
    // The file was opened by sharp once, for its header; no decoding pipeline was built.
    expect(sharpInputs.list.filter((input) => input === file)).toHaveLength(1);
  });

  it("refuses a truncated JPEG with 422", async () => {
    const whole = await makePatternedImage({ width: 400, height: 300, noise: 12 });
    const file = writeFixture("cut.jpg", whole.subarray(0, Math.floor(whole.length * 0.6)));
    const result = await probeImage(file);
    expect(result).toMatchObject({ ok: false, code: "corrupt", status: 422 });
    if (!result.ok) expect(result.message).toMatch(/truncated or damaged/);
  });

  it("refuses a truncated PNG with 422", async () => {
    const whole = await makePatternedImage({ width: 300, height: 200, noise: 12, format: "png" });
    const result = await probeImage(writeFixture("cut.png", whole.subarray(0, Math.floor(whole.length * 0.5))));
    expect(result).toMatchObject({ ok: false, code: "corrupt", status: 422 });
  });

  it("refuses more pixels than a lower maxPixels allows", async () => {
    const file = writeFixture("wide.png", await makeGradientImage({ width: 300, height: 200, format: "png" }));
    expect(await probeImage(file, { maxPixels: 50_000 })).toMatchObject({ ok: false, code: "too_many_pixels", status: 413 });
    expect(await probeImage(file, { maxPixels: 60_000 })).toMatchObject({ ok: true });
  });
});

describe("probeImage: what is kept about the photo", () => {
  it("reads the capture time from DateTimeOriginal without shifting it", async () => {
    // Source: EXIF 2.3 (CIPA DC-008) — DateTimeOriginal 0x9003 is "YYYY:MM:DD HH:MM:SS";
    // EXIF 2.31 adds OffsetTimeOriginal 0x9011 as "±HH:MM" (tag numbers from memory).
    const plain = writeFixture("taken.jpg", await makeJpegTakenAt("2025:03:14 09:26:53"));
    const raw = await exifr.parse(plain, { pick: ["DateTimeOriginal"], reviveValues: false });
    expect(raw?.DateTimeOriginal).toBe("2025:03:14 09:26:53");
    expect(await probeImage(plain)).toMatchObject({ ok: true, takenAt: "2025-03-14T09:26:53" });

    const withOffset = writeFixture("taken-offset.jpg", await makeJpegTakenAt("2024:11:02 16:05:00", "+01:00"));
    const rawOffset = await exifr.parse(withOffset, { pick: ["OffsetTimeOriginal"], reviveValues: false });
    expect(rawOffset?.OffsetTimeOriginal).toBe("+01:00");
    expect(await probeImage(withOffset)).toMatchObject({ ok: true, takenAt: "2024-11-02T16:05:00+01:00" });
  });

  it("reports whether the original carries GPS, from EXIF or from XMP", async () => {
    const gpsFile = writeFixture("gps.jpg", await makeJpegWithGps({ latitude: 52.2053, longitude: 0.1218 }));
    const gps = await exifr.gps(gpsFile);
    expect(gps?.latitude).toBeCloseTo(52.2053, 3);
    expect(await probeImage(gpsFile)).toMatchObject({ ok: true, hasGps: true });

    const xmpOnly = await sharp(await makeGradientImage({ width: 40, height: 30 }))
      .jpeg()
      .withXmp(makeXmpWithGps("52,12.318N", "0,7.308E"))
      .toBuffer();
    expect(await probeImage(writeFixture("xmp-gps.jpg", xmpOnly))).toMatchObject({ ok: true, hasGps: true });

    expect(await probeImage(writeFixture("no-gps.jpg", await makeJpegTakenAt("2025:01:02 03:04:05")))).toMatchObject({ ok: true, hasGps: false });
  });

  it("gives the displayed size: width and height swap for orientations 5–8", async () => {
    // Source: EXIF 2.3 (CIPA DC-008) tag 0x0112; CHECKS.md "Photographs".
    for (let orientation = 1; orientation <= 8; orientation += 1) {
      const file = writeFixture(`o${orientation}.jpg`, await makeOrientedJpeg(orientation));
      const stored = await sharp(file).metadata();
      expect([stored.width, stored.height]).toEqual(orientation >= 5 ? [20, 40] : [40, 20]);
      expect(await probeImage(file)).toMatchObject({ ok: true, orientation, width: 40, height: 20 });
    }
  });
});

describe("makeDerivatives: EXIF orientation 1–8", () => {
  const sizes = [
    { width: 40, height: 20 },
    { width: 800, height: 400 },
  ];
  for (const size of sizes) {
    for (let orientation = 1; orientation <= 8; orientation += 1) {
      it(`orientation ${orientation}, ${size.width} × ${size.height}: every derivative is the upright picture`, async () => {
        // Source: EXIF 2.3 (CIPA DC-008) tag 0x0112 — 1 none, 2 mirror horizontal, 3 rotate
        // 180°, 4 mirror vertical, 5 transpose, 6 rotate 90° CW, 7 transverse, 8 rotate 90°
        // CCW; width and height swap for 5–8 (CHECKS.md "Photographs").
        const input = await makeOrientedJpeg(orientation, size.width, size.height);
        // An independent EXIF reader sees the tag on the input.
        const tags = await exifr.parse(input, { pick: ["Orientation"], translateValues: false });
        expect(tags?.Orientation).toBe(orientation);
        // The stored pixels are not upright unless the tag says so, so the check has teeth.
        const upright = makeQuadrantPicture(size.width, size.height);
        const stored = storeForOrientation(upright, orientation);
        expect(stored.data.equals(upright.data) && stored.width === upright.width).toBe(orientation === 1);

        const result = await makeDerivatives(input);
        expect([result.width, result.height]).toEqual([size.width, size.height]);
        expect(result.variants.length).toBeGreaterThan(0);
        for (const variant of result.variants) {
          const meta = await sharp(variant.buffer).metadata();
          expect([meta.width, meta.height]).toEqual([variant.width, variant.height]);
          expect(variant.width / variant.height).toBeCloseTo(2, 1);
          expect(meta.orientation ?? 1).toBe(1);
          await expectQuadrantsUpright(variant);
        }
      });
    }
  }
});

describe("makeDerivatives: a portrait turned upright from EXIF 1/3/6/8, capped on its long side", () => {
  // 1200 × 1800 displayed, with a ladder topped at 800: the cap makes the tallest derivative
  // 533 × 800 (the width whose height is 800), more than 2× smaller than the stored pixels,
  // so the JPEG is decoded at reduced size before it is turned.
  for (const orientation of [1, 3, 6, 8]) {
    it(`orientation ${orientation}: each corner's colour is where it belongs in every derivative`, async () => {
      // Source: EXIF 2.3 (CIPA DC-008) tag 0x0112 — 3 rotate 180°, 6 rotate 90° CW, 8 rotate 90° CCW.
      const input = await makeOrientedJpeg(orientation, 1200, 1800);
      const stored = await sharp(input).metadata();
      expect([stored.width, stored.height]).toEqual(orientation >= 5 ? [1800, 1200] : [1200, 1800]);
      const result = await makeDerivatives(input, { widths: [320, 480, 800] });
      expect([result.width, result.height]).toEqual([1200, 1800]);
      expect([...new Set(result.variants.map((v) => `${v.width}x${v.height}`))]).toEqual(["533x800", "480x720", "320x480"]);
      for (const variant of result.variants) await expectQuadrantsUpright(variant);
    });
  }
});

describe("makeDerivatives: every metadata block is stripped", () => {
  it("a JPEG with GPS, XMP, an ICC profile and IPTC in → no GPS, EXIF, XMP, IPTC or ICC in any derivative", async () => {
    const input = await makeJpegWithGps({
      latitude: 52.2053,
      longitude: -1.5,
      dateTimeOriginal: "2025:05:06 07:08:09",
      xmp: makeXmpWithGps("52,12.318N", "1,30.0W"),
      icc: "p3",
      iptcCaption: "Plant yard, north fence line",
      width: 900,
      height: 600,
    });
    // The input really carries all of it, read by independent readers.
    const gps = await exifr.gps(input);
    expect(gps?.latitude).toBeCloseTo(52.2053, 3);
    expect(gps?.longitude).toBeCloseTo(-1.5, 3);
    const inputMeta = await sharp(input).metadata();
    expect(inputMeta.exif).toBeDefined();
    expect(inputMeta.xmp).toBeDefined();
    expect(inputMeta.icc).toBeDefined();
    expect(listMetadataBlocks(input).map((b) => b.kind).sort()).toEqual(["exif", "icc", "iptc", "xmp"]);
    // GPS IFD pointer: tag 0x8825, type LONG (4), count 1, in the file's byte order.
    // Source: EXIF 2.3 (CIPA DC-008) GPSInfo IFD pointer 0x8825 (CHECKS.md); TIFF 6.0
    // section 2, a 12-byte IFD entry: tag, type, count, value.
    const gpsPointerLE = [0x25, 0x88, 0x04, 0x00, 0x01, 0x00, 0x00, 0x00];
    const gpsPointerBE = [0x88, 0x25, 0x00, 0x04, 0x00, 0x00, 0x00, 0x01];
    expect(find(input, gpsPointerLE) >= 0 || find(input, gpsPointerBE) >= 0).toBe(true);

    const result = await makeDerivatives(input);
    // Source: CHECKS.md "Photographs" — a stripped file has no GPS IFD pointer (0x8825) and no
    // GPS tags (GPSVersionID 0x0000 … GPSDifferential 0x001E); container layouts as cited in
    // listMetadataBlocks (ITU-T T.81, RFC 9649, ISO/IEC 23008-12).
    expect(result.variants.map((v) => v.format).sort()).toEqual(
      [...planWidths(900)].flatMap(() => DEFAULT_FORMATS).sort(),
    );
    for (const variant of result.variants) {
      const label = `${variant.format} ${variant.width}`;
      const meta = await sharp(variant.buffer).metadata();
      expect(meta.exif, label).toBeUndefined();
      expect(meta.xmp, label).toBeUndefined();
      expect(meta.iptc, label).toBeUndefined();
      // Decision: derivatives carry no ICC profile at all; they are converted to sRGB, which
      // browsers assume for untagged images, and a profile would add ~0.5 KB to each.
      expect(meta.icc, label).toBeUndefined();
      expect(meta.hasProfile, label).toBe(false);
      expect(listMetadataBlocks(variant.buffer), label).toEqual([]);
      expect(find(variant.buffer, gpsPointerLE), label).toBe(-1);
      expect(find(variant.buffer, gpsPointerBE), label).toBe(-1);
      expect(variant.buffer.includes(Buffer.from("Exif\0\0", "latin1")), label).toBe(false);
      expect(variant.buffer.includes(Buffer.from("GPSLatitude", "latin1")), label).toBe(false);
      expect(variant.buffer.includes(Buffer.from("Plant yard", "latin1")), label).toBe(false);
      if (variant.format === "jpeg") {
        // exifr reads JPEG directly: no GPS tags (GPSVersionID 0x0000 … GPSDifferential 0x001E).
        expect(await exifr.gps(variant.buffer), label).toBeUndefined();
        expect(await exifr.parse(variant.buffer, { gps: true, tiff: true, xmp: true, iptc: true, icc: true }), label).toBeUndefined();
      }
    }
  });

  it("the block check finds metadata when it is there (control)", async () => {
    const source = await makeJpegWithGps({ latitude: 51, longitude: 0 });
    const kept = {
      jpeg: await sharp(source).jpeg().keepMetadata().toBuffer(),
      webp: await sharp(source).webp().keepMetadata().toBuffer(),
      avif: await sharp(source).avif().keepMetadata().toBuffer(),
    };
    for (const [format, bytes] of Object.entries(kept)) {
      expect(listMetadataBlocks(bytes).map((b) => b.kind), format).toContain("exif");
    }
  });

  it("converts a Display P3 photo to sRGB, by the published primaries", async () => {
    const p3Profile = (await sharp({ create: { width: 2, height: 2, channels: 3, background: "#808080" } }).withIccProfile("p3").png().toBuffer().then((b) => sharp(b).metadata())).icc;
    expect(p3Profile).toBeDefined();
    const stored: Rgb = [200, 120, 90];
    const input = await makeJpegTaggedWith(p3Profile as Buffer, stored);
    // Source: IEC 61966-2-1 (sRGB), SMPTE EG 432-1 (P3 primaries, D65), SMPTE RP 177 (RGB to
    // XYZ from primaries) — computed in displayP3ToSrgb below, independently of sharp.
    const expected = displayP3ToSrgb(stored);
    // The conversion is visible: the sRGB red is well above the stored P3 value.
    expect(expected[0] - stored[0]).toBeGreaterThan(8);
    const result = await makeDerivatives(input);
    for (const variant of result.variants) {
      const sample = await pixelAt(variant.buffer, 16, 16);
      for (let c = 0; c < 3; c += 1) {
        expect(Math.abs((sample[c] ?? 0) - (expected[c] ?? 0)), `${variant.format} channel ${c}: ${sample} vs ${expected}`).toBeLessThanOrEqual(4);
      }
    }
  });
});

describe("photos whose embedded profile is sRGB (decision 072)", () => {
  const profileOf = async (name: string) =>
    (await sharp({ create: { width: 2, height: 2, channels: 3, background: "#808080" } }).withIccProfile(name).jpeg().toBuffer().then((b) => sharp(b).metadata())).icc as Buffer;

  it("tells an sRGB display profile from Display P3, CMYK, a broken one and none", async () => {
    expect(isSrgbProfile(await profileOf("srgb"))).toBe(true);
    expect(isSrgbProfile(await profileOf("p3"))).toBe(false);
    expect(isSrgbProfile(await profileOf("cmyk"))).toBe(false);
    expect(isSrgbProfile(Buffer.from("not an ICC profile at all"))).toBe(false);
    expect(isSrgbProfile(undefined)).toBe(false);
  });

  it("are made from the pixels as stored: every derivative is the same, byte for byte, as the untagged photo's", async () => {
    const stored: Rgb = [200, 120, 90];
    const tagged = await makeJpegTaggedWith(await profileOf("srgb"), stored, 64, 48);
    // The same JPEG data without the profile (makeJpegTaggedWith's own first step).
    const plain = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 200, g: 120, b: 90 } } })
      .jpeg({ quality: 100, chromaSubsampling: "4:4:4" })
      .toBuffer();
    expect((await sharp(tagged).metadata()).icc).toBeDefined();
    const [fromTagged, fromPlain] = await Promise.all([makeDerivatives(tagged), makeDerivatives(plain)]);
    expect(fromTagged.variants.map((v) => `${v.width}x${v.height}.${v.format}`)).toEqual(fromPlain.variants.map((v) => `${v.width}x${v.height}.${v.format}`));
    fromTagged.variants.forEach((v, i) => expect(v.hash, `${v.width} ${v.format}`).toBe(fromPlain.variants[i]!.hash));
    // Source: IEC 61966-2-1 — values in an sRGB-tagged file are sRGB values, shown as stored.
    const sample = await pixelAt(fromTagged.variants.find((v) => v.format === "jpeg")!.buffer, 16, 16);
    stored.forEach((c, i) => expect(Math.abs((sample[i] ?? 0) - c)).toBeLessThanOrEqual(3));
  });

  it("skip the transform by the profile's own name: P3 primaries under the name sRGB come out as stored, not converted", async () => {
    // The Display P3 profile with its description (UTF-16BE in its 'mluc' tag) renamed from
    // "sP3C" to "sRGB", the same length: only the name says sRGB.
    const p3 = await profileOf("p3");
    const at = p3.indexOf(Buffer.from("s\0P\x003\0C", "latin1"));
    expect(at).toBeGreaterThan(0);
    const renamed = Buffer.from(p3);
    renamed.write("s\0R\0G\0B", at, "latin1");
    expect(isSrgbProfile(renamed)).toBe(true);
    const stored: Rgb = [200, 120, 90];
    const result = await makeDerivatives(await makeJpegTaggedWith(renamed, stored));
    const sample = await pixelAt(result.variants.find((v) => v.format === "jpeg")!.buffer, 16, 16);
    // Converted as P3 the red would be well above 200 (the P3 test above); kept as stored it is not.
    expect(Math.abs((sample[0] ?? 0) - stored[0])).toBeLessThanOrEqual(3);
    expect(Math.abs((sample[0] ?? 0) - displayP3ToSrgb(stored)[0])).toBeGreaterThan(5);
  });
});

/**
 * Display P3 → sRGB for an 8-bit colour.
 * Sources: IEC 61966-2-1 (sRGB transfer function; BT.709 primaries R 0.64/0.33, G 0.30/0.60,
 * B 0.15/0.06, D65 0.3127/0.3290); SMPTE EG 432-1 (P3 primaries R 0.680/0.320, G 0.265/0.690,
 * B 0.150/0.060) with D65 white and the sRGB transfer function, as Display P3 defines;
 * SMPTE RP 177 (RGB → XYZ matrix from primaries and white point).
 */
function displayP3ToSrgb(rgb: Rgb): Rgb {
  const decode = (v: number) => (v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4);
  const encode = (v: number) => (v <= 0.0031308 ? v * 12.92 : 1.055 * v ** (1 / 2.4) - 0.055);
  const d65 = [0.3127, 0.329] as const;
  const toXyz = rgbToXyzMatrix([[0.68, 0.32], [0.265, 0.69], [0.15, 0.06]], d65);
  const fromXyz = invert3(rgbToXyzMatrix([[0.64, 0.33], [0.3, 0.6], [0.15, 0.06]], d65));
  const linear = rgb.map((v) => decode(v / 255));
  const xyz = multiply(toXyz, linear);
  const out = multiply(fromXyz, xyz).map((v) => Math.round(encode(Math.min(1, Math.max(0, v))) * 255));
  return [out[0] ?? 0, out[1] ?? 0, out[2] ?? 0];
}

type M3 = number[][];
function rgbToXyzMatrix(primaries: [number, number][], white: readonly [number, number]): M3 {
  const column = ([x, y]: readonly [number, number]) => [x / y, 1, (1 - x - y) / y];
  const p = [0, 1, 2].map((row) => primaries.map((xy) => column(xy)[row] ?? 0));
  const s = multiply(invert3(p), column(white));
  return p.map((row) => row.map((v, j) => v * (s[j] ?? 0)));
}
function multiply(m: M3, v: number[]): number[] {
  return m.map((row) => row.reduce((sum, x, j) => sum + x * (v[j] ?? 0), 0));
}
function invert3(m: M3): M3 {
  const [[a, b, c], [d, e, f], [g, h, i]] = m as [[number, number, number], [number, number, number], [number, number, number]];
  const det = a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g);
  return [
    [(e * i - f * h) / det, (c * h - b * i) / det, (b * f - c * e) / det],
    [(f * g - d * i) / det, (a * i - c * g) / det, (c * d - a * f) / det],
    [(d * h - e * g) / det, (b * g - a * h) / det, (a * e - b * d) / det],
  ];
}

describe("makeDerivatives: widths, encodings and names", () => {
  it.each([
    { original: 3000, widths: [320, 640, 960, 1200, 1600, 2400] },
    { original: 2400, widths: [320, 640, 960, 1200, 1600, 2400] },
    { original: 1100, widths: [320, 640, 960, 1100] },
    { original: 1000, widths: [320, 640, 960, 1000] },
    { original: 320, widths: [320] },
    { original: 100, widths: [100] },
  ])("plans $widths for an original $original px wide (never upscaling)", ({ original, widths }) => {
    expect(planWidths(original)).toEqual(widths);
  });

  // Decision 058: a 375 px phone at 3× draws a full-width photo 1,029 device px wide; the
  // ladder has a width between that and 1600 so it need not fetch 1600.
  it("has a width between 1,029 and 1,600 px for a phone at 3× density", () => {
    expect(planWidths(6000).some((w) => w >= 1029 && w < 1600)).toBe(true);
  });

  /**
   * The slot width a `sizes` gives at a viewport width, CSS px: the first entry whose
   * `(min-width: Npx)` holds, else the last; lengths in px or `calc(100vw - Nrem)` (16 px rem).
   * Source: HTML Living Standard, "Parsing a sizes attribute" (first matching condition wins).
   */
  function slotWidth(sizes: string, viewport: number): number {
    for (const entry of sizes.split(",").map((e) => e.trim())) {
      const media = /^\(min-width: (\d+)px\)\s+(.*)$/.exec(entry);
      if (media && viewport < Number(media[1])) continue;
      const length = media ? (media[2] as string) : entry;
      const calc = /^calc\(100vw - (\d+)rem\)$/.exec(length);
      if (calc) return viewport - 16 * Number(calc[1]);
      if (length === "100vw") return viewport;
      return Number(/^(\d+)px$/.exec(length)?.[1]);
    }
    throw new Error(`no entry of ${sizes} applies`);
  }

  it("lists the new widths in srcset, and the post page's sizes make a 3× phone pick 1200, not 1600", () => {
    const ladder = planWidths(6000);
    const srcset = srcSetOf(ladder.map((w) => ({ url: `/media/v/0123456789abcdef-${w}w.avif`, width: w })));
    expect(srcset).toContain("-960w.avif 960w");
    expect(srcset).toContain("-1200w.avif 1200w");
    // Source: HTML Living Standard, srcset selection — the browser wants slot width × device
    // pixel ratio; Chromium takes the narrowest candidate at least that wide.
    const pick = (sizes: string, viewport: number, dpr: number) => ladder.find((w) => w >= slotWidth(sizes, viewport) * dpr) ?? ladder[ladder.length - 1];
    for (const sizes of [POST_COVER_SIZES, POST_PHOTO_SIZES]) {
      expect(slotWidth(sizes, 375)).toBe(343);
      expect(pick(sizes, 375, 3)).toBe(1200);
      expect(pick(sizes, 430, 3)).toBe(1200);
      expect(pick(sizes, 375, 2)).toBe(960);
      expect(pick(sizes, 1280, 1)).toBe(960);
      expect(pick(sizes, 1280, 2)).toBe(1600);
    }
  });

  it.each([
    // 4000 × 6000 (a 24 MP portrait): no derivative taller than 2400, so 1600 × 2400 at most.
    { original: [4000, 6000], widths: [320, 640, 960, 1200, 1600] },
    // 3:4: the width that makes it exactly 2400 tall (1800) tops the ladder.
    { original: [3000, 4000], widths: [320, 640, 960, 1200, 1600, 1800] },
    // Small portraits are not upscaled and keep their own width.
    { original: [600, 900], widths: [320, 600] },
    // Square and landscape: by width, as before.
    { original: [3000, 3000], widths: [320, 640, 960, 1200, 1600, 2400] },
    // Taller than 1:2 is a strip or a long drawing, laid out by width: no cap.
    { original: [400, 16000], widths: [320, 400] },
    { original: [3000, 20000], widths: [320, 640, 960, 1200, 1600, 2400] },
  ])("caps a portrait's long side: $original plans $widths", ({ original, widths }) => {
    const [w, h] = original as [number, number];
    expect(planWidths(w, undefined, h)).toEqual(widths);
    for (const planned of widths) if (h > w && h <= 2 * w) expect(Math.round((planned * h) / w)).toBeLessThanOrEqual(2400);
  });

  it("makes every planned width in every format, none wider than the original, at the original's aspect ratio", async () => {
    const input = await makePatternedImage({ width: 1000, height: 625, noise: 4 });
    sharpInputs.list.length = 0;
    const result = await makeDerivatives(input);
    expect([result.width, result.height]).toEqual([1000, 625]);
    const made = result.variants.map((v) => `${v.width}x${v.height}.${v.format}`).sort();
    const expected = [
      [1000, 625],
      [960, 600],
      [640, 400],
      [320, 200],
    ].flatMap(([w, h]) => ["avif", "webp", "jpeg"].map((f) => `${w}x${h}.${f}`)).sort();
    expect(made).toEqual(expected);
    // Decoded once: sharp opened the upload's bytes twice, once for the header and once for
    // the pixels; everything else came from in-memory raw buffers.
    expect(sharpInputs.list.filter((i) => i === input)).toHaveLength(2);
    for (const variant of result.variants) await expectWellFormed(variant);
    expect(new Set(result.variants.map((v) => v.hash)).size).toBe(result.variants.length);
  });

  it("gives a narrow original one width only, its own", async () => {
    const result = await makeDerivatives(await makeGradientImage({ width: 180, height: 120 }));
    expect(new Set(result.variants.map((v) => v.width))).toEqual(new Set([180]));
    expect(result.variants).toHaveLength(3);
  });

  it("honours the widths and formats asked for", async () => {
    const result = await makeDerivatives(await makeGradientImage({ width: 900, height: 600 }), { widths: [200, 450, 2000], formats: ["webp"] });
    expect(result.variants.map((v) => `${v.width}.${v.format}`)).toEqual(["900.webp", "450.webp", "200.webp"]);
  });

  it("keeps transparency in AVIF and WebP and flattens it onto white in JPEG", async () => {
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="200" height="100"><rect width="100" height="100" fill="#2050c0"/></svg>`;
    const input = await sharp(Buffer.from(svg)).png().toBuffer();
    const result = await makeDerivatives(input);
    for (const variant of result.variants) {
      const meta = await sharp(variant.buffer).metadata();
      if (variant.format === "jpeg") {
        expect(meta.hasAlpha).toBe(false);
        const right = await pixelAt(variant.buffer, 150, 50);
        expect(distance(right, [255, 255, 255])).toBeLessThan(8);
      } else {
        expect(meta.hasAlpha, variant.format).toBe(true);
      }
    }
  });

  it("refuses corrupt input instead of publishing half a picture", async () => {
    const whole = await makePatternedImage({ width: 400, height: 300, noise: 12 });
    await expect(makeDerivatives(whole.subarray(0, Math.floor(whole.length * 0.6)))).rejects.toThrow();
  });
});

async function expectWellFormed(variant: Variant): Promise<void> {
  const meta = await sharp(variant.buffer).metadata();
  const decoder = { avif: "heif", webp: "webp", jpeg: "jpeg" }[variant.format];
  expect(meta.format).toBe(decoder);
  if (variant.format === "avif") expect(meta.compression).toBe("av1");
  expect([meta.width, meta.height]).toEqual([variant.width, variant.height]);
  expect(variant.bytes).toBe(variant.buffer.length);
  expect(variant.hash).toBe(sha256(variant.buffer).slice(0, 16));
  expect(variant.hash).toMatch(/^[0-9a-f]{16}$/);
  expect(variant.contentType).toBe({ avif: "image/avif", webp: "image/webp", jpeg: "image/jpeg" }[variant.format]);
}

describe("makeDerivatives: placeholder, dominant colour and focal point", () => {
  it("makes a tiny blurred WebP placeholder as a data URL that decodes", async () => {
    const result = await makeDerivatives(await makePatternedImage({ width: 1600, height: 1000, noise: 8 }));
    expect(result.placeholder).toMatch(/^data:image\/webp;base64,[A-Za-z0-9+/]+=*$/);
    const bytes = Buffer.from(result.placeholder.split(",")[1] ?? "", "base64");
    expect(bytes.length).toBeLessThan(1024);
    const meta = await sharp(bytes).metadata();
    expect(meta.format).toBe("webp");
    expect(meta.width).toBeLessThanOrEqual(16);
    expect(meta.width / (meta.height ?? 1)).toBeCloseTo(1.6, 0);
  });

  it("finds the dominant colour of a solid red picture close to #ff0000", async () => {
    const result = await makeDerivatives(await makeSolidImage({ width: 400, height: 300, colour: [255, 0, 0], format: "png" }));
    expect(result.dominantColor).toMatch(/^#[0-9a-f]{6}$/);
    const [r, g, b] = [1, 3, 5].map((i) => parseInt(result.dominantColor.slice(i, i + 2), 16));
    expect(r).toBeGreaterThanOrEqual(240);
    expect(g).toBeLessThanOrEqual(16);
    expect(b).toBeLessThanOrEqual(16);
  });

  it("finds a mostly-blue picture's dominant colour blue, whatever the small red patch", async () => {
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="300" height="200"><rect width="300" height="200" fill="#1e5bb4"/><rect width="40" height="40" fill="#e01010"/></svg>`;
    const result = await makeDerivatives(await sharp(Buffer.from(svg)).png().toBuffer());
    const [r, g, b] = [1, 3, 5].map((i) => parseInt(result.dominantColor.slice(i, i + 2), 16));
    expect(distance([r ?? 0, g ?? 0, b ?? 0], [0x1e, 0x5b, 0xb4])).toBeLessThan(20);
  });

  it("returns the focal point for the caller, and refuses one outside 0..1", async () => {
    const input = await makeGradientImage({ width: 100, height: 100 });
    expect((await makeDerivatives(input, { focal: { x: 0.25, y: 0.8 } })).focal).toEqual({ x: 0.25, y: 0.8 });
    expect((await makeDerivatives(input)).focal).toBeNull();
    await expect(makeDerivatives(input, { focal: { x: 1.5, y: 0.5 } })).rejects.toThrow(RangeError);
  });
});
