import { facilityTagProblem, type FacilityTagKind } from "#shared/domain/facility-tags.ts";
import type { Audience } from "#shared/schemas/common.ts";
import {
  SECURITY_SYSTEM,
  type BulkTagInput,
  type MediaItem,
  type MediaListQuery,
  type MediaListResponse,
  type MediaPatchInput,
  type MediaTags,
  type MediaTagsPatch,
  type MediaVocabulary,
  type ReviewInput,
  type Sensitivity,
  type TagKind,
} from "#shared/schemas/media.ts";
import { SystemSchema } from "#shared/schemas/programme.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import { resolveProject, type MediaContext } from "./media.context.ts";
import type { ItemReader } from "./media.items.ts";
import {
  addTags,
  findMediaById,
  findMediaByIds,
  taggedAreas,
  listMedia,
  listReviewQueue,
  removeTags,
  replaceTags,
  tagsOf,
  updateMedia,
  type MediaRecord,
  type MediaUpdate,
} from "./media.repository.ts";

const isLeadOrAdmin = (actor: Actor) => actor.user?.role === "lead" || actor.user?.role === "admin";

/** Tags of a patch as (kind, values) pairs, milestone ids as text. */
function tagEntries(t: MediaTagsPatch | undefined): Array<[TagKind, string[]]> {
  if (!t) return [];
  const out: Array<[TagKind, string[]]> = [];
  if (t.areas) out.push(["area", [...new Set(t.areas)]]);
  if (t.systems) out.push(["system", [...new Set(t.systems)]]);
  if (t.milestones) out.push(["milestone", [...new Set(t.milestones)].map(String)]);
  if (t.blocks) out.push(["block", [...new Set(t.blocks)].map(String)]);
  if (t.plants) out.push(["plant", [...new Set(t.plants)].map(String)]);
  return out;
}

/**
 * The widest audience a photo may reach: a restricted one stays with staff; any other may be
 * cleared and published, so it may not name an internal block or system. Investor-only ones are
 * allowed, as every reader sees only the blocks and systems of their own audience.
 */
const reachOf = (sensitivity: Sensitivity): Audience => (sensitivity === "restricted" ? "internal" : "investor");

type FacilityTags = Pick<MediaTags, "blocks" | "plants">;

const FACILITY_KINDS: Array<[FacilityTagKind, "blocks" | "plants"]> = [
  ["block", "blocks"],
  ["plant", "plants"],
];

/**
 * Tagging a photo with the security system sends it (back) to the review queue: a cleared
 * photo of a door, a camera or a reader is unreviewed again until a lead looks at it.
 */
function securityReview(before: MediaRecord, beforeSystems: readonly string[], afterSystems: readonly string[]): MediaUpdate {
  const added = afterSystems.includes(SECURITY_SYSTEM) && !beforeSystems.includes(SECURITY_SYSTEM);
  if (!added) return {};
  return { flaggedForReview: true, ...(before.sensitivity === "cleared" ? { sensitivity: "unreviewed" as Sensitivity } : {}) };
}

/** The site office's library: find photos, describe and tag them, and a lead's review. */
export function createMediaLibrary(ctx: MediaContext, items: ItemReader) {
  const { db, projects, programme, facility, limits } = ctx;
  const { itemsOf, getItem } = items;

  /**
   * Refuses block and plant tags that are not of the photo's project, or that a photo of this
   * sensitivity may not carry (422, naming the field). A tag the photo already had whose block
   * or system has since been deleted is let be: it names nothing any more.
   */
  async function checkFacilityTags(projectId: number, tags: FacilityTags, sensitivity: Sensitivity, prefix: string, had: FacilityTags): Promise<void> {
    if (tags.blocks.length === 0 && tags.plants.length === 0) return;
    const subjects = await facility.tagSubjects(projectId);
    const fields: Record<string, string> = {};
    for (const [kind, key] of FACILITY_KINDS) {
      const exists = (id: number) => subjects.some((s) => s.kind === kind && s.id === id);
      const ids = tags[key].filter((id) => exists(id) || !had[key].includes(id));
      const problem = facilityTagProblem(kind, ids, subjects, reachOf(sensitivity));
      if (problem) fields[`${prefix}.${key}`] = sensitivity === "restricted" ? problem : `${problem}: only a restricted photo may carry it`;
    }
    if (Object.keys(fields).length > 0) throw new AppError("invalid_tags", `Check ${Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join("; ")}.`, 422, fields);
  }

  async function checkMilestones(projectId: number, ids: readonly number[], field: string): Promise<void> {
    if (ids.length === 0) return;
    const found = await programme.milestoneIdsOf(projectId, ids);
    const missing = ids.filter((id) => !found.has(id));
    if (missing.length > 0) {
      throw new AppError("unknown_milestone", `No milestone ${missing.join(", ")} in this photo's project.`, 422, { [field]: `milestone ${missing.join(", ")} is not in the project` });
    }
  }

  return {
    get: (id: number) => getItem(id),

    async list(query: MediaListQuery): Promise<MediaListResponse> {
      const { page, pageSize, project: slug, ...filters } = query;
      const project = await resolveProject(projects, slug);
      const { items, total } = await listMedia(db, project.id, filters, { offset: (page - 1) * pageSize, limit: pageSize });
      return { items: await itemsOf(items), total, page, pageSize };
    },

    /** Unreviewed photos waiting for a lead, security-flagged first. */
    async reviewQueue(slug: string | undefined): Promise<MediaItem[]> {
      const project = await resolveProject(projects, slug);
      return itemsOf(await listReviewQueue(db, project.id, 200));
    },

    async vocabulary(slug: string | undefined): Promise<MediaVocabulary> {
      const project = await resolveProject(projects, slug);
      const [tagged, named, milestones] = await Promise.all([taggedAreas(db, project.id), programme.allAreas(project.id), programme.milestoneNames(project.id)]);
      // Areas already used on the project's photos or named by its milestones, alphabetically.
      const areas = [...new Set([...tagged, ...named])].sort((a, b) => a.localeCompare(b));
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
        if (patch.tags?.milestones) await checkMilestones(before.projectId, patch.tags.milestones, "tags.milestones");
        // Block and plant tags as they will stand, against the sensitivity the photo will have.
        if (patch.tags?.blocks || patch.tags?.plants || patch.sensitivity) {
          const after = { blocks: patch.tags?.blocks ?? beforeTags.blocks, plants: patch.tags?.plants ?? beforeTags.plants };
          await checkFacilityTags(before.projectId, after, patch.sensitivity ?? before.sensitivity, "tags", beforeTags);
        }
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
        for (const projectId of new Set(records.map((r) => r.projectId))) await checkMilestones(projectId, addMilestones, "add.milestones");
        const before = await tagsOf(trx, ids);
        for (const [kind, values] of tagEntries(input.remove)) await removeTags(trx, ids, kind, values);
        for (const [kind, values] of tagEntries(input.add)) await addTags(trx, ids, kind, values);
        const after = await tagsOf(trx, ids);
        if (input.add?.blocks?.length || input.add?.plants?.length) {
          for (const r of records) await checkFacilityTags(r.projectId, after.get(r.id)!, r.sensitivity, "add", before.get(r.id)!);
        }
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
        if (input.sensitivity === "cleared") {
          const tags = (await tagsOf(trx, [id])).get(id)!;
          await checkFacilityTags(item.projectId, tags, "cleared", "tags", tags);
        }
        await updateMedia(trx, id, { sensitivity: input.sensitivity, flaggedForReview: false, reviewedBy: actor.user?.id ?? null, reviewedAt: new Date() });
        return getItem(id, trx);
      });
    },
  };
}
