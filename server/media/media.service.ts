import { randomBytes } from "node:crypto";
import type { Readable } from "node:stream";
import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import {
  SECURITY_SYSTEM,
  type BulkTagInput,
  type Gallery,
  type GalleryPhoto,
  type GalleryQuery,
  type MediaItem,
  type MediaListQuery,
  type MediaListResponse,
  type MediaPatchInput,
  type MediaPicture,
  type MediaStatus,
  type MediaTags,
  type MediaTagsPatch,
  type MediaUploadResult,
  type MediaVocabulary,
  type PictureVariant,
  type RefusedFile,
  type ReviewInput,
  type SignedVariantQuery,
  type Sensitivity,
  type TagKind,
  type VariantFormat,
} from "#shared/schemas/media.ts";
import { SystemSchema } from "#shared/schemas/programme.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { createTokenSigner } from "../core/signed-token.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { LocationNotRemovable, stripLocation } from "./media.metadata.ts";
import { hasLocation, probeImage, type ProbedImage } from "./media.probe.ts";
import {
  addTags,
  claimJob,
  countItemsWithOriginal,
  listOriginals,
  setOriginalBytes,
  countMediaOfProject,
  countVariantsWithKey,
  deleteJob,
  existingMilestoneIds,
  findMediaById,
  findMediaByIds,
  findMediaBySha,
  findReadableVariant,
  insertJob,
  insertMedia,
  insertVariants,
  knownAreas,
  listMedia,
  listReviewQueue,
  isKeyStaged,
  lockHeldJob,
  lockJob,
  markMediaFailed,
  markMediaReady,
  mediaTaggedWithMilestone,
  milestonesOfProject,
  removeTags,
  replaceTags,
  replaceUsages,
  requeueExpiredLeases,
  requeueJob,
  requeueMedia,
  setStagedKeys,
  tagsOf,
  listGalleryMedia,
  updateMedia,
  variantsOf,
  type ClaimedJob,
  type FileReader,
  type MediaRecord,
  type MediaUpdate,
  type StagedKeys,
  type VariantRecord,
} from "./media.repository.ts";
import type { MediaStorage, ReceivedFile, UploadArea } from "./media.storage.ts";

export interface MediaLimits {
  /** Largest file, bytes. */
  maxFileBytes: number;
  /** Most files in one upload request. */
  maxFiles: number;
  /** Most pixels (width × height) an image may declare. */
  maxPixels: number;
}

/** A job is tried this many times (a crash counts as a try) before its photo is marked failed. */
export const MAX_JOB_ATTEMPTS = 3;

const CONTENT_TYPES: Record<VariantFormat, string> = { avif: "image/avif", webp: "image/webp", jpeg: "image/jpeg" };
const EXTENSIONS: Record<VariantFormat, string> = { avif: "avif", webp: "webp", jpeg: "jpg" };
const ORIGINAL_EXTENSIONS: Record<string, string> = { "image/jpeg": "jpg", "image/png": "png", "image/webp": "webp", "image/heic": "heic", "image/heif": "heif" };

/** The file-name part of a derivative's URL: content hash, width, format. */
const VARIANT_NAME = /^[0-9a-f]{16}-\d{1,5}w\.(avif|webp|jpg)$/;

/** Storage key of a derivative: its bytes' hash makes it safe to cache for ever. */
export function variantKey(v: { hash: string; width: number; format: VariantFormat }): string {
  return `variants/${v.hash}-${v.width}w.${EXTENSIONS[v.format]}`;
}

/** The public URL of a derivative stored under `key`. */
export function variantUrl(key: string): string {
  return `/media/v/${key.replace(/^variants\//, "")}`;
}

/*
 * Signed derivative links (investor images in e-mail, which no session reaches) are signed by
 * server/core/signed-token.ts under the `mediaLink` purpose: its own key, so no subscriber, web-copy
 * or other link signed with TOKEN_SECRET can be presented as a media signature, nor the other way round.
 */
/** A recipient's own cache may keep a signed image at most this long (and never past the link's expiry). */
export const SIGNED_LINK_MAX_CACHE_SECONDS = 24 * 60 * 60;
/** A signed link as it appears in text or HTML (`&` escaped or not); groups: name, exp, separator, sig. */
const SIGNED_LINK_IN_TEXT = /\/media\/s\/([0-9a-f]{16}-\d{1,5}w\.(?:avif|webp|jpg))\?exp=(\d{1,12})(&amp;|&)sig=([A-Za-z0-9_-]{43})/g;

function originalKey(sha256: string, mime: string): string {
  return `originals/${sha256.slice(0, 2)}/${sha256}.${ORIGINAL_EXTENSIONS[mime] ?? "bin"}`;
}

const isLeadOrAdmin = (actor: Actor) => actor.user?.role === "lead" || actor.user?.role === "admin";

/** Runs `work` over `items` with at most `limit` at a time; results keep the order. */
async function runLimited<T, R>(items: readonly T[], limit: number, work: (item: T, index: number) => Promise<R>): Promise<R[]> {
  const results = new Array<R>(items.length);
  let next = 0;
  const lane = async () => {
    while (next < items.length) {
      const i = next;
      next += 1;
      results[i] = await work(items[i] as T, i);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, items.length)) }, lane));
  return results;
}

function toItem(r: MediaRecord, tags: MediaTags | undefined, variants: VariantRecord[] | undefined): MediaItem {
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
    reviewedBy: r.reviewedByName,
    placeholder: r.placeholder,
    dominantColor: r.dominantColor,
    isIllustration: r.isIllustration,
    tags: tags ?? { areas: [], systems: [], milestones: [] },
    variants: (variants ?? []).map((v) => ({ url: variantUrl(v.storageKey), width: v.width, height: v.height, format: v.format, bytes: v.bytes })),
    originalUrl: `/api/media/${r.id}/original`,
    uploadedBy: r.uploadedByName,
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  };
}

function refusal(refused: RefusedFile[], total: number): AppError {
  const first = refused[0]!;
  const sameCode = refused.every((r) => r.code === first.code);
  const message =
    total === 1
      ? `${first.name}: ${first.message}`
      : `${refused.length} of ${total} files were refused, so none of the ${total} was kept. ${refused.map((r) => `${r.name}: ${r.message}`).join(" ")}`;
  return new AppError(
    sameCode ? first.code : "files_refused",
    message,
    first.status,
    Object.fromEntries(refused.map((r) => [`files.${r.index}`, `${r.name}: ${r.message}`])),
    { files: refused },
  );
}

/** Tags of a patch as (kind, values) pairs, milestone ids as text. */
function tagEntries(t: MediaTagsPatch | undefined): Array<[TagKind, string[]]> {
  if (!t) return [];
  const out: Array<[TagKind, string[]]> = [];
  if (t.areas) out.push(["area", [...new Set(t.areas)]]);
  if (t.systems) out.push(["system", [...new Set(t.systems)]]);
  if (t.milestones) out.push(["milestone", [...new Set(t.milestones)].map(String)]);
  return out;
}

export interface ReadableFile {
  stream: Readable;
  bytes: number;
  contentType: string;
  /** Cleared and used in published public content: shared caches may keep it. */
  isPublic: boolean;
  etag: string;
}

/** What the derivative worker commits for one photo. */
export interface DerivativeResult {
  width: number;
  height: number;
  placeholder: string;
  dominantColor: string;
  variants: Array<{ width: number; height: number; format: VariantFormat; storageKey: string; bytes: number }>;
}

export function createMediaService(deps: {
  db: Db;
  storage: MediaStorage;
  uploads: UploadArea;
  projects: ProjectsService;
  limits: MediaLimits;
  /** config TOKEN_SECRET; without it no signed link is made or accepted (the seed needs none). */
  tokenSecret?: string;
}) {
  const { db, storage, uploads, projects, limits } = deps;
  const signer = deps.tokenSecret ? createTokenSigner(deps.tokenSecret) : null;

  /** Whether `sig` is this service's signature of (name, exp), whatever the time. */
  function isSignedBy(name: string, exp: number, sig: string | undefined): boolean {
    return signer !== null && signer.verifyParts("mediaLink", [name], exp, sig, new Date(0)).ok;
  }

  function signatureOf(name: string, exp: number): string {
    if (!signer) throw new Error("signed media links need TOKEN_SECRET");
    return signer.signParts("mediaLink", [name], exp);
  }

  function signedPath(name: string, exp: number): string {
    return `/media/s/${name}?exp=${exp}&sig=${signatureOf(name, exp)}`;
  }
  const queuedListeners = new Set<() => void>();

  async function resolveProject(slug: string | undefined): Promise<Project> {
    if (slug) return projects.get(slug);
    // The same default as the site office's project picker: the first project by name.
    const first = (await projects.list())[0];
    if (!first) throw new AppError("no_project", "There is no project yet to hold photos.", 422);
    return first;
  }

  async function itemsOf(records: MediaRecord[]): Promise<MediaItem[]> {
    const ids = records.map((r) => r.id);
    const [tags, variants] = await Promise.all([tagsOf(db, ids), variantsOf(db, ids)]);
    return records.map((r) => toItem(r, tags.get(r.id), variants.get(r.id)));
  }

  async function getItem(id: number, q: Db | Knex.Transaction = db): Promise<MediaItem> {
    const r = await findMediaById(q, id);
    if (!r) throw notFound("That photo");
    const [tags, variants] = await Promise.all([tagsOf(q, [id]), variantsOf(q, [id])]);
    return toItem(r, tags.get(id), variants.get(id));
  }

  async function checkMilestones(q: Knex.Transaction, projectId: number, ids: readonly number[], field: string): Promise<void> {
    if (ids.length === 0) return;
    const found = await existingMilestoneIds(q, projectId, ids);
    const missing = ids.filter((id) => !found.has(id));
    if (missing.length > 0) {
      throw new AppError("unknown_milestone", `No milestone ${missing.join(", ")} in this photo's project.`, 422, { [field]: `milestone ${missing.join(", ")} is not in the project` });
    }
  }

  /**
   * Tagging a photo with the security system sends it (back) to the review queue: a cleared
   * photo of a door, a camera or a reader is unreviewed again until a lead looks at it.
   */
  function securityReview(before: MediaRecord, beforeSystems: readonly string[], afterSystems: readonly string[]): MediaUpdate {
    const added = afterSystems.includes(SECURITY_SYSTEM) && !beforeSystems.includes(SECURITY_SYSTEM);
    if (!added) return {};
    return { flaggedForReview: true, ...(before.sensitivity === "cleared" ? { sensitivity: "unreviewed" as Sensitivity } : {}) };
  }

  const allStaged = (staged: StagedKeys): string[] => [...new Set(Object.values(staged).flat())];

  /** A key is in use while a derivative or an original row refers to it, or an attempt has recorded it. */
  async function keyInUse(q: Db | Knex.Transaction, key: string, except?: ClaimedJob): Promise<boolean> {
    if ((await countVariantsWithKey(q, key)) + (await countItemsWithOriginal(q, key)) > 0) return true;
    return isKeyStaged(q, key, except ? { jobId: except.jobId, leaseToken: except.leaseToken } : undefined);
  }

  async function discardUnreferenced(keys: readonly string[]): Promise<number> {
    let n = 0;
    for (const key of new Set(keys)) {
      if (await keyInUse(db, key)) continue;
      await storage.delete(key);
      n += 1;
    }
    return n;
  }

  /**
   * The original's bytes with GPS, maker notes, XMP and IPTC removed and its image data untouched
   * (media.metadata.ts), checked again with the probe's own reader; a file whose location cannot be
   * removed is refused (422) rather than kept with it.
   */
  async function withoutLocation(data: Buffer, image: ProbedImage, name: string, index: number, total: number): Promise<Buffer> {
    let message: string | null = null;
    let bytes = data;
    if (image.mime === "image/heic" || image.mime === "image/heif") {
      // No lossless rewrite for HEIF here: one without a location is kept as sent, one with it refused.
      if (image.hasGps) message = "This HEIC/HEIF photo carries its location, which this server cannot remove from the format; export it as JPEG and upload again.";
    } else {
      try {
        bytes = stripLocation(data, image.mime);
        if (await hasLocation(bytes)) message = "Its location could not be removed from the file.";
      } catch (err) {
        if (!(err instanceof LocationNotRemovable)) throw err;
        message = `Its location could not be removed from the file (${err.message}).`;
      }
    }
    if (message) throw refusal([{ index, name, code: "location_not_removable", status: 422, message }], total);
    return bytes;
  }

  const service = {
    limits,

    /** Ids of the photos tagged with a milestone (the programme keeps such a milestone on record). */
    taggedWithMilestone: (milestoneId: number) => mediaTaggedWithMilestone(db, milestoneId),

    /** Called whenever a job is queued in this process, so a local worker starts at once. */
    onQueued(listener: () => void): () => void {
      queuedListeners.add(listener);
      return () => queuedListeners.delete(listener);
    },

    /**
     * Takes the files of one upload request. Every file is checked first (real type from
     * the bytes, size, declared pixels, a full decode); if any is refused the whole request
     * is refused, naming each bad file, and nothing is kept. Identical bytes already in the
     * project are offered instead of a copy (`duplicateOf`). The rest are stored under
     * content-hashed keys, then their rows and processing jobs are committed together; the
     * answer comes at once with status `processing`. Temporary files are always removed.
     */
    async upload(
      input: { project?: string; files: ReceivedFile[]; isIllustration?: boolean },
      actor: Actor,
    ): Promise<MediaUploadResult[]> {
      const files = input.files;
      try {
        if (files.length === 0) {
          throw new AppError("no_files", "Choose at least one photo: send them as multipart/form-data in the field `files`.", 400, { files: "is required" });
        }
        if (files.length > limits.maxFiles) {
          throw new AppError("too_many_files", `At most ${limits.maxFiles} files can be uploaded at once; ${files.length} were sent.`, 413, { files: `at most ${limits.maxFiles}` });
        }
        const project = await resolveProject(input.project);
        const probes = await runLimited(files, 2, (f) => probeImage(f.path, { maxPixels: limits.maxPixels, maxBytes: limits.maxFileBytes }));
        const refused: RefusedFile[] = [];
        probes.forEach((p, index) => {
          if (!p.ok) refused.push({ index, name: files[index]!.originalName, code: p.code, status: p.status, message: p.message });
        });
        if (refused.length > 0) throw refusal(refused, files.length);
        const images = probes as ProbedImage[];

        const results: Array<MediaUploadResult | null> = files.map(() => null);
        const firstOfSha = new Map<string, number>();
        const fresh: number[] = [];
        for (const [i, image] of images.entries()) {
          const existing = await findMediaBySha(db, project.id, image.sha256);
          if (existing) {
            results[i] = { id: existing.id, status: existing.status, name: files[i]!.originalName, width: existing.width, height: existing.height, takenAt: existing.takenAt, duplicateOf: existing.id };
          } else if (!firstOfSha.has(image.sha256)) {
            firstOfSha.set(image.sha256, i);
            fresh.push(i);
          }
        }

        const stored: string[] = [];
        const storedBytes = new Map<number, number>();
        try {
          for (const i of fresh) {
            const key = originalKey(images[i]!.sha256, images[i]!.mime);
            // The original is kept without its location (the contract: coordinates are never kept).
            const bytes = await withoutLocation(await uploads.read(files[i]!), images[i]!, files[i]!.originalName, i, files.length);
            await storage.put(key, bytes);
            storedBytes.set(i, bytes.length);
            stored.push(key);
          }
          await db.transaction(async (trx) => {
            for (const i of fresh) {
              const image = images[i]!;
              let id = await insertMedia(trx, {
                projectId: project.id,
                sha256: image.sha256,
                originalKey: originalKey(image.sha256, image.mime),
                originalName: files[i]!.originalName,
                mime: image.mime,
                bytes: storedBytes.get(i) ?? files[i]!.size,
                width: image.width,
                height: image.height,
                takenAt: image.takenAt,
                hadGps: image.hasGps,
                uploadedBy: actor.user?.id ?? null,
                isIllustration: input.isIllustration ?? false,
              });
              let status: MediaStatus = "processing";
              let duplicateOf: number | null = null;
              if (id === null) {
                // Another request stored the same photo a moment ago: offer that one.
                const other = await findMediaBySha(trx, project.id, image.sha256);
                if (!other) throw new AppError("conflict", "The same photo is being uploaded in another request; try again.", 409);
                id = other.id;
                status = other.status;
                duplicateOf = other.id;
              } else {
                await insertJob(trx, id);
              }
              results[i] = { id, status, name: files[i]!.originalName, width: image.width, height: image.height, takenAt: image.takenAt, duplicateOf };
            }
          });
        } catch (err) {
          // Nothing half-made: an original no row refers to goes again.
          for (const key of stored) {
            if ((await countItemsWithOriginal(db, key)) === 0) await storage.delete(key);
          }
          throw err;
        }
        // A second copy in the same request is a duplicate of the first.
        images.forEach((image, i) => {
          if (results[i]) return;
          const first = results[firstOfSha.get(image.sha256)!]!;
          results[i] = { ...first, name: files[i]!.originalName, duplicateOf: first.id };
        });
        if (fresh.length > 0) for (const listener of queuedListeners) listener();
        return results as MediaUploadResult[];
      } finally {
        await uploads.discard(files);
      }
    },

    get: (id: number) => getItem(id),

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

    async list(query: MediaListQuery): Promise<MediaListResponse> {
      const { page, pageSize, project: slug, ...filters } = query;
      const project = await resolveProject(slug);
      const { items, total } = await listMedia(db, project.id, filters, { offset: (page - 1) * pageSize, limit: pageSize });
      return { items: await itemsOf(items), total, page, pageSize };
    },

    /** Unreviewed photos waiting for a lead, security-flagged first. */
    async reviewQueue(slug: string | undefined): Promise<MediaItem[]> {
      const project = await resolveProject(slug);
      return itemsOf(await listReviewQueue(db, project.id, 200));
    },

    async vocabulary(slug: string | undefined): Promise<MediaVocabulary> {
      const project = await resolveProject(slug);
      const [areas, milestones] = await Promise.all([knownAreas(db, project.id), milestonesOfProject(db, project.id)]);
      return {
        project: { id: project.id, slug: project.slug, name: project.name },
        areas,
        systems: [...SystemSchema.options],
        milestones,
        limits: { maxFileMb: Number((limits.maxFileBytes / (1024 * 1024)).toFixed(2)), maxFiles: limits.maxFiles, maxPixels: limits.maxPixels },
      };
    },

    /** Caption, credit, alt text, focal point, tags; sensitivity for leads and admins only. */
    async update(id: number, patch: MediaPatchInput, actor: Actor): Promise<MediaItem> {
      if (patch.sensitivity !== undefined && !isLeadOrAdmin(actor)) {
        throw new AppError("forbidden", "Only a project lead or an administrator may change a photo's sensitivity.", 403, { sensitivity: "is for project leads and administrators" });
      }
      return db.transaction(async (trx) => {
        const before = await findMediaById(trx, id, true);
        if (!before) throw notFound("That photo");
        const beforeTags = (await tagsOf(trx, [id])).get(id)!;
        if (patch.tags?.milestones) await checkMilestones(trx, before.projectId, patch.tags.milestones, "tags.milestones");
        for (const [kind, values] of tagEntries(patch.tags)) await replaceTags(trx, id, kind, values);
        const u: MediaUpdate = {};
        if (patch.altText !== undefined) u.altText = patch.altText;
        if (patch.caption !== undefined) u.caption = patch.caption;
        if (patch.credit !== undefined) u.credit = patch.credit;
        if (patch.focal) {
          u.focalX = patch.focal.x;
          u.focalY = patch.focal.y;
        }
        if (patch.sensitivity !== undefined) {
          Object.assign(u, { sensitivity: patch.sensitivity, flaggedForReview: false, reviewedBy: actor.user?.id ?? null, reviewedAt: new Date() });
        } else if (patch.tags?.systems) {
          Object.assign(u, securityReview(before, beforeTags.systems, patch.tags.systems));
        }
        await updateMedia(trx, id, u);
        return getItem(id, trx);
      });
    },

    /** Adds and removes tags on several photos in one transaction. */
    async bulkTag(input: BulkTagInput): Promise<{ updated: number; items: MediaItem[] }> {
      const ids = [...new Set(input.ids)];
      const items = await db.transaction(async (trx) => {
        const records = await findMediaByIds(trx, ids);
        const found = new Set(records.map((r) => r.id));
        const missing = ids.filter((id) => !found.has(id));
        if (missing.length > 0) throw new AppError("not_found", `No photo ${missing.join(", ")}.`, 404, { ids: `photo ${missing.join(", ")} was not found` });
        const addMilestones = input.add?.milestones ?? [];
        for (const projectId of new Set(records.map((r) => r.projectId))) await checkMilestones(trx, projectId, addMilestones, "add.milestones");
        const before = await tagsOf(trx, ids);
        for (const [kind, values] of tagEntries(input.remove)) await removeTags(trx, ids, kind, values);
        for (const [kind, values] of tagEntries(input.add)) await addTags(trx, ids, kind, values);
        const after = await tagsOf(trx, ids);
        for (const r of records) {
          const u = securityReview(r, before.get(r.id)!.systems, after.get(r.id)!.systems);
          await updateMedia(trx, r.id, u);
        }
        return findMediaByIds(trx, ids);
      });
      return { updated: ids.length, items: await itemsOf(items) };
    },

    /** A lead's decision: cleared for publishing, or restricted (never in public or investor content). */
    async review(id: number, input: ReviewInput, actor: Actor): Promise<MediaItem> {
      return db.transaction(async (trx) => {
        const item = await findMediaById(trx, id, true);
        if (!item) throw notFound("That photo");
        await updateMedia(trx, id, { sensitivity: input.sensitivity, flaggedForReview: false, reviewedBy: actor.user?.id ?? null, reviewedAt: new Date() });
        return getItem(id, trx);
      });
    },

    /** Puts a failed photo back in the processing queue. */
    async retry(id: number): Promise<MediaItem> {
      const item = await findMediaById(db, id);
      if (!item) throw notFound("That photo");
      if (item.status !== "failed") throw new AppError("not_failed", "Only a photo whose processing failed can be tried again.", 409);
      await db.transaction((trx) => requeueMedia(trx, id));
      for (const listener of queuedListeners) listener();
      return getItem(id);
    },

    /** The original as uploaded (staff only: it may carry GPS and other metadata). */
    async original(id: number): Promise<{ stream: Readable; bytes: number; mime: string; name: string }> {
      const item = await findMediaById(db, id);
      if (!item) throw notFound("That photo");
      const file = await storage.stream(item.originalKey);
      if (!file) throw new AppError("original_missing", "The original file of this photo is missing from storage.", 404);
      return { ...file, mime: item.mime, name: item.originalName };
    },

    /**
     * A derivative by its file name, for the reader's audience; null for a name that is not
     * a derivative, a photo this reader may not see, or bytes missing from storage.
     */
    async readVariant(name: string, reader: FileReader): Promise<ReadableFile | null> {
      if (!VARIANT_NAME.test(name)) return null;
      const key = `variants/${name}`;
      const found = await findReadableVariant(db, key, reader);
      if (!found) return null;
      const file = await storage.stream(key);
      if (!file) return null;
      return { stream: file.stream, bytes: file.bytes, contentType: CONTENT_TYPES[found.format], isPublic: found.isPublic, etag: `"${name.slice(0, 16)}"` };
    },

    /**
     * A derivative for the holder of a signed link: the signature grants the investor audience
     * (cleared, used in published public or investor content), never staff's. Null for a forged,
     * altered or missing signature, a name that is not a derivative, or a photo investors may not
     * see; an authentic link past its expiry is refused with 410.
     */
    async readSignedVariant(name: string, link: SignedVariantQuery, now: Date = new Date()): Promise<(ReadableFile & { maxAgeSeconds: number }) | null> {
      if (!VARIANT_NAME.test(name) || !signer) return null;
      const checked = signer.verifyParts("mediaLink", [name], link.exp, link.sig, now);
      // A forged link stays 404 whatever its expiry: the same answer as a hidden image.
      if (!checked.ok && checked.reason !== "expired") return null;
      if (!checked.ok) throw new AppError("link_expired", "This image link has expired. Open the digest's web copy for a fresh one.", 410);
      const file = await this.readVariant(name, "investor");
      const left = Math.floor(link.exp - now.getTime() / 1000);
      return file ? { ...file, maxAgeSeconds: Math.min(left, SIGNED_LINK_MAX_CACHE_SECONDS) } : null;
    },

    // The contract other modules code against (posts, stories, the public site, e-mail).

    /**
     * The signed, expiring same-origin URL of a derivative (`/media/s/<name>?exp=…&sig=…`), from its
     * name or its `/media/v/` URL. Not personal: anyone holding it sees that one image until it expires.
     */
    signedVariantUrl(variant: string, expiresAt: Date): string {
      const name = variant.replace(/^\/media\/v\//, "");
      if (!VARIANT_NAME.test(name)) throw new Error(`not a derivative: ${variant}`);
      return signedPath(name, Math.ceil(expiresAt.getTime() / 1000));
    },

    /**
     * Every authentic signed derivative link in `text` (HTML or plain), signed again to expire at
     * `expiresAt`; anything else is left as it is. For copies kept longer than their links (the web copy).
     */
    refreshSignedUrls(text: string, expiresAt: Date): string {
      if (!signer) return text;
      const exp = Math.ceil(expiresAt.getTime() / 1000);
      return text.replace(SIGNED_LINK_IN_TEXT, (whole, name: string, oldExp: string, sep: string, sig: string) => {
        if (!isSignedBy(name, Number(oldExp), sig)) return whole;
        return `/media/s/${name}?exp=${exp}${sep}sig=${signatureOf(name, exp)}`;
      });
    },

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

    /** What rendering a `<picture>` needs, for each existing photo asked for. */
    /**
     * The project's gallery for a reader of the given audiences: cleared photos used in published
     * content they may see, newest capture first, filtered by area, system and month.
     */
    async gallery(slug: string, audiences: Audience[], f: GalleryQuery): Promise<Gallery> {
      const project = await projects.get(slug);
      const rows = await listGalleryMedia(db, project.id, audiences);
      const ids = rows.map((r) => r.id);
      const [tags, pictures] = await Promise.all([tagsOf(db, ids), this.pictureFor(ids)]);
      const all: GalleryPhoto[] = [];
      for (const r of rows) {
        const picture = pictures.get(r.id);
        if (!picture) continue;
        const t = tags.get(r.id);
        const month = r.takenAt && /^\d{4}-\d{2}/.test(r.takenAt) ? r.takenAt.slice(0, 7) : r.createdAt.toISOString().slice(0, 7);
        all.push({ ...picture, areas: t?.areas ?? [], systems: t?.systems ?? [], month });
      }
      const uniq = <T extends string>(xs: T[]) => [...new Set(xs)].sort();
      return {
        items: all.filter((p) => (!f.area || p.areas.includes(f.area)) && (!f.system || p.systems.includes(f.system)) && (!f.month || p.month === f.month)),
        areas: uniq(all.flatMap((p) => p.areas)),
        systems: uniq(all.flatMap((p) => p.systems)),
        months: uniq(all.flatMap((p) => (p.month ? [p.month] : []))).reverse(),
      };
    },

    async pictureFor(ids: number[]): Promise<Map<number, MediaPicture>> {
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
    },

    countOfProject: (projectId: number) => countMediaOfProject(db, projectId),

    /** The processing queue, for the worker in media.jobs.ts. */
    queue: {
      /**
       * Claims the next due job under a new lease. A job already tried MAX_JOB_ATTEMPTS
       * times (crashes included) is not tried again: its photo is marked failed.
       */
      async claim(leaseMs: number): Promise<ClaimedJob | null> {
        for (;;) {
          const token = randomBytes(16).toString("hex");
          const outcome = await db.transaction(async (trx) => {
            const job = await claimJob(trx, token, leaseMs);
            if (!job) return { job: null, leftover: null };
            if (job.attempts > MAX_JOB_ATTEMPTS) {
              const row = await lockJob(trx, job.jobId);
              await markMediaFailed(trx, job.mediaId, `Processing stopped after ${MAX_JOB_ATTEMPTS} attempts.`);
              await deleteJob(trx, job.jobId);
              return { job: null, leftover: allStaged(row?.staged ?? {}) };
            }
            return { job, leftover: null };
          });
          if (!outcome.leftover) return outcome.job;
          await discardUnreferenced(outcome.leftover);
        }
      },

      /**
       * Records the keys this attempt is about to write (before writing any), and returns the
       * keys earlier attempts recorded; null when the lease was lost to another worker.
       */
      async stage(job: ClaimedJob, keys: readonly string[]): Promise<string[] | null> {
        return db.transaction(async (trx) => {
          const held = await lockHeldJob(trx, job.jobId, job.leaseToken);
          if (!held) return null;
          const { [job.leaseToken]: _mine, ...earlier } = held.staged;
          await setStagedKeys(trx, job.jobId, { ...held.staged, [job.leaseToken]: [...new Set(keys)] });
          return allStaged(earlier);
        });
      },

      /** Commits the derivatives' rows and the photo's readiness in one transaction; false when the lease was lost. */
      async complete(job: ClaimedJob, result: DerivativeResult): Promise<boolean> {
        return db.transaction(async (trx) => {
          if (!(await lockHeldJob(trx, job.jobId, job.leaseToken))) return false;
          await insertVariants(trx, job.mediaId, result.variants);
          await markMediaReady(trx, job.mediaId, result);
          await deleteJob(trx, job.jobId);
          return true;
        });
      },

      /**
       * A failed attempt: tried again later; or (permanent, or out of attempts) the photo is
       * marked failed and every file its attempts wrote goes.
       */
      async fail(job: ClaimedJob, reason: string, permanent: boolean): Promise<void> {
        const leftover = await db.transaction(async (trx) => {
          const held = await lockHeldJob(trx, job.jobId, job.leaseToken);
          if (!held) return [];
          if (permanent || held.attempts >= MAX_JOB_ATTEMPTS) {
            await markMediaFailed(trx, job.mediaId, reason);
            await deleteJob(trx, job.jobId);
            return allStaged(held.staged);
          }
          await requeueJob(trx, job.jobId, reason, held.attempts * 5_000);
          return [];
        });
        await discardUnreferenced(leftover);
      },

      /**
       * After this attempt lost its lease: its files go, unless a row or another attempt uses
       * them. The job row stays locked meanwhile, so the new holder cannot record the same key
       * between the check and the delete.
       */
      async abandon(job: ClaimedJob, keys: readonly string[]): Promise<void> {
        await db.transaction(async (trx) => {
          const row = await lockJob(trx, job.jobId);
          for (const key of new Set(keys)) {
            if (!(await keyInUse(trx, key, job))) await storage.delete(key);
          }
          if (row && row.staged[job.leaseToken]) {
            const { [job.leaseToken]: _mine, ...rest } = row.staged;
            await setStagedKeys(trx, job.jobId, rest);
          }
        });
      },

      /** Deletes those of `keys` that no row and no attempt in progress refers to; how many went. */
      discardUnreferenced: (keys: readonly string[]) => discardUnreferenced(keys),

      requeueExpired: () => requeueExpiredLeases(db),
    },
  };
  return service;
}
export type MediaService = ReturnType<typeof createMediaService>;
