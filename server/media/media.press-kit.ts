import type { Readable } from "node:stream";
import sharp from "sharp";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaStatus, Sensitivity } from "#shared/schemas/media.ts";
import type { MediaContext } from "./media.context.ts";
import { findMediaByIds, publishedAudiencesOf, tagsOf, variantsOf } from "./media.repository.ts";

/** Who a press kit is for: staff (any cleared photo of the library) or a visitor (cleared photos of published public content). */
export type PressReader = "staff" | "visitor";

/** A photo as a press kit needs it: what the manifest prints, which files it has, and whether it may go in now. */
export interface PressPhoto {
  id: number;
  projectId: number;
  caption: string | null;
  credit: string | null;
  altText: string | null;
  takenAt: string | null;
  areas: string[];
  /** Why it may not go in this reader's kit now (a sentence), or null when it may. */
  withheld: string | null;
  /** Its stored JPEG derivatives, narrowest first. */
  jpegWidths: number[];
  /** The original's type: the staff-only "original" size keeps PNG as PNG, anything else becomes JPEG. */
  mime: string;
}

/** The file extension of a kit file at a size, by the photo's type. */
export function pressFileExtension(photo: Pick<PressPhoto, "mime">, size: string): "jpg" | "png" {
  return size === "original" && photo.mime === "image/png" ? "png" : "jpg";
}

function withheldReason(r: { status: MediaStatus; sensitivity: Sensitivity; flaggedForReview: boolean }, published: readonly Audience[], reader: PressReader): string | null {
  if (r.status !== "ready") return "its files are not ready";
  if (r.sensitivity === "restricted") return "it is restricted";
  if (r.sensitivity === "unreviewed") return "no lead has cleared it yet";
  if (r.flaggedForReview) return "it is flagged for review";
  if (reader === "visitor" && !published.includes("public")) return "it is not in published public content";
  return null;
}

/**
 * Press kits' reads of the library (docs/decisions/062-press-kits.md): each photo's state at the
 * moment it is asked (the kit asks again just before each file, so a photo restricted meanwhile
 * is left out), and one file's bytes as a stream, a stored derivative or the original without
 * its metadata.
 */
export function createMediaPressKit(ctx: MediaContext) {
  const { db, storage, limits } = ctx;

  return {
    /** The photos asked for that exist, by id, as `reader` may have them now. */
    async pressPhotos(ids: readonly number[], reader: PressReader): Promise<Map<number, PressPhoto>> {
      const records = await findMediaByIds(db, ids);
      const found = records.map((r) => r.id);
      const [tags, variants, published] = await Promise.all([tagsOf(db, found), variantsOf(db, found), publishedAudiencesOf(db, found)]);
      const out = new Map<number, PressPhoto>();
      for (const r of records) {
        const jpegs = (variants.get(r.id) ?? []).filter((v) => v.format === "jpeg").sort((a, b) => a.width - b.width);
        out.set(r.id, {
          id: r.id,
          projectId: r.projectId,
          caption: r.caption,
          credit: r.credit,
          altText: r.altText,
          takenAt: r.takenAt,
          areas: tags.get(r.id)?.areas ?? [],
          withheld: withheldReason(r, published.get(r.id) ?? [], reader),
          jpegWidths: jpegs.map((v) => v.width),
          mime: r.mime,
        });
      }
      return out;
    },

    /**
     * One photo's file for a kit: the narrowest stored JPEG derivative at least `size` wide (else
     * the widest there is), or for "original" the stored original re-encoded without any of its
     * metadata (EXIF, GPS, XMP, IPTC) and with its orientation applied to the pixels. Null when
     * its bytes are missing from storage.
     */
    async openPressFile(photo: PressPhoto, size: string): Promise<Readable | null> {
      if (size === "original") {
        const record = (await findMediaByIds(db, [photo.id]))[0];
        const file = record ? await storage.stream(record.originalKey) : null;
        if (!file) return null;
        // sharp writes no metadata unless asked (withMetadata/keepExif): rotate() applies the orientation first.
        const encode = sharp({ limitInputPixels: limits.maxPixels, failOn: "error" }).rotate();
        const out = pressFileExtension(photo, size) === "png" ? encode.png() : encode.jpeg({ quality: 92, mozjpeg: false });
        file.stream.on("error", (err) => out.destroy(err));
        return file.stream.pipe(out);
      }
      const asked = Number(size);
      const width = photo.jpegWidths.find((w) => w >= asked) ?? photo.jpegWidths.at(-1);
      if (width === undefined) return null;
      const jpeg = (await variantsOf(db, [photo.id])).get(photo.id)?.find((v) => v.format === "jpeg" && v.width === width);
      return jpeg ? ((await storage.stream(jpeg.storageKey))?.stream ?? null) : null;
    },
  };
}
