import type { Knex } from "knex";
import type { Viewer } from "#shared/domain/audience.ts";
import { visibleFacilitySubject, visibleFacilityTags } from "#shared/domain/facility-tags.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { Gallery, GalleryPhoto, GalleryQuery, MediaPicture, MediaStatus, PictureVariant, Sensitivity, VariantFormat } from "#shared/schemas/media.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { MediaContext } from "./media.context.ts";
import { variantUrl } from "./media.items.ts";
import { countMediaOfProject, findMediaByIds, listGalleryMedia, mediaTaggedWithMilestone, replaceUsages, tagsOf, variantsOf } from "./media.repository.ts";

/**
 * The contract other modules code against (posts, stories, the public site, the programme):
 * publishing checks, the usages that decide who may fetch a derivative, pictures and the gallery.
 */
export function createMediaPictures(ctx: MediaContext) {
  const { db, projects, facility } = ctx;

  /** What rendering a `<picture>` needs, for each existing photo asked for. */
  async function pictureFor(ids: number[]): Promise<Map<number, MediaPicture>> {
    const records = await findMediaByIds(db, ids);
    const variants = await variantsOf(db, records.map((r) => r.id));
    const out = new Map<number, MediaPicture>();
    for (const r of records) {
      const sources: Record<VariantFormat, PictureVariant[]> = { avif: [], webp: [], jpeg: [] };
      for (const v of variants.get(r.id) ?? []) sources[v.format].push({ url: variantUrl(v.storageKey), width: v.width, height: v.height, format: v.format });
      for (const list of Object.values(sources)) list.sort((a, b) => a.width - b.width);
      out.set(r.id, {
        id: r.id,
        width: r.width,
        height: r.height,
        altText: r.altText,
        caption: r.caption,
        credit: r.credit,
        placeholder: r.placeholder,
        dominantColor: r.dominantColor,
        takenAt: r.takenAt,
        focal: { x: r.focalX, y: r.focalY },
        isIllustration: r.isIllustration,
        sources,
      });
    }
    return out;
  }

  /**
   * The pictures among `ids` this reader's browser can load now. Staff load every photo; anyone
   * else only processed, cleared ones (the derivative route's own rule, given the usage the
   * published owner gives): a photo sent back to review or restricted after publication is left
   * out of what readers are shown rather than shown as a broken image (decision 070).
   */
  async function loadableBy(viewer: Viewer, ids: readonly number[]): Promise<Map<number, MediaPicture>> {
    const pictures = await pictureFor([...ids]);
    if (viewer === "staff" || pictures.size === 0) return pictures;
    for (const r of await findMediaByIds(db, [...pictures.keys()])) if (!(r.status === "ready" && r.sensitivity === "cleared")) pictures.delete(r.id);
    return pictures;
  }

  return {
    pictureFor,
    loadableBy,

    /** Ids of the photos tagged with a milestone (the programme keeps such a milestone on record). */
    taggedWithMilestone: (milestoneId: number) => mediaTaggedWithMilestone(db, milestoneId),

    countOfProject: (projectId: number) => countMediaOfProject(db, projectId),

    /** For publishing checks: every image has alt text, is cleared, exists. In the order asked. */
    async describeForPublishing(ids: number[]): Promise<
      Array<{ id: number; exists: boolean; status: MediaStatus | null; altText: string | null; sensitivity: Sensitivity | null; projectId: number | null; flaggedForReview: boolean }>
    > {
      const records = new Map((await findMediaByIds(db, ids)).map((r) => [r.id, r]));
      return [...new Set(ids)].map((id) => {
        const r = records.get(id);
        return r
          ? { id, exists: true, status: r.status, altText: r.altText, sensitivity: r.sensitivity, projectId: r.projectId, flaggedForReview: r.flaggedForReview }
          : { id, exists: false, status: null, altText: null, sensitivity: null, projectId: null, flaggedForReview: false };
      });
    },

    /**
     * Replaces the media an owner (a post, a story, a project page) uses, with the owner's
     * audience and whether it is published; call it in the owner's own transaction. These
     * rows decide who may fetch a derivative.
     */
    async setUsages(
      ownerType: "post" | "story" | "project",
      ownerId: number,
      mediaIds: number[],
      audience: Audience,
      published: boolean,
      trx?: Knex.Transaction,
    ): Promise<void> {
      const q = trx ?? db;
      const unique = [...new Set(mediaIds)];
      const found = new Set((await findMediaByIds(q, unique)).map((r) => r.id));
      const missing = unique.filter((id) => !found.has(id));
      if (missing.length > 0) throw new AppError("unknown_media", `No photo ${missing.join(", ")} in the media library.`, 422, { media: `photo ${missing.join(", ")} does not exist` });
      await replaceUsages(q, { type: ownerType, id: ownerId }, unique, audience, published);
    },

    /**
     * The project's gallery for a reader of the given audiences: cleared photos used in published
     * content they may see, newest capture first, filtered by area, system, capacity block, plant
     * system and month. A block or system the reader may not see is not found (404), so the
     * filter tells nothing of it; each photo names only the blocks and systems the reader may see.
     */
    async gallery(slug: string, audiences: Audience[], f: GalleryQuery): Promise<Gallery> {
      const project = await projects.get(slug);
      const viewer: Viewer = audiences.includes("internal") ? "staff" : audiences.includes("investor") ? "investor" : "public";
      const subjects = await facility.tagSubjects(project.id);
      if (f.block && !visibleFacilitySubject("block", f.block, subjects, viewer)) throw notFound("That capacity block");
      if (f.plant && !visibleFacilitySubject("plant", f.plant, subjects, viewer)) throw notFound("That plant system");
      const rows = await listGalleryMedia(db, project.id, audiences);
      const ids = rows.map((r) => r.id);
      const [tags, pictures] = await Promise.all([tagsOf(db, ids), pictureFor(ids)]);
      const all: GalleryPhoto[] = [];
      for (const r of rows) {
        const picture = pictures.get(r.id);
        if (!picture) continue;
        const t = tags.get(r.id);
        const month = r.takenAt && /^\d{4}-\d{2}/.test(r.takenAt) ? r.takenAt.slice(0, 7) : r.createdAt.toISOString().slice(0, 7);
        const facilityTags = visibleFacilityTags(
          [...(t?.blocks ?? []).map((id) => ({ kind: "block", value: String(id) })), ...(t?.plants ?? []).map((id) => ({ kind: "plant", value: String(id) }))],
          subjects,
          viewer,
        ).map(({ kind, id, name }) => ({ kind, id, name }));
        all.push({ ...picture, areas: t?.areas ?? [], systems: t?.systems ?? [], facilityTags, month });
      }
      const tagged = (kind: "block" | "plant", id: number | undefined) => (p: GalleryPhoto) => !id || p.facilityTags.some((x) => x.kind === kind && x.id === id);
      const uniq = <T extends string>(xs: T[]) => [...new Set(xs)].sort();
      return {
        items: all
          .filter((p) => (!f.area || p.areas.includes(f.area)) && (!f.system || p.systems.includes(f.system)) && (!f.month || p.month === f.month))
          .filter(tagged("block", f.block))
          .filter(tagged("plant", f.plant)),
        areas: uniq(all.flatMap((p) => p.areas)),
        systems: uniq(all.flatMap((p) => p.systems)),
        months: uniq(all.flatMap((p) => (p.month ? [p.month] : []))).reverse(),
      };
    },
  };
}
