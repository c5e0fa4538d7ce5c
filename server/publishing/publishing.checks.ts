import type { Knex } from "knex";
import type { Viewer } from "#shared/domain/audience.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";
import { AppError } from "../core/app-error.ts";

/**
 * The publishing checks every kind of content shares: every photo exists in the project's
 * library, is processed, has alt text, and — in public or investor content — is cleared (a
 * restricted photo never appears there). A kind adds its own (an update's cover and linked
 * milestones, a story's items and then-and-now pairs).
 */

/** What posts and stories need of the media module (its service, server/media/media.service.ts). */
export interface MediaForContent {
  describeForPublishing(ids: number[]): Promise<
    Array<{ id: number; exists: boolean; status: string | null; altText: string | null; sensitivity: "unreviewed" | "cleared" | "restricted" | null; projectId: number | null }>
  >;
  setUsages(ownerType: "post" | "story", ownerId: number, mediaIds: number[], audience: Audience, published: boolean, trx?: Knex.Transaction): Promise<void>;
  pictureFor(ids: number[]): Promise<Map<number, MediaPicture>>;
  /** The pictures among `ids` a reader's browser can load now (staff: all; others: processed and cleared). */
  loadableBy(viewer: Viewer, ids: readonly number[]): Promise<Map<number, MediaPicture>>;
}

/** One place a photo is used: "the cover", "image 2 in the text", "item 3 (after photo)". */
export interface PhotoUse {
  mediaId: number;
  where: string;
  /** An alt text given where the photo is used, which stands in for the library's. */
  altOverride?: string | null;
}

/** Names a photo for people: where it is used, its number in the library and its caption. */
function nameOf(use: PhotoUse, caption: string | null | undefined): string {
  const label = caption?.trim() ? `, “${caption.trim().slice(0, 60)}”` : "";
  return `${use.where} (photo #${use.mediaId}${label})`;
}

/** The problems of the photos a piece of content uses, for an audience. */
export async function photoProblems(media: MediaForContent, projectId: number, uses: readonly PhotoUse[], audience: Audience): Promise<PublishingProblem[]> {
  if (uses.length === 0) return [];
  const ids = [...new Set(uses.map((u) => u.mediaId))];
  const [described, pictures] = await Promise.all([media.describeForPublishing(ids), media.pictureFor(ids)]);
  const byId = new Map(described.map((d) => [d.id, d]));
  const problems: PublishingProblem[] = [];
  const reported = new Set<string>();
  const add = (p: PublishingProblem) => {
    const key = `${p.code}:${p.mediaId}:${p.message}`;
    if (!reported.has(key)) {
      reported.add(key);
      problems.push(p);
    }
  };
  for (const use of uses) {
    const d = byId.get(use.mediaId);
    const name = nameOf(use, pictures.get(use.mediaId)?.caption);
    if (!d || !d.exists || d.projectId !== projectId) {
      add({ code: "media_missing", mediaId: use.mediaId, message: `${name} is not in this project's media library.` });
      continue;
    }
    if (d.status !== "ready") {
      add({ code: "media_not_ready", mediaId: use.mediaId, message: `${name} is ${d.status === "failed" ? "a photo that could not be processed" : "still being processed"}.` });
    }
    const alt = use.altOverride?.trim() || d.altText?.trim();
    if (!alt) add({ code: "missing_alt_text", mediaId: use.mediaId, message: `${name} has no alt text: describe it in the media library or on the image.` });
    if (audience !== "internal") {
      if (d.sensitivity === "restricted") {
        add({ code: "restricted", mediaId: use.mediaId, message: `${name} is restricted and can never appear in ${audience} content.` });
      } else if (d.sensitivity !== "cleared") {
        add({ code: "not_cleared", mediaId: use.mediaId, message: `${name} has not been cleared by a lead for ${audience} content.` });
      }
    }
  }
  return problems;
}

/** The 422 that refuses a publication, naming every problem. */
export function publishingBlocked(problems: readonly PublishingProblem[]): AppError {
  const list = problems.map((p) => p.message).join(" ");
  return new AppError("publishing_blocked", `It cannot be published yet. ${list}`, 422, undefined, { problems });
}
