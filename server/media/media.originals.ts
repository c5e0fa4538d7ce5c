import { notFound } from "../core/app-error.ts";
import type { MediaContext } from "./media.context.ts";
import { LocationNotRemovable, stripLocation } from "./media.metadata.ts";
import { hasLocation, type ProbedImage } from "./media.probe.ts";
import { findMediaById, listOriginals, setOriginalBytes } from "./media.repository.ts";
import { storedFile, type StoredFile } from "./media.storage.ts";

const ORIGINAL_EXTENSIONS: Record<string, string> = { "image/jpeg": "jpg", "image/png": "png", "image/webp": "webp", "image/heic": "heic", "image/heif": "heif" };

/** Storage key of an original: its SHA-256, so the same bytes are kept once. */
export function originalKey(sha256: string, mime: string): string {
  return `originals/${sha256.slice(0, 2)}/${sha256}.${ORIGINAL_EXTENSIONS[mime] ?? "bin"}`;
}

/**
 * The original's bytes with GPS, maker notes, XMP and IPTC removed and its image data untouched
 * (media.metadata.ts), checked again with the probe's own reader; or why its location cannot be
 * removed, in which case the upload refuses the file (422) rather than keep it with its location.
 */
export async function removeLocation(data: Buffer, image: ProbedImage): Promise<{ ok: true; bytes: Buffer } | { ok: false; message: string }> {
  if (image.mime === "image/heic" || image.mime === "image/heif") {
    // No lossless rewrite for HEIF here: one without a location is kept as sent, one with it refused.
    return image.hasGps
      ? { ok: false, message: "This HEIC/HEIF photo carries its location, which this server cannot remove from the format; export it as JPEG and upload again." }
      : { ok: true, bytes: data };
  }
  try {
    const bytes = stripLocation(data, image.mime);
    if (await hasLocation(bytes)) return { ok: false, message: "Its location could not be removed from the file." };
    return { ok: true, bytes };
  } catch (err) {
    if (!(err instanceof LocationNotRemovable)) throw err;
    return { ok: false, message: `Its location could not be removed from the file (${err.message}).` };
  }
}

/** The stored originals: read by staff, and rewritten without their location. */
export function createMediaOriginals(ctx: MediaContext) {
  const { db, storage } = ctx;
  return {
    /** The original as uploaded (staff only: it may carry metadata other than its location). */
    async original(id: number): Promise<StoredFile & { name: string }> {
      const item = await findMediaById(db, id);
      if (!item) throw notFound("That photo");
      return { ...storedFile(storage, item.originalKey, item.mime), name: item.originalName };
    },

    /**
     * Rewrites the project's stored originals without their location (originals kept before
     * location was removed at upload); idempotent: a clean original is left as it is. Returns
     * how many were rewritten and the ids of any whose location could not be removed.
     */
    async removeLocationFromOriginals(projectId: number): Promise<{ rewritten: number; notRemovable: number[] }> {
      let rewritten = 0;
      const notRemovable: number[] = [];
      for (const o of await listOriginals(db, projectId)) {
        const data = await storage.get(o.originalKey);
        if (!data) continue;
        let clean: Buffer;
        try {
          clean = stripLocation(data, o.mime);
        } catch (err) {
          if (!(err instanceof LocationNotRemovable)) throw err;
          if (await hasLocation(data)) notRemovable.push(o.id);
          continue;
        }
        if (clean.equals(data)) continue;
        await storage.put(o.originalKey, clean);
        await setOriginalBytes(db, o.id, clean.length);
        rewritten += 1;
      }
      return { rewritten, notRemovable };
    },
  };
}
