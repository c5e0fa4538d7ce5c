import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaListFilters, MediaStatus, MediaTags, Sensitivity, TagKind, VariantFormat } from "#shared/schemas/media.ts";
import type { System } from "#shared/schemas/programme.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { bool, columnsOf, countOf, date, dateOrNull, num, numOrNull, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

export interface MediaRecord {
  id: number;
  projectId: number;
  sha256: string;
  status: MediaStatus;
  failureReason: string | null;
  originalKey: string;
  originalName: string;
  mime: string;
  bytes: number;
  width: number;
  height: number;
  takenAt: string | null;
  hadGps: boolean;
  altText: string | null;
  caption: string | null;
  credit: string | null;
  focalX: number;
  focalY: number;
  sensitivity: Sensitivity;
  flaggedForReview: boolean;
  reviewedAt: Date | null;
  reviewedBy: number | null;
  placeholder: string | null;
  dominantColor: string | null;
  isIllustration: boolean;
  uploadedBy: number | null;
  createdAt: Date;
  updatedAt: Date;
}

export interface VariantRecord {
  mediaId: number;
  width: number;
  height: number;
  format: VariantFormat;
  storageKey: string;
  bytes: number;
}

const toMedia = readRow<MediaRecord>({
  id: num(), projectId: num(), sha256: text(), status: oneOf<MediaStatus>(), failureReason: textOrNull(), originalKey: text(), originalName: text(), mime: text(),
  bytes: num(), width: num(), height: num(), takenAt: textOrNull(), hadGps: bool(), altText: textOrNull(), caption: textOrNull(), credit: textOrNull(),
  focalX: num(), focalY: num(), sensitivity: oneOf<Sensitivity>(), flaggedForReview: bool(), reviewedAt: dateOrNull(), reviewedBy: numOrNull(),
  placeholder: textOrNull(), dominantColor: textOrNull(), isIllustration: bool(), uploadedBy: numOrNull(), createdAt: date(), updatedAt: date(),
});

function itemsQuery(q: Q) {
  return q("media_items as i").select("i.*");
}

export type NewMedia = Pick<MediaRecord, "projectId" | "sha256" | "originalKey" | "originalName" | "mime" | "bytes" | "width" | "height" | "takenAt" | "hadGps" | "uploadedBy"> & {
  isIllustration?: boolean;
};

/** Inserts an item; null when the project already holds the same SHA-256 (a concurrent duplicate). */
export async function insertMedia(q: Q, m: NewMedia): Promise<number | null> {
  try {
    const [id] = await q("media_items").insert({
      project_id: m.projectId,
      sha256: m.sha256,
      status: "processing",
      original_key: m.originalKey,
      original_name: m.originalName,
      mime: m.mime,
      bytes: m.bytes,
      width: m.width,
      height: m.height,
      taken_at: m.takenAt,
      taken_on: m.takenAt ? m.takenAt.slice(0, 10) : null,
      had_gps: m.hadGps,
      uploaded_by: m.uploadedBy,
      is_illustration: m.isIllustration ?? false,
    });
    return Number(id);
  } catch (err) {
    if ((err as { code?: string }).code === "ER_DUP_ENTRY") return null;
    throw err;
  }
}

export async function findMediaById(q: Q, id: number, forUpdate = false): Promise<MediaRecord | null> {
  const query = itemsQuery(q).where("i.id", id).first();
  if (forUpdate) query.forUpdate("i");
  const r = await query;
  return r ? toMedia(r) : null;
}

export async function findMediaByIds(q: Q, ids: readonly number[]): Promise<MediaRecord[]> {
  if (ids.length === 0) return [];
  return (await itemsQuery(q).whereIn("i.id", [...new Set(ids)])).map(toMedia);
}

export async function findMediaBySha(q: Q, projectId: number, sha256: string): Promise<MediaRecord | null> {
  const r = await itemsQuery(q).where({ "i.project_id": projectId, "i.sha256": sha256 }).first();
  return r ? toMedia(r) : null;
}

export async function countItemsWithOriginal(q: Q, originalKey: string): Promise<number> {
  return countOf(q("media_items").where({ original_key: originalKey }));
}

export function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => `\\${c}`);
}

/**
 * The library list of one project: every filter of the site office's library, newest first.
 * Staff only (the route says so), so no audience filter applies here.
 */
export async function listMedia(
  q: Q,
  projectId: number,
  f: MediaListFilters,
  page: { offset: number; limit: number },
): Promise<{ items: MediaRecord[]; total: number }> {
  const hasTag = (kind: TagKind | null, value: string) =>
    function (this: Knex.QueryBuilder) {
      this.select(q.raw("1"))
        .from("media_tags as t")
        .whereRaw("t.media_id = i.id")
        .andWhere("t.value", value);
      if (kind) this.andWhere("t.kind", kind);
    };
  const base = q("media_items as i").where("i.project_id", projectId);
  if (f.tag) base.whereExists(hasTag(null, f.tag));
  if (f.area) base.whereExists(hasTag("area", f.area));
  if (f.system) base.whereExists(hasTag("system", f.system));
  if (f.milestone) base.whereExists(hasTag("milestone", String(f.milestone)));
  if (f.block) base.whereExists(hasTag("block", String(f.block)));
  if (f.plant) base.whereExists(hasTag("plant", String(f.plant)));
  if (f.takenFrom) base.where("i.taken_on", ">=", f.takenFrom);
  if (f.takenTo) base.where("i.taken_on", "<=", f.takenTo);
  if (f.sensitivity) base.where("i.sensitivity", f.sensitivity);
  if (f.status) base.where("i.status", f.status);
  if (f.missingAlt === true) base.where((w) => w.whereNull("i.alt_text").orWhere("i.alt_text", ""));
  if (f.missingAlt === false) base.whereNotNull("i.alt_text").andWhereNot("i.alt_text", "");
  if (f.flagged !== undefined) base.where("i.flagged_for_review", f.flagged);
  if (f.q) {
    const like = `%${escapeLike(f.q)}%`;
    base.where((w) => w.where("i.original_name", "like", like).orWhere("i.caption", "like", like).orWhere("i.alt_text", "like", like));
  }
  const total = await countOf(base.clone());
  const ids = (await base
    .clone()
    .select("i.id")
    .orderBy([{ column: "i.created_at", order: "desc" }, { column: "i.id", order: "desc" }])
    .offset(page.offset)
    .limit(page.limit)) as Array<{ id: number }>;
  const records = await findMediaByIds(q, ids.map((r) => Number(r.id)));
  const byId = new Map(records.map((r) => [r.id, r]));
  return { items: ids.map((r) => byId.get(Number(r.id))!).filter(Boolean), total };
}

/** The unreviewed photos of a project, those flagged for review first, then oldest first. */
export async function listReviewQueue(q: Q, projectId: number, limit: number): Promise<MediaRecord[]> {
  const rows = await itemsQuery(q)
    .where({ "i.project_id": projectId, "i.sensitivity": "unreviewed" })
    .orderBy([{ column: "i.flagged_for_review", order: "desc" }, { column: "i.created_at", order: "asc" }, { column: "i.id", order: "asc" }])
    .limit(limit);
  return rows.map(toMedia);
}

export interface MediaUpdate {
  altText?: string | null;
  caption?: string | null;
  credit?: string | null;
  focalX?: number;
  focalY?: number;
  sensitivity?: Sensitivity;
  flaggedForReview?: boolean;
  reviewedBy?: number | null;
  reviewedAt?: Date | null;
  isIllustration?: boolean;
}

const MEDIA_UPDATE_KEYS = ["altText", "caption", "credit", "focalX", "focalY", "sensitivity", "flaggedForReview", "reviewedBy", "reviewedAt", "isIllustration"] as const satisfies ReadonlyArray<keyof MediaUpdate>;

export async function updateMedia(q: Q, id: number, u: MediaUpdate): Promise<void> {
  await q("media_items").where({ id }).update({ ...columnsOf(u, MEDIA_UPDATE_KEYS), updated_at: q.raw("CURRENT_TIMESTAMP(3)") });
}

// Tags

const EMPTY_TAGS = (): MediaTags => ({ areas: [], systems: [], milestones: [], blocks: [], plants: [] });

export async function tagsOf(q: Q, ids: readonly number[]): Promise<Map<number, MediaTags>> {
  const out = new Map<number, MediaTags>(ids.map((id) => [id, EMPTY_TAGS()]));
  if (ids.length === 0) return out;
  const rows = (await q("media_tags").whereIn("media_id", [...new Set(ids)]).orderBy(["kind", "value"])) as Array<{ media_id: number; kind: TagKind; value: string }>;
  for (const r of rows) {
    const tags = out.get(Number(r.media_id)) ?? EMPTY_TAGS();
    if (r.kind === "area") tags.areas.push(r.value);
    else if (r.kind === "system") tags.systems.push(r.value as System);
    else if (r.kind === "milestone") tags.milestones.push(Number(r.value));
    else if (r.kind === "block") tags.blocks.push(Number(r.value));
    else if (r.kind === "plant") tags.plants.push(Number(r.value));
    out.set(Number(r.media_id), tags);
  }
  for (const tags of out.values()) for (const ids of [tags.milestones, tags.blocks, tags.plants]) ids.sort((a, b) => a - b);
  return out;
}

/** Replaces one kind of tag on an item. */
export async function replaceTags(q: Q, mediaId: number, kind: TagKind, values: readonly string[]): Promise<void> {
  await q("media_tags").where({ media_id: mediaId, kind }).delete();
  await addTags(q, [mediaId], kind, values);
}

export async function addTags(q: Q, mediaIds: readonly number[], kind: TagKind, values: readonly string[]): Promise<void> {
  const rows = mediaIds.flatMap((media_id) => [...new Set(values)].map((value) => ({ media_id, kind, value })));
  if (rows.length === 0) return;
  await q("media_tags").insert(rows).onConflict(["media_id", "kind", "value"]).ignore();
}

export async function removeTags(q: Q, mediaIds: readonly number[], kind: TagKind, values: readonly string[]): Promise<void> {
  if (mediaIds.length === 0 || values.length === 0) return;
  await q("media_tags").whereIn("media_id", [...mediaIds]).andWhere({ kind }).whereIn("value", [...values]).delete();
}

/** Areas already used on the project's photos (the programme's own areas come from its service). */
export async function taggedAreas(q: Q, projectId: number): Promise<string[]> {
  const used = (await q("media_tags as t")
    .join("media_items as i", "i.id", "t.media_id")
    .where({ "i.project_id": projectId, "t.kind": "area" })
    .distinct("t.value as v")) as Array<{ v: string }>;
  return used.map((r) => r.v);
}

/** Photos tagged with the milestone (the programme keeps such a milestone on record). */
export async function mediaTaggedWithMilestone(q: Q, milestoneId: number): Promise<number[]> {
  const rows = (await q("media_tags").where({ kind: "milestone", value: String(milestoneId) }).orderBy("media_id").select("media_id")) as Array<{ media_id: number }>;
  return rows.map((r) => Number(r.media_id));
}

// Variants

export async function variantsOf(q: Q, ids: readonly number[]): Promise<Map<number, VariantRecord[]>> {
  const out = new Map<number, VariantRecord[]>(ids.map((id) => [id, []]));
  if (ids.length === 0) return out;
  const rows = await q("media_variants").whereIn("media_id", [...new Set(ids)]).orderBy([{ column: "width" }, { column: "format" }]);
  for (const r of rows as Array<Record<string, unknown>>) {
    const v: VariantRecord = {
      mediaId: Number(r.media_id),
      width: Number(r.width),
      height: Number(r.height),
      format: r.format as VariantFormat,
      storageKey: String(r.storage_key),
      bytes: Number(r.bytes),
    };
    out.get(v.mediaId)?.push(v);
  }
  return out;
}

export async function countVariantsWithKey(q: Q, key: string): Promise<number> {
  return countOf(q("media_variants").where({ storage_key: key }));
}

/** Who is asking for a derivative: the three audiences the files' read path knows. */
export type FileReader = "staff" | "investor" | "visitor";

/**
 * The one audience check of the media files' read path. A derivative is for staff always;
 * for an investor while its photo is cleared and used in published public or investor
 * content; for a visitor while it is cleared and used in published public content.
 * Returns null when this reader may not have it (or there is no such key), and whether the
 * bytes are public (so shared caches may keep them).
 */
export async function findReadableVariant(
  q: Q,
  key: string,
  reader: FileReader,
): Promise<{ format: VariantFormat; bytes: number; isPublic: boolean } | null> {
  const usedIn = (audiences: Audience[]) =>
    q.raw(
      `i.sensitivity = 'cleared' AND EXISTS (SELECT 1 FROM media_usages u WHERE u.media_id = i.id AND u.published = 1 AND u.audience IN (${audiences.map(() => "?").join(", ")}))`,
      audiences,
    );
  const row = (await q("media_variants as v")
    .join("media_items as i", "i.id", "v.media_id")
    .where("v.storage_key", key)
    .select("v.format", "v.bytes")
    .select(q.raw("MAX(?) AS public_ok", [usedIn(["public"])]))
    .select(q.raw("MAX(?) AS investor_ok", [usedIn(["public", "investor"])]))
    .groupBy("v.format", "v.bytes")
    .first()) as { format: VariantFormat; bytes: number; public_ok: number | null; investor_ok: number | null } | undefined;
  if (!row) return null;
  const isPublic = Number(row.public_ok) === 1;
  const allowed = reader === "staff" || (reader === "investor" ? Number(row.investor_ok) === 1 : isPublic);
  return allowed ? { format: row.format, bytes: Number(row.bytes), isPublic } : null;
}

// Usages

export async function replaceUsages(
  q: Q,
  owner: { type: "post" | "story" | "project"; id: number },
  mediaIds: readonly number[],
  audience: Audience,
  published: boolean,
): Promise<void> {
  const parent = { owner_type: owner.type, owner_id: owner.id };
  // By whole primary keys (see replaceChildRows): two posts or stories saved at the same moment must not deadlock.
  await replaceChildRows(q, "media_usages", parent, ["media_id"], [...new Set(mediaIds)].map((media_id) => ({ ...parent, media_id, audience, published })));
}

/** Every stored original of a project, for rewriting their metadata. */
export async function listOriginals(q: Q, projectId: number): Promise<Array<{ id: number; originalKey: string; mime: string; bytes: number }>> {
  const rows = (await q("media_items").where({ project_id: projectId }).orderBy("id").select("id", "original_key", "mime", "bytes")) as Array<Record<string, unknown>>;
  return rows.map((r) => ({ id: Number(r.id), originalKey: String(r.original_key), mime: String(r.mime), bytes: Number(r.bytes) }));
}

export async function setOriginalBytes(q: Q, id: number, bytes: number): Promise<void> {
  await q("media_items").where({ id }).update({ bytes, updated_at: q.raw("CURRENT_TIMESTAMP(3)") });
}

export async function countMediaOfProject(q: Q, projectId: number): Promise<number> {
  return countOf(q("media_items").where({ project_id: projectId }));
}

// Gallery

/**
 * Photos of a project shown in its public gallery: cleared, ready, and used in published content
 * of one of the given audiences (the same rule that lets their derivatives be served).
 */
export async function listGalleryMedia(q: Q, projectId: number, audiences: readonly Audience[]): Promise<Array<{ id: number; takenAt: string | null; createdAt: Date }>> {
  const rows = (await q("media_items as i")
    .where({ "i.project_id": projectId, "i.sensitivity": "cleared", "i.status": "ready" })
    .whereExists(q("media_usages as u").whereRaw("u.media_id = i.id").andWhere("u.published", true).whereIn("u.audience", [...audiences]))
    .orderBy([{ column: "i.taken_at", order: "desc" }, { column: "i.id", order: "desc" }])
    .limit(500)
    .select("i.id", "i.taken_at", "i.created_at")) as Array<{ id: number; taken_at: string | null; created_at: Date }>;
  return rows.map((r) => ({ id: Number(r.id), takenAt: r.taken_at ?? null, createdAt: r.created_at }));
}

/** The audiences of published content each photo is used in (the rule that opens its derivatives to readers). */
export async function publishedAudiencesOf(q: Q, ids: readonly number[]): Promise<Map<number, Audience[]>> {
  const out = new Map<number, Audience[]>(ids.map((id) => [id, []]));
  if (ids.length === 0) return out;
  const rows = (await q("media_usages").whereIn("media_id", [...new Set(ids)]).andWhere("published", true).distinct("media_id", "audience")) as Array<{ media_id: number; audience: Audience }>;
  for (const r of rows) out.get(Number(r.media_id))?.push(r.audience);
  return out;
}

// Fingerprints and then-and-now pairs (docs/decisions/063-then-and-now-pairs.md)

/** A processed photo with a capture time and a fingerprint, as the then-and-now pairing reads it. */
export interface PairableRecord {
  id: number;
  takenAt: string;
  fingerprint: string;
  sensitivity: Sensitivity;
  flaggedForReview: boolean;
  areas: string[];
  blocks: number[];
  plants: number[];
}

/** Every ready photo of a project with a capture time and a fingerprint, with its area and facility tags. */
export async function listPairablePhotos(q: Q, projectId: number): Promise<PairableRecord[]> {
  const rows = (await q("media_items")
    .where({ project_id: projectId, status: "ready" })
    .whereNotNull("fingerprint")
    .whereNotNull("taken_at")
    .select("id", "taken_at", "fingerprint", "sensitivity", "flagged_for_review")) as Array<Record<string, unknown>>;
  const out = new Map<number, PairableRecord>();
  for (const r of rows) {
    const id = Number(r.id);
    out.set(id, { id, takenAt: String(r.taken_at), fingerprint: String(r.fingerprint), sensitivity: r.sensitivity as Sensitivity, flaggedForReview: Boolean(r.flagged_for_review), areas: [], blocks: [], plants: [] });
  }
  if (out.size === 0) return [];
  const tags = (await q("media_tags as t")
    .join("media_items as i", "i.id", "t.media_id")
    .where("i.project_id", projectId)
    .whereIn("t.kind", ["area", "block", "plant"])
    .select("t.media_id", "t.kind", "t.value")) as Array<{ media_id: number; kind: TagKind; value: string }>;
  for (const t of tags) {
    const photo = out.get(Number(t.media_id));
    if (!photo) continue;
    if (t.kind === "area") photo.areas.push(t.value);
    else if (t.kind === "block") photo.blocks.push(Number(t.value));
    else photo.plants.push(Number(t.value));
  }
  return [...out.values()];
}

/** Ready photos without a fingerprint (processed before fingerprints were kept), with their smallest stored JPEG derivative. */
export async function listWithoutFingerprint(q: Q, afterId: number, limit: number): Promise<Array<{ id: number; storageKey: string }>> {
  const rows = (await q("media_items as i")
    .join("media_variants as v", "v.media_id", "i.id")
    .where({ "i.status": "ready", "v.format": "jpeg" })
    .whereNull("i.fingerprint")
    .where("i.id", ">", afterId)
    .whereRaw("v.width = (SELECT MIN(w.width) FROM media_variants w WHERE w.media_id = i.id AND w.format = 'jpeg')")
    .orderBy("i.id")
    .limit(limit)
    .select("i.id", "v.storage_key")) as Array<{ id: number; storage_key: string }>;
  return rows.map((r) => ({ id: Number(r.id), storageKey: String(r.storage_key) }));
}

/** Stores a photo's fingerprint (16 hex digits). */
export async function setFingerprint(q: Q, id: number, fingerprint: string): Promise<void> {
  await q("media_items").where({ id }).update({ fingerprint });
}
