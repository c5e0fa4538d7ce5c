import { viewerOfRole } from "#shared/domain/audience.ts";
import { queryTerms, scoreOf, snippetOf, type SearchField } from "#shared/domain/search.ts";
import { SEARCH_KINDS, SEARCH_MAX_RESULTS, type SearchAnswer, type SearchKind, type SearchResult } from "#shared/schemas/search.ts";
import type { Actor } from "../core/types.ts";
import type { FacilityService } from "../facility/facility.service.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { StoriesService } from "../stories/stories.service.ts";

export interface SearchDeps {
  projects: ProjectsService;
  posts: PostsService;
  stories: StoriesService;
  programme: ProgrammeService;
  facility: FacilityService;
}

/** A candidate: its answer but the snippet, its fields (title first) and the field the snippet comes from. */
interface Candidate {
  kind: SearchKind;
  title: string;
  url: string;
  fields: SearchField[];
  /** The text shown under the title. */
  body: string;
}

const TITLE = 3;
const BODY = 1;

const PLANT_WORDS: Record<string, string> = {
  cooling: "cooling",
  air_movement: "air movement",
  power_generation: "power generation generators",
  ups: "UPS",
  fuel_storage: "fuel storage",
  electrical_distribution: "electrical distribution",
  fire_suppression: "fire suppression",
  security: "security",
  other: "",
};

/**
 * Search of one project (decision 048): every query reads what the caller may see through the
 * modules' own services and ranks it in process, so any number of processes answer alike with
 * no index to keep current (a project's own pages are hundreds, not millions).
 */
export function createSearchService(deps: SearchDeps) {
  const { projects, posts, stories, programme, facility } = deps;

  /** Everything of the project this caller may see, as candidates. */
  async function candidatesFor(slug: string, actor: Actor): Promise<Candidate[]> {
    const project = await projects.get(slug);
    const viewer = viewerOfRole(actor.user?.role);
    const base = `/projects/${project.slug}`;
    const [updates, storyList, milestones, site] = await Promise.all([
      posts.searchable(project.id, viewer),
      stories.list(slug, actor),
      programme.list(slug, {}, viewer),
      facility.facility(slug, {}, viewer),
    ]);
    return [
      ...site.blocks.map((b) => {
        const body = [`${b.racks} racks · ${b.itKw} kW IT load · up to ${b.maxKwPerRack} kW per rack`, b.coolingApproach, b.notes, b.missing.length ? `Still to come: ${b.missing.join("; ")}` : ""].filter(Boolean).join(" · ");
        return { kind: "block" as const, title: b.name, url: `${base}/facility#block-${b.id}`, body, fields: [{ text: b.name, weight: TITLE }, { text: `${body} ${b.stage}`, weight: BODY }] };
      }),
      ...site.systems.map((s) => ({
        kind: "system" as const,
        title: s.name,
        url: `${base}/facility#system-${s.id}`,
        body: `${s.redundancy.summary}${s.ratingPerUnit !== null && s.ratingUnit ? ` · ${s.ratingPerUnit} ${s.ratingUnit} a unit` : ""}${s.notes ? ` · ${s.notes}` : ""}`,
        fields: [
          { text: s.name, weight: TITLE },
          { text: `${PLANT_WORDS[s.kind] ?? ""} ${s.redundancy.summary} ${s.ratingUnit ?? ""} ${s.notes} ${s.units.map((u) => `${u.label} ${u.tag}`).join(" ")}`, weight: BODY },
        ],
      })),
      ...milestones
        .filter((m) => m.removal === null)
        .map((m) => ({
          kind: "milestone" as const,
          title: m.name,
          url: `${base}/timeline#milestone-${m.id}`,
          body: [m.phase, m.area, m.description].filter(Boolean).join(" · "),
          fields: [{ text: m.name, weight: TITLE }, { text: `${m.phase} ${m.area ?? ""} ${m.system ?? ""} ${m.description ?? ""}`, weight: BODY }],
        })),
      ...updates.map((p) => ({
        kind: "update" as const,
        title: p.title,
        url: `${base}/updates/${p.slug}`,
        body: `${p.summary} ${p.plainText}`,
        fields: [{ text: p.title, weight: TITLE }, { text: p.summary, weight: BODY * 1.5 }, { text: p.plainText, weight: BODY }],
      })),
      ...storyList
        .filter((s) => s.status === "published")
        .map((s) => ({
          kind: "story" as const,
          title: s.title,
          url: `${base}/stories/${s.slug}`,
          body: s.intro,
          fields: [{ text: s.title, weight: TITLE }, { text: s.intro, weight: BODY }],
        })),
    ];
  }

  return {
    /**
     * The items of a project the caller may see that match every word of `q`, best first (ties
     * in the kinds' order, then by title): at most SEARCH_MAX_RESULTS listed, all counted.
     */
    async search(slug: string, q: string, actor: Actor): Promise<SearchAnswer> {
      const terms = queryTerms(q);
      const candidates = await candidatesFor(slug, actor);
      if (terms.length === 0) return { total: 0, results: [] };
      const ranked = candidates
        .map((c) => ({ c, score: scoreOf(c, terms) }))
        .filter((r) => r.score > 0)
        .sort((a, b) => b.score - a.score || SEARCH_KINDS.indexOf(a.c.kind) - SEARCH_KINDS.indexOf(b.c.kind) || a.c.title.localeCompare(b.c.title));
      const results: SearchResult[] = ranked.slice(0, SEARCH_MAX_RESULTS).map(({ c }) => ({
        kind: c.kind,
        title: c.title,
        url: c.url,
        // A title that matches every word says why already: the body then reads from its start.
        snippet: snippetOf(c.body.trim() ? c.body : c.title, terms, { fromStart: scoreOf({ fields: [{ text: c.title, weight: 1 }] }, terms) > 0 }),
      }));
      return { total: ranked.length, results };
    },
  };
}

export type SearchService = ReturnType<typeof createSearchService>;
