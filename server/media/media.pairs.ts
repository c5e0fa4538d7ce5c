import type { Viewer } from "#shared/domain/audience.ts";
import { visibleFacilitySubject, type FacilityTagSubject } from "#shared/domain/facility-tags.ts";
import { findThenAndNowPairs } from "#shared/domain/then-and-now.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import { THEN_AND_NOW_MAX_DISTANCE, type ThenAndNowAnswer, type ThenAndNowQuery } from "#shared/schemas/writing-help.ts";
import type { Logger } from "../core/logger.ts";
import type { MediaContext } from "./media.context.ts";
import { fingerprintOf } from "./media.fingerprint.ts";
import { listPairablePhotos, listWithoutFingerprint, setFingerprint, type PairableRecord } from "./media.repository.ts";

/**
 * Whether a photo may stand in a pair offered for content of `audience` — the rule the publishing
 * checks apply to a story's photos (publishing.checks.ts), and a little stricter: in public or
 * investor content it is cleared by a lead and not flagged for another look, and it names no
 * capacity block or plant system those readers may not see (a photo of an investor-only block
 * is never offered for a public story). Internal content may show any processed photo.
 */
function mayShow(photo: PairableRecord, audience: Audience, subjects: readonly FacilityTagSubject[]): boolean {
  if (audience === "internal") return true;
  if (photo.sensitivity !== "cleared" || photo.flaggedForReview) return false;
  const viewer: Viewer = audience;
  return photo.blocks.every((id) => visibleFacilitySubject("block", id, subjects, viewer)) && photo.plants.every((id) => visibleFacilitySubject("plant", id, subjects, viewer));
}

const thumbOf = (picture: MediaPicture): string | null => (picture.sources.jpeg[0] ?? picture.sources.webp[0] ?? picture.sources.avif[0])?.url ?? null;

/**
 * Then-and-now pairs found for the writer (docs/decisions/063-then-and-now-pairs.md): the pairing
 * itself is src/shared/domain/then-and-now.ts; this reads the project's photos, says which may be
 * shown to the audience asked for, and fills in each pair's pictures. Also the one-off fingerprint
 * backfill for photos processed before fingerprints were kept.
 */
export function createMediaPairs(ctx: MediaContext, pictureFor: (ids: number[]) => Promise<Map<number, MediaPicture>>) {
  const { db, projects, facility, storage } = ctx;

  return {
    /** The best pairs of a project's photos for content of `query.audience`, best first. */
    async thenAndNow(slug: string, query: ThenAndNowQuery): Promise<ThenAndNowAnswer> {
      const project = await projects.get(slug);
      const [photos, subjects] = await Promise.all([listPairablePhotos(db, project.id), query.audience === "internal" ? Promise.resolve([]) : facility.tagSubjects(project.id)]);
      const found = findThenAndNowPairs(
        photos.map((p) => ({ id: p.id, areas: p.areas, takenAt: p.takenAt, fingerprint: p.fingerprint, cleared: mayShow(p, query.audience, subjects) })),
        { minDays: query.minDays, maxDistance: THEN_AND_NOW_MAX_DISTANCE, limit: query.limit, ...(query.area ? { area: query.area } : {}) },
      );
      const byId = new Map(photos.map((p) => [p.id, p]));
      const pictures = await pictureFor([...new Set(found.flatMap((f) => [f.thenId, f.nowId]))]);
      const side = (id: number) => {
        const picture = pictures.get(id);
        const photo = byId.get(id);
        return picture && photo ? { mediaId: id, takenAt: photo.takenAt, caption: picture.caption, thumbUrl: thumbOf(picture), picture } : null;
      };
      const pairs: ThenAndNowAnswer["pairs"] = [];
      for (const f of found) {
        const then = side(f.thenId);
        const now = side(f.nowId);
        if (then && now) pairs.push({ area: f.area, then, now, daysApart: f.daysApart, distance: f.distance });
      }
      return { pairs };
    },

    /**
     * Fingerprints every processed photo that has none, from its smallest stored JPEG derivative
     * (the pipeline computes it at ingest; this covers photos processed before). A photo whose file
     * cannot be read is skipped and tried again at the next start. Returns how many were stored.
     */
    async backfillFingerprints(logger?: Logger, batch = 100): Promise<number> {
      let stored = 0;
      let after = 0;
      for (;;) {
        const rows = await listWithoutFingerprint(db, after, batch);
        if (rows.length === 0) return stored;
        for (const row of rows) {
          after = row.id;
          try {
            const bytes = await storage.get(row.storageKey);
            if (!bytes) continue;
            await setFingerprint(db, row.id, await fingerprintOf(bytes));
            stored += 1;
          } catch (err) {
            logger?.warn({ err, mediaId: row.id }, "no fingerprint for this photo");
          }
        }
      }
    },
  };
}
