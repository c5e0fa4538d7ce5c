import type { Knex } from "knex";
import type { MediaItem, MediaTags, VariantFormat } from "#shared/schemas/media.ts";
import { notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import type { MediaContext } from "./media.context.ts";
import { findMediaById, tagsOf, variantsOf, type MediaRecord, type VariantRecord } from "./media.repository.ts";

const EXTENSIONS: Record<VariantFormat, string> = { avif: "avif", webp: "webp", jpeg: "jpg" };

/** Storage key of a derivative: its bytes' hash makes it safe to cache for ever. */
export function variantKey(v: { hash: string; width: number; format: VariantFormat }): string {
  return `variants/${v.hash}-${v.width}w.${EXTENSIONS[v.format]}`;
}

/** The public URL of a derivative stored under `key`. */
export function variantUrl(key: string): string {
  return `/media/v/${key.replace(/^variants\//, "")}`;
}

/** A photo as the site office's library shows it; `names` are people's names by user id. */
function toItem(r: MediaRecord, tags: MediaTags | undefined, variants: VariantRecord[] | undefined, names: Map<number, string>): MediaItem {
  const nameOf = (id: number | null) => (id === null ? null : (names.get(id) ?? null));
  return {
    id: r.id,
    projectId: r.projectId,
    status: r.status,
    failureReason: r.failureReason,
    name: r.originalName,
    mime: r.mime,
    bytes: r.bytes,
    width: r.width,
    height: r.height,
    takenAt: r.takenAt,
    hadGps: r.hadGps,
    altText: r.altText,
    caption: r.caption,
    credit: r.credit,
    focal: { x: r.focalX, y: r.focalY },
    sensitivity: r.sensitivity,
    flaggedForReview: r.flaggedForReview,
    reviewedAt: r.reviewedAt?.toISOString() ?? null,
    reviewedBy: nameOf(r.reviewedBy),
    placeholder: r.placeholder,
    dominantColor: r.dominantColor,
    isIllustration: r.isIllustration,
    tags: tags ?? { areas: [], systems: [], milestones: [], blocks: [], plants: [] },
    variants: (variants ?? []).map((v) => ({ url: variantUrl(v.storageKey), width: v.width, height: v.height, format: v.format, bytes: v.bytes })),
    originalUrl: `/api/media/${r.id}/original`,
    uploadedBy: nameOf(r.uploadedBy),
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  };
}

/** Who uploaded and who reviewed these photos. */
const peopleOf = (records: MediaRecord[]) => records.flatMap((r) => [r.uploadedBy, r.reviewedBy]).filter((id): id is number => id !== null);

/** Reads photos with their tags, derivatives and people's names, as library items. */
export function createItemReader(ctx: Pick<MediaContext, "db" | "accounts">) {
  const { db, accounts } = ctx;
  return {
    async itemsOf(records: MediaRecord[]): Promise<MediaItem[]> {
      const ids = records.map((r) => r.id);
      const [tags, variants, names] = await Promise.all([tagsOf(db, ids), variantsOf(db, ids), accounts.namesOf(peopleOf(records))]);
      return records.map((r) => toItem(r, tags.get(r.id), variants.get(r.id), names));
    },

    async getItem(id: number, q: Db | Knex.Transaction = db): Promise<MediaItem> {
      const r = await findMediaById(q, id);
      if (!r) throw notFound("That photo");
      const [tags, variants, names] = await Promise.all([tagsOf(q, [id]), variantsOf(q, [id]), accounts.namesOf(peopleOf([r]))]);
      return toItem(r, tags.get(id), variants.get(id), names);
    },
  };
}
export type ItemReader = ReturnType<typeof createItemReader>;
