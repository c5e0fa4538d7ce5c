import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Hero, HeroInput, Home, HomeBuild } from "#shared/schemas/project-hero.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { findHeroChoice, findHeroChoices, updateHeroChoice, type HeroChoice } from "./projects.repository.ts";
import type { ProjectsService } from "./projects.service.ts";

/** What the hero and the home page read of other modules (built after this one: asked only at request time). */
export interface HeroDeps {
  db: Db;
  projects: ProjectsService;
  audit: AuditService;
  media: {
    describeForPublishing(ids: number[]): Promise<Array<{ id: number; exists: boolean; status: string | null; altText: string | null; sensitivity: string | null; projectId: number | null; flaggedForReview: boolean }>>;
    pictureFor(ids: number[]): Promise<Map<number, MediaPicture>>;
    setUsages(ownerType: "project", ownerId: number, mediaIds: number[], audience: Audience, published: boolean, trx?: Knex.Transaction): Promise<void>;
  };
  /** The build's one percent complete (the whole programme, the same for every caller: decision 004). */
  percentComplete(slug: string): Promise<number>;
  /** The public capacity blocks with their forecast ready-for-service dates. */
  publicBlocks(slug: string): Promise<Array<{ name: string; readyForService: boolean; forecastReadyDate: string | null }>>;
  /** The cover of the newest public update that has one (the picture when no hero is chosen). */
  latestCover(slug: string): Promise<MediaPicture | null>;
  /** The public pages' short-lived cache is stale after a change. */
  onChange?: () => void;
}

type Described = Awaited<ReturnType<HeroDeps["media"]["describeForPublishing"]>>[number];

/** Why a photo may not be the public face of a project; null when it may. */
function refusal(photo: Described | undefined, project: Project): AppError | null {
  const refuse = (code: string, message: string) => new AppError(code, message, 422, { mediaId: message });
  if (!photo?.exists) return refuse("unknown_media", "There is no such photo in the media library.");
  if (photo.projectId !== project.id) return refuse("other_project", `That photo belongs to another project, not ${project.name}.`);
  if (photo.status !== "ready") return refuse("media_not_ready", "That photo is still being processed (or failed); choose a ready photo.");
  if (photo.sensitivity !== "cleared") return refuse("not_cleared", "That photo is not cleared for the public; a lead reviews it first.");
  if (photo.flaggedForReview) return refuse("flagged", "That photo is flagged for review; a lead clears it first.");
  if (!photo.altText) return refuse("missing_alt_text", "That photo has no alt text; add it in the media library first.");
  return null;
}

/**
 * The hero photograph staff choose for a project, and the home page's builds
 * (docs/decisions/055-hero-home-gallery.md). The hero is public: it is checked again on every
 * read, so a photo restricted after it was chosen stops showing at once.
 */
export function createProjectHero(deps: HeroDeps) {
  const { db, projects, audit, media } = deps;

  async function choiceOf(project: Project): Promise<HeroChoice> {
    const choice = await findHeroChoice(db, project.id);
    if (!choice) throw notFound("That project");
    return choice;
  }

  /** The choice's picture when the photo may still be shown to anyone. */
  async function pictureOf(project: Project, mediaId: number | null): Promise<MediaPicture | null> {
    if (mediaId === null) return null;
    const [photo] = await media.describeForPublishing([mediaId]);
    if (refusal(photo, project)) return null;
    return (await media.pictureFor([mediaId])).get(mediaId) ?? null;
  }

  async function heroOf(project: Project, choice: HeroChoice): Promise<Hero> {
    return { picture: await pictureOf(project, choice.mediaId), focus: { x: choice.focusX, y: choice.focusY }, mediaId: choice.mediaId, version: choice.version };
  }

  async function buildOf(project: Project, choice: HeroChoice | undefined): Promise<HomeBuild> {
    const hero = choice ? await pictureOf(project, choice.mediaId) : null;
    // A part that cannot be read leaves its slot empty; the other builds still show.
    const [cover, percent, blocks] = await Promise.all([
      hero ? Promise.resolve(null) : deps.latestCover(project.slug).catch(() => null),
      deps.percentComplete(project.slug).catch(() => null),
      deps.publicBlocks(project.slug).catch(() => []),
    ]);
    const next = blocks
      .filter((b) => !b.readyForService && b.forecastReadyDate !== null)
      .sort((a, b) => a.forecastReadyDate!.localeCompare(b.forecastReadyDate!) || a.name.localeCompare(b.name))[0];
    const picture = hero ?? cover;
    return {
      slug: project.slug,
      name: project.name,
      operatorName: project.operatorName,
      locationLabel: project.locationLabel,
      description: project.description,
      picture,
      pictureIs: hero ? "hero" : cover ? "cover" : null,
      // A cover keeps the focal point set on the photo itself; a hero, the one chosen for it.
      focus: hero && choice ? { x: choice.focusX, y: choice.focusY } : (cover?.focal ?? { x: 0.5, y: 0.5 }),
      percentComplete: percent,
      nextReady: next ? { blockName: next.name, date: next.forecastReadyDate! } : null,
    };
  }

  return {
    /** GET /api/projects/:slug/hero */
    async hero(slug: string): Promise<Hero> {
      const project = await projects.get(slug);
      return heroOf(project, await choiceOf(project));
    },

    /**
     * PUT /api/projects/:slug/hero: choose (or clear) the hero. Only a ready, cleared, unflagged photo
     * of this project with alt text may be chosen (422 otherwise); a stale version is refused (409).
     * The photo is marked as used publicly by the project, so visitors may fetch its derivatives.
     */
    async setHero(slug: string, input: HeroInput, actor: Actor): Promise<Hero> {
      const project = await projects.get(slug);
      if (input.mediaId !== null) {
        const [photo] = await media.describeForPublishing([input.mediaId]);
        const refused = refusal(photo, project);
        if (refused) throw refused;
      }
      const focus = input.focus ?? { x: 0.5, y: 0.5 };
      const saved = await db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const before = await findHeroChoice(trx, project.id);
        if (!before) throw notFound("That project");
        if (before.version !== input.version) {
          throw new AppError("conflict", "Someone else changed the hero photograph after you loaded it. The current choice is attached; choose again.", 409, undefined, {
            current: { mediaId: before.mediaId, focus: { x: before.focusX, y: before.focusY }, version: before.version },
          });
        }
        const next = { mediaId: input.mediaId, focusX: focus.x, focusY: focus.y };
        await updateHeroChoice(trx, project.id, before.version, next);
        await media.setUsages("project", project.id, input.mediaId === null ? [] : [input.mediaId], "public", true, trx);
        await audit.record(
          {
            action: "project_hero_changed",
            actor,
            target: { type: "project", id: project.id, label: project.name },
            detail: { from: before.mediaId, to: input.mediaId, focus },
          },
          trx,
        );
        return { ...next, version: before.version + 1 };
      });
      deps.onChange?.();
      return heroOf(project, saved);
    },

    /** GET /api/home: every build with its picture, its one figure and its next ready-for-service date. */
    async home(): Promise<Home> {
      const all = await projects.list();
      const choices = await findHeroChoices(db, all.map((p) => p.id));
      return { builds: await Promise.all(all.map((p) => buildOf(p, choices.get(p.id)))) };
    },
  };
}
export type ProjectHero = ReturnType<typeof createProjectHero>;
