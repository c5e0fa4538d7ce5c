import { formatLongDate } from "#shared/domain/locale-dates.ts";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import type { Hero, HomeBuild } from "#shared/schemas/project-hero.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { StoriesService } from "../stories/stories.service.ts";
import { absolutizeHtml } from "../posts/rich-text.ts";
import { element, textElement, xmlAttr, xmlText } from "./xml.ts";
import { coverHint, heroHint, homeHeroHint } from "./preload-hints.ts";

/**
 * The public site's documents that are not the app: the Atom feed of each project (RFC 4287),
 * the sitemap, robots.txt, and the Open Graph head of the pages link previews fetch. Each
 * reads published public content only, whoever asks.
 */

/** For the HTML head: escapes quotes too, so it serves attribute values and text alike. */
export const escapeHtml = xmlAttr;

/** The tags a link preview reads, already escaped, to put in the shell's head. */
export interface PageHead {
  title: string;
  tags: string;
}

export type PageAnswer = { redirect: string } | { head: PageHead } | null;

/** A public JPEG for previews: the one nearest 1200 px wide (what link-preview cards show best). */
function previewImage(p: MediaPicture | null): { url: string; width: number; height: number; alt: string } | null {
  if (!p) return null;
  const list = p.sources.jpeg.length ? p.sources.jpeg : p.sources.webp;
  const best = [...list].sort((a, b) => Math.abs(a.width - 1200) - Math.abs(b.width - 1200))[0];
  return best ? { url: best.url, width: best.width, height: best.height, alt: p.altText ?? "" } : null;
}

/** The facility as the public sees it (the facility module's read, asked as a visitor). */
export interface PublicFacilityReader {
  facility(slug: string, query: { at?: string }, reader: "public"): Promise<FacilityAnswer>;
}

const figure = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1 });
const dayWords = (date: string) => formatLongDate(date.slice(0, 10));

/**
 * The facility page's description for link previews and readers without JavaScript: each
 * public block's racks, IT load, density and ready-for-service date, in one paragraph.
 */
export function facilityDescription(projectName: string, f: Pick<FacilityAnswer, "blocks">): string {
  if (f.blocks.length === 0) return `Capacity and readiness of ${projectName}: not published yet.`;
  const blocks = f.blocks.map((b) => {
    const ready = b.readyForService
      ? "ready for service"
      : b.forecastReadyDate
        ? `ready for service: forecast ${dayWords(b.forecastReadyDate)}${b.baselineReadyDate && b.baselineReadyDate !== b.forecastReadyDate ? ` (planned ${dayWords(b.baselineReadyDate)})` : ""}`
        : "ready-for-service date not set";
    return `${b.name}: ${figure.format(b.racks)} racks, ${figure.format(b.itKw)} kW IT, up to ${figure.format(b.maxKwPerRack)} kW per rack, ${ready}.`;
  });
  return [`Capacity blocks of ${projectName}.`, ...blocks].join(" ");
}

/** The chosen hero photographs (the projects module's, decision 055): for the preload hint and the preview image. */
export interface HeroReader {
  hero(slug: string): Promise<Pick<Hero, "picture">>;
  home(): Promise<{ builds: Array<Pick<HomeBuild, "picture">> }>;
}

export function createFeedsService(deps: { projects: ProjectsService; posts: PostsService; stories: StoriesService; facility: PublicFacilityReader; heroes: HeroReader; publicUrl: string }) {
  const { projects, posts, stories, facility } = deps;
  const base = deps.publicUrl.replace(/\/+$/, "");
  const host = new URL(base).hostname;
  const abs = (path: string) => (path.startsWith("/") ? base + path : path);

  /** `pageTitle` names the document when it differs from the preview's title; a page that is its build's own says the name once. */
  function head(o: { title: string; pageTitle?: string; description: string; url: string; type: "article" | "website"; siteName: string; image: ReturnType<typeof previewImage>; feed?: string; published?: string | null }): PageHead {
    const meta = (attr: "property" | "name", key: string, value: string) => `<meta ${attr}="${key}" content="${escapeHtml(value)}">`;
    const tags = [
      meta("name", "description", o.description),
      `<link rel="canonical" href="${escapeHtml(o.url)}">`,
      meta("property", "og:type", o.type),
      meta("property", "og:site_name", o.siteName),
      meta("property", "og:title", o.title),
      meta("property", "og:description", o.description),
      meta("property", "og:url", o.url),
      meta("name", "twitter:card", o.image ? "summary_large_image" : "summary"),
    ];
    if (o.image) {
      tags.push(meta("property", "og:image", abs(o.image.url)), meta("property", "og:image:width", String(o.image.width)), meta("property", "og:image:height", String(o.image.height)));
      if (o.image.alt) tags.push(meta("property", "og:image:alt", o.image.alt));
    }
    if (o.published) tags.push(meta("property", "article:published_time", o.published));
    if (o.feed) tags.push(`<link rel="alternate" type="application/atom+xml" title="${escapeHtml(o.siteName)} updates" href="${escapeHtml(o.feed)}">`);
    const page = o.pageTitle ?? o.title;
    return { title: escapeHtml(page === o.siteName ? page : `${page} · ${o.siteName}`), tags: tags.join("\n    ") };
  }

  return {
    /**
     * The project's Atom feed (RFC 4287) of published public updates, newest first. Written here
     * rather than by a feed library, so that every text and attribute is escaped (see xml.ts).
     * Titles and summaries are plain text (`type="text"`): a "<" typed in a title is a
     * character, not markup. The content is the post's sanitised HTML, escaped (`type="html"`).
     */
    async feed(slug: string): Promise<string> {
      const { project, updated, posts: list } = await posts.feedOf(slug);
      const page = `${base}/projects/${project.slug}`;
      const block = (name: string, children: string[]) => [`  <${name}>`, ...children.filter(Boolean).map((c) => `    ${c}`), `  </${name}>`].join("\n");
      const entries = list.map((p) =>
        block("entry", [
          // A tag URI (RFC 4151) by post id: an entry keeps its identity when its address changes.
          textElement("id", `tag:${host},2026:post-${p.id}`),
          textElement("title", p.title, { type: "text" }),
          element("link", { rel: "alternate", type: "text/html", href: `${page}/updates/${p.slug}` }),
          textElement("updated", p.updatedAt.toISOString()),
          p.publishedAt ? textElement("published", p.publishedAt.toISOString()) : "",
          element("author", {}, textElement("name", p.authorName)),
          ...p.tags.map((t) => element("category", { term: t.value, label: t.name ?? t.value })),
          p.summary ? textElement("summary", p.summary, { type: "text" }) : "",
          textElement("content", absolutizeHtml(p.html, base), { type: "html" }),
        ]),
      );
      const head = [
        textElement("id", `${page}/updates`),
        textElement("title", `${project.name}: progress updates`, { type: "text" }),
        project.description ? textElement("subtitle", project.description, { type: "text" }) : "",
        // RFC 4287 §4.2.15: the last time the feed changed in a significant way.
        textElement("updated", (updated ?? new Date(0)).toISOString()),
        element("link", { rel: "alternate", type: "text/html", href: `${page}/updates` }),
        element("link", { rel: "self", type: "application/atom+xml", href: `${base}/feed/${project.slug}.atom` }),
        element("author", {}, textElement("name", project.operatorName)),
        textElement("generator", "Plumbline"),
        textElement("rights", `© ${project.operatorName}`, { type: "text" }),
      ];
      return [
        '<?xml version="1.0" encoding="utf-8"?>',
        `<feed xmlns="http://www.w3.org/2005/Atom" xml:lang="en">`,
        ...head.filter(Boolean).map((line) => `  ${line}`),
        ...entries,
        "</feed>",
        "",
      ].join("\n");
    },

    /** Every public page: the home page, each project's pages, published public updates and stories. */
    async sitemap(): Promise<string> {
      const [list, postAddresses, storyAddresses] = await Promise.all([projects.list(), posts.publicAddresses(), stories.publicAddresses()]);
      const slugOf = new Map(list.map((p) => [p.id, p.slug]));
      const urls: Array<{ loc: string; lastmod?: Date }> = [{ loc: `${base}/` }];
      for (const p of list) {
        urls.push({ loc: `${base}/projects/${p.slug}` }, { loc: `${base}/projects/${p.slug}/updates` }, { loc: `${base}/projects/${p.slug}/gallery` }, { loc: `${base}/projects/${p.slug}/facility` });
      }
      for (const a of postAddresses) {
        const project = slugOf.get(a.projectId);
        if (project) urls.push({ loc: `${base}/projects/${project}/updates/${a.slug}`, lastmod: a.updatedAt });
      }
      for (const a of storyAddresses) {
        const project = slugOf.get(a.projectId);
        if (project) urls.push({ loc: `${base}/projects/${project}/stories/${a.slug}`, lastmod: a.updatedAt });
      }
      const body = urls.map((u) => `  <url><loc>${xmlText(u.loc)}</loc>${u.lastmod ? `<lastmod>${u.lastmod.toISOString()}</lastmod>` : ""}</url>`).join("\n");
      return `<?xml version="1.0" encoding="UTF-8"?>\n<urlset xmlns="http://www.sitemaps.org/schemas/sitemap/0.9">\n${body}\n</urlset>\n`;
    },

    robots(): string {
      return ["User-agent: *", "Disallow: /office", "Disallow: /investors", "Disallow: /api/", `Sitemap: ${base}/sitemap.xml`, ""].join("\n");
    },

    /**
     * What the HTML shell of a page should carry for link previews (the page works without
     * JavaScript for crawlers), or where an old address of an update now lives.
     */
    async pageFor(path: string): Promise<PageAnswer> {
      // A review link's page shows a draft to one reviewer: no search engine may keep it (decision 060).
      if (/^\/review\//.test(path)) return { head: { title: "Draft for review · Plumbline", tags: '<meta name="robots" content="noindex">' } };
      const update = /^\/projects\/([a-z0-9-]{1,100})\/updates\/([a-z0-9-]{1,120})\/?$/.exec(path);
      if (update) {
        const found = await posts.previewOf(update[1]!, update[2]!);
        if (!found) return null;
        if ("redirectTo" in found) return { redirect: `/projects/${update[1]}/updates/${found.redirectTo}` };
        const { post, project } = found;
        const page = head({
          title: post.title,
          description: post.summary || project.description,
          url: `${base}/projects/${project.slug}/updates/${post.slug}`,
          type: "article",
          siteName: project.name,
          image: previewImage(post.cover),
          feed: `${base}/feed/${project.slug}.atom`,
          published: post.publishedAt,
        });
        // The cover is the page's largest paint: start fetching it with the HTML.
        const cover = coverHint(post.cover);
        return { head: cover ? { ...page, tags: `${page.tags}\n    ${cover}` } : page };
      }
      const story = /^\/projects\/([a-z0-9-]{1,100})\/stories\/([a-z0-9-]{1,120})\/?$/.exec(path);
      if (story) {
        const found = await stories.previewOf(story[1]!, story[2]!);
        if (!found) return null;
        return {
          head: head({
            title: found.story.title,
            description: found.story.intro.slice(0, 300) || found.project.description,
            url: `${base}/projects/${found.project.slug}/stories/${found.story.slug}`,
            type: "article",
            siteName: found.project.name,
            image: previewImage(found.story.cover),
            published: found.story.publishedAt,
          }),
        };
      }
      const facilityPage = /^\/projects\/([a-z0-9-]{1,100})\/facility\/?$/.exec(path);
      if (facilityPage) {
        const project = await projects.get(facilityPage[1]!).catch(() => null);
        if (!project) return null;
        const seen = await facility.facility(project.slug, {}, "public");
        return {
          head: head({
            title: "Capacity and readiness",
            description: facilityDescription(project.name, seen),
            url: `${base}/projects/${project.slug}/facility`,
            type: "website",
            siteName: project.name,
            image: null,
          }),
        };
      }
      if (path === "/") {
        // One build alone shows its picture (hero, else latest cover) across the home page: start fetching it with the HTML.
        const { builds } = await deps.heroes.home();
        const hint = builds.length === 1 ? homeHeroHint(builds[0]!.picture) : "";
        return hint ? { head: { title: "What is being built · Plumbline", tags: hint } } : null;
      }
      const projectPage = /^\/projects\/([a-z0-9-]{1,100})(\/updates)?\/?$/.exec(path);
      if (projectPage) {
        const project = await projects.get(projectPage[1]!).catch(() => null);
        if (!project) return null;
        // The project page's hero is its largest paint: preloaded, and the link preview's picture.
        const hero = projectPage[2] ? null : (await deps.heroes.hero(project.slug)).picture;
        const page = head({
          title: projectPage[2] ? `Updates from ${project.name}` : project.name,
          // The same title the app gives the page ("Updates · <build>", the build's name alone).
          pageTitle: projectPage[2] ? "Updates" : project.name,
          description: project.description,
          url: `${base}/projects/${project.slug}${projectPage[2] ?? ""}`,
          type: "website",
          siteName: project.name,
          image: previewImage(hero),
          feed: `${base}/feed/${project.slug}.atom`,
        });
        const hint = heroHint(hero);
        return { head: hint ? { ...page, tags: `${page.tags}\n    ${hint}` } : page };
      }
      return null;
    },
  };
}

export type FeedsService = ReturnType<typeof createFeedsService>;

/** Puts a page's title and preview tags into the HTML shell. */
export function injectHead(shell: string, head: PageHead): string {
  // Replacer functions, so a "$" in a title is never read as a pattern.
  const title = `<title>${head.title}</title>`;
  const titled = /<title>[\s\S]*?<\/title>/i.test(shell) ? shell.replace(/<title>[\s\S]*?<\/title>/i, () => title) : shell.replace(/<\/head>/i, () => `${title}</head>`);
  return titled.replace(/<\/head>/i, () => `    ${head.tags}\n  </head>`);
}
