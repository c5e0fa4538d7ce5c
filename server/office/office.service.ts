import { stageRank } from "#shared/domain/facility-record.ts";
import { DIGESTS_DUE_WITHIN_DAYS, type WaitingItem, type WaitingKind } from "#shared/schemas/office.ts";
import type { Role } from "#shared/schemas/common.ts";
import type { Actor } from "../core/types.ts";
import type { DecisionsService } from "../decisions/decisions.service.ts";
import type { DigestsService } from "../digests/digests.service.ts";
import type { EnquiriesService } from "../enquiries/enquiries.service.ts";
import type { FacilityService } from "../facility/facility.service.ts";
import type { MediaService } from "../media/media.service.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";

export interface OfficeDeps {
  projects: ProjectsService;
  posts: PostsService;
  media: MediaService;
  enquiries: EnquiriesService;
  digests: DigestsService;
  decisions: DecisionsService;
  facility: FacilityService;
}

/** Who is asked to do each kind of work: the roles whose routes do it (reviewers, answerers, senders). */
const DOERS: Record<WaitingKind, readonly Role[]> = {
  updates_to_review: ["lead", "admin"],
  photos_to_clear: ["lead", "admin"],
  new_enquiries: ["marketing", "lead", "admin"],
  digests_due: ["marketing", "lead", "admin"],
  decisions_overdue: ["lead", "admin"],
  units_awaiting_commissioning: ["lead", "admin"],
};

type Project = Awaited<ReturnType<ProjectsService["list"]>>[number];
type Count = { count: number; nextAt?: string | null };

/**
 * The office overview's "Waiting for you" (decision 051): each module's service counts its own
 * waiting work, so this module reads no table; a kind is counted only for the roles that do it.
 */
export function createOfficeService(deps: OfficeDeps) {
  const { projects, posts, media, enquiries, digests, decisions, facility } = deps;
  const DAY_MS = 86_400_000;

  const counters: Record<WaitingKind, (p: Project, actor: Actor) => Promise<Count>> = {
    updates_to_review: async (p, actor) => ({ count: (await posts.list(p.slug, { page: 1, status: "in_review" }, actor)).total }),
    photos_to_clear: async (p) => ({ count: (await media.list({ project: p.slug, sensitivity: "unreviewed", page: 1, pageSize: 1 })).total }),
    new_enquiries: async (p) => ({ count: (await enquiries.list({ status: "new", projectSlug: p.slug })).length }),
    async digests_due(p) {
      // Runs with nobody to send to are not work: the worker skips them.
      const until = projects.now().getTime() + DIGESTS_DUE_WITHIN_DAYS * DAY_MS;
      const due = (await digests.upcoming(p.slug)).filter((d) => d.recipients > 0 && Date.parse(d.at) <= until);
      return { count: due.length, nextAt: due[0]?.at ?? null };
    },
    decisions_overdue: async (p, actor) => ({ count: (await decisions.list(p.slug, { status: "open" }, actor)).filter((d) => d.overdue).length }),
    async units_awaiting_commissioning(p, actor) {
      // On site (installed or further) but not yet commissioned to the level that carries load.
      const { systems } = await facility.facility(p.slug, {}, actor);
      const units = systems.flatMap((s) => s.units);
      return { count: units.filter((u) => stageRank(u.stage) >= stageRank("installed") && !u.available).length };
    },
  };

  return {
    /** The work waiting for this staff member, by kind then project; kinds with nothing waiting are left out. */
    async waitingFor(actor: Actor): Promise<WaitingItem[]> {
      const role = actor.user?.role;
      const kinds = (Object.keys(DOERS) as WaitingKind[]).filter((k) => role !== undefined && DOERS[k].includes(role));
      const list = await projects.list();
      const counted = await Promise.all(
        kinds.flatMap((kind) =>
          list.map(async (p): Promise<WaitingItem> => {
            const c = await counters[kind](p, actor);
            return { kind, project: { slug: p.slug, name: p.name, timeZone: p.timeZone }, count: c.count, nextAt: c.nextAt ?? null };
          }),
        ),
      );
      return counted.filter((i) => i.count > 0);
    },
  };
}

export type OfficeService = ReturnType<typeof createOfficeService>;
