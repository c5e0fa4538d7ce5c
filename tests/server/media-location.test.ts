import exifr from "exifr";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { hasLocation } from "../../server/media/media.probe.ts";
import { seedMedia } from "../../server/seed/media.seed.ts";
import type { Agent, TestApp } from "../helpers/app.ts";
import { useMediaFixture } from "../helpers/media-fixture.ts";
import { insertJpegSegment, listMetadataBlocks, makeGradientImage, makeIptcSegment, makeXmpWithGps } from "../helpers/images.ts";

const f = useMediaFixture("media-location");
let t: TestApp;
let mediaDir: string;
let project: { id: number; slug: string };
let marketing: { agent: Agent; csrf: string };

beforeAll(() => {
  ({ t, project, marketing } = f);
  mediaDir = f.t.config.MEDIA_DIR;
});

let n = 0;
/**
 * A photo as a phone writes it: orientation 6, capture date, Display P3 profile, GPS in EXIF
 * (tag 0x8825 → GPS IFD) and in XMP, and (JPEG) an IPTC block. Coordinates are invented.
 */
async function phonePhoto(format: "jpeg" | "png" | "webp"): Promise<Buffer> {
  n += 1;
  const picture = await makeGradientImage({ width: 64, height: 48, from: `#${(0x304050 + n * 0x030507).toString(16).slice(-6)}`, to: "#d0a060" });
  const img = sharp(picture)
    .withMetadata({ orientation: 6 })
    .withExif({
      IFD0: { Make: "Plumbline test rig", Model: "Location fixture" },
      IFD2: { DateTimeOriginal: "2026:03:14 10:20:30", OffsetTimeOriginal: "+00:00" },
      IFD3: { GPSLatitudeRef: "N", GPSLatitude: "52/1 7/1 2436/100", GPSLongitudeRef: "W", GPSLongitude: "1/1 39/1 1556/100", GPSAltitude: "42/1" },
    })
    .withXmp(makeXmpWithGps("52,7.406N", "1,39.259W"))
    .withIccProfile("p3");
  const bytes = await (format === "jpeg" ? img.jpeg({ quality: 90 }) : format === "png" ? img.png() : img.webp({ quality: 90 })).toBuffer();
  return format === "jpeg" ? insertJpegSegment(bytes, 0xed, makeIptcSegment("By the north gate")) : bytes;
}

/** What a reader finds: exifr for JPEG and PNG (it cannot open WebP), libvips' view for every format. */
async function metadataOf(bytes: Buffer, format: string) {
  const vips = await sharp(bytes).metadata();
  const parsed =
    format === "webp"
      ? null
      : ((await exifr.parse(bytes, { tiff: true, exif: true, gps: true, icc: true, xmp: true, iptc: true, mergeOutput: false, translateKeys: false, translateValues: false, reviveValues: false })) as Record<string, Record<number, unknown>> | undefined);
  return { vips, parsed, location: await hasLocation(bytes) };
}

/**
 * The tag numbers of IFD0 in an EXIF block (exifr drops pointer tags from its output).
 * Source: TIFF 6.0 §2 (header: byte order, 42, offset of IFD0; an IFD: count, 12-byte entries).
 */
function ifd0Tags(exifBlock: Buffer | undefined): number[] {
  if (!exifBlock) return [];
  const tiff = exifBlock.toString("latin1", 0, 6) === "Exif\0\0" ? exifBlock.subarray(6) : exifBlock;
  const le = tiff.toString("latin1", 0, 2) === "II";
  const u16 = (o: number) => (le ? tiff.readUInt16LE(o) : tiff.readUInt16BE(o));
  const ifd0 = le ? tiff.readUInt32LE(4) : tiff.readUInt32BE(4);
  return Array.from({ length: u16(ifd0) }, (_, i) => u16(ifd0 + 2 + 12 * i));
}

const upload = (bytes: Buffer, name: string) => marketing.agent.post("/api/media").set("X-CSRF-Token", marketing.csrf).field("project", project.slug).attach("files", bytes, name);

describe("originals keep no location (issue 9)", () => {
  for (const format of ["jpeg", "png", "webp"] as const) {
    it(`${format}: the stored original and GET /original carry no GPS IFD, GPS tag or XMP; orientation, DateTimeOriginal, the ICC profile and every pixel remain`, async () => {
      const sent = await phonePhoto(format);
      const before = await metadataOf(sent, format);
      // The premise: the upload does carry a location.
      expect(before.location).toBe(true);
      expect(ifd0Tags(before.vips.exif)).toContain(0x8825);

      const res = await upload(sent, `phone.${format === "jpeg" ? "jpg" : format}`).expect(201);
      const id = res.body[0].id as number;
      const row = await t.db("media_items").where({ id }).first("original_key", "bytes", "had_gps");
      expect(Boolean(row.had_gps)).toBe(true);
      const stored = (await t.plumbline.mediaStorage.get(row.original_key))!;
      const served = (await marketing.agent.get(`/api/media/${id}/original`).buffer(true).expect(200)).body as Buffer;
      expect(served.equals(stored)).toBe(true);
      expect(Number(row.bytes)).toBe(stored.length);

      const after = await metadataOf(stored, format);
      expect(after.location).toBe(false);
      expect(after.vips.xmp).toBeUndefined();
      expect(after.vips.iptc).toBeUndefined();
      if (after.parsed) {
        expect(after.parsed.gps).toBeUndefined();
        expect(after.parsed.ifd0?.[0x0112]).toBe(6);
        expect(after.parsed.exif?.[0x9003]).toBe("2026:03:14 10:20:30");
        expect(after.parsed.icc).toBeDefined();
      }
      // Source: CHECKS.md "Photographs" — no GPS IFD pointer 0x8825 (and, above, no GPS tags).
      expect(ifd0Tags(after.vips.exif)).not.toContain(0x8825);
      expect(ifd0Tags(after.vips.exif)).toContain(0x0112);
      expect(after.vips.orientation).toBe(6);
      expect(after.vips.icc?.equals(before.vips.icc!)).toBe(true);
      if (format === "jpeg") expect(listMetadataBlocks(stored).map((b) => b.kind).sort()).toEqual(["exif", "icc"]);
      // Lossless: the coded image is untouched, so every decoded pixel is the same.
      expect((await sharp(stored).raw().toBuffer()).equals(await sharp(sent).raw().toBuffer())).toBe(true);
      expect(stored.toString("latin1")).not.toMatch(/52,7\.406N|north gate/);
    });
  }

  it("a re-seed strips the location from originals stored before this change", async () => {
    const sent = await phonePhoto("jpeg");
    const res = await upload(sent, "kept-before.jpg").expect(201);
    const id = res.body[0].id as number;
    const { original_key } = await t.db("media_items").where({ id }).first("original_key");
    // As an original was kept before issue 9: the upload's bytes, GPS and all.
    await t.plumbline.mediaStorage.put(original_key, sent);
    await t.db("media_items").where({ id }).update({ bytes: sent.length });
    expect(await hasLocation((await t.plumbline.mediaStorage.get(original_key))!)).toBe(true);

    // The seed writes where the app reads: the local folder, or the S3 bucket under the server-s3 project.
    const first = await seedMedia(t.db, project.id, { mediaDir, config: t.config });
    expect(first).toMatchObject({ created: 0, rewritten: 1, notRemovable: [] });
    const now = (await t.plumbline.mediaStorage.get(original_key))!;
    expect(await hasLocation(now)).toBe(false);
    expect(Number((await t.db("media_items").where({ id }).first("bytes")).bytes)).toBe(now.length);
    // Idempotent: a second run finds nothing to do.
    expect(await seedMedia(t.db, project.id, { mediaDir, config: t.config })).toMatchObject({ created: 0, rewritten: 0 });
  });
});
