import { useEffect, useMemo, useState, type FormEvent, type ReactNode } from "react";
import { useSuspenseQuery, type QueryClient } from "@tanstack/react-query";
import { Link, Navigate, useParams, useSearchParams, type LoaderFunctionArgs } from "react-router-dom";
import type { MediaPicture, PostDetail, PostRedirect, PostTag } from "#shared/schemas/posts.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { StoryDetail, StoryItem } from "#shared/schemas/stories.ts";
import { POST_COVER_SIZES } from "#shared/domain/picture-sizes.ts";
import { AudienceMark } from "../../components/ui/audience-mark.tsx";
import { CompareSlider } from "../../components/ui/compare-slider.tsx";
import { SelectField } from "../../components/ui/field.tsx";
import { Lightbox, type LightboxItem } from "../../components/ui/lightbox.tsx";
import { Picture } from "../../components/ui/picture.tsx";
import { pageCount } from "../../lib/api-client.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { sitePlanQueryOptions } from "../../lib/site-plan.ts";
import { SitePlanSection } from "./components/site-plan-section.tsx";
import { galleryQueryOptions, isRedirect, siteProjectQueryOptions, storyQueryOptions, updateQueryOptions, updatesQueryOptions, type FacilityFilter, type GalleryFilters, type GalleryPhoto, type UpdateFilters } from "./api.ts";
import { milestoneIdsInBody, MilestonesThenNow } from "./components/milestone-then-now.tsx";
import { PostBody } from "./components/post-body.tsx";
import { PostCard } from "./components/post-card.tsx";
import { ProjectMasthead } from "./components/project-nav.tsx";
import { SearchBox } from "./components/search-box.tsx";
import { useTitle } from "../../lib/use-title.ts";
import { GalleryThumb } from "./components/gallery-thumb.tsx";
import { PressKitLink } from "./components/press-kit-link.tsx";
import { capturedOn, dayOf, monthWords, SYSTEM_TAGS, tagFilter, tagWord } from "./words.ts";

/*
 * Each page's loader primes the project (for the masthead) and what the page shows; the pages
 * read both with useSuspenseQuery. A missing update or story ends in the route's error element.
 */

/** `?block=ID` / `?plant=ID`: the updates or photos of one capacity block or plant system (from the facility page). */
function facilityFilterOf(params: URLSearchParams): FacilityFilter {
  return { block: params.get("block") ?? undefined, plant: params.get("plant") ?? undefined };
}

function updateFiltersOf(params: URLSearchParams): UpdateFilters {
  return { page: Math.max(1, Number(params.get("page")) || 1), tag: params.get("tag") ?? undefined, q: params.get("q") ?? undefined, ...facilityFilterOf(params) };
}

function galleryFiltersOf(params: URLSearchParams): GalleryFilters {
  return { area: params.get("area") ?? undefined, system: params.get("system") ?? undefined, month: params.get("month") ?? undefined, ...facilityFilterOf(params) };
}

/** The name of the block or plant system a list is filtered to, from the tags of what it found. */
function facilityFilterName(f: FacilityFilter, tagSets: ReadonlyArray<ReadonlyArray<{ kind: string; value?: string; id?: number; name?: string }>>): string | null {
  const kind = f.block ? "block" : f.plant ? "plant" : null;
  if (!kind) return null;
  const id = kind === "block" ? f.block : f.plant;
  for (const tags of tagSets) for (const t of tags) if (t.kind === kind && String(t.value ?? t.id) === id && t.name) return t.name;
  return kind === "block" ? "this capacity block" : "this plant system";
}

const searchOf = (request: Request) => new URL(request.url).searchParams;

/** A project page's loader: the project for the masthead, and (from `prime`) what the page shows. */
function projectPageLoader(prime: (qc: QueryClient, slug: string, args: LoaderFunctionArgs) => Promise<unknown>): RouteLoader {
  return (qc) => async (args) => {
    const slug = args.params.slug ?? "";
    await Promise.all([qc.ensureQueryData(siteProjectQueryOptions(slug)), prime(qc, slug, args)]);
    return null;
  };
}

export const updatesLoader = projectPageLoader((qc, slug, { request }) => qc.ensureQueryData(updatesQueryOptions(slug, updateFiltersOf(searchOf(request)))));
export const postLoader = projectPageLoader((qc, slug, { params }) => qc.ensureQueryData(updateQueryOptions(slug, params.postSlug ?? "")));
export const galleryLoader = projectPageLoader((qc, slug, { request }) => Promise.all([qc.ensureQueryData(galleryQueryOptions(slug, galleryFiltersOf(searchOf(request)))), qc.ensureQueryData(sitePlanQueryOptions(slug))]));
export const storyLoader = projectPageLoader((qc, slug, { params }) => qc.ensureQueryData(storyQueryOptions(slug, params.storySlug ?? "")));

function Frame({ children, wide = false }: { children: ReactNode; wide?: boolean }) {
  return <div className={`mx-auto px-4 py-8 ${wide ? "max-w-7xl" : "max-w-5xl"}`}>{children}</div>;
}


function Pager({ page, total, pageSize, hrefFor }: { page: number; total: number; pageSize: number; hrefFor: (p: number) => string }) {
  const pages = pageCount(total, pageSize);
  if (pages <= 1) return null;
  return (
    <nav aria-label="Pages of updates" className="mt-8 flex flex-wrap items-center justify-between gap-3 border-t border-rule pt-4 text-sm">
      {page > 1 ? (
        <Link to={hrefFor(page - 1)} className="font-medium underline underline-offset-4" rel="prev">
          ← Newer updates
        </Link>
      ) : (
        <span />
      )}
      <span className="tabular text-ink-soft">
        Page {page} of {pages}
      </span>
      {page < pages ? (
        <Link to={hrefFor(page + 1)} className="font-medium underline underline-offset-4" rel="next">
          Older updates →
        </Link>
      ) : (
        <span />
      )}
    </nav>
  );
}

/** `/projects/:slug/updates`: the published updates, newest first, with a topic filter and search. */
export function UpdatesPage() {
  const { slug = "" } = useParams();
  const [params, setParams] = useSearchParams();
  const filters = updateFiltersOf(params);
  const { page = 1, tag, q } = filters;
  const [draft, setDraft] = useState(q ?? "");
  useEffect(() => setDraft(q ?? ""), [q]);
  const project = useSuspenseQuery(siteProjectQueryOptions(slug));
  const updates = useSuspenseQuery(updatesQueryOptions(slug, filters));
  const about = facilityFilterName(filters, updates.data.items.map((p) => p.tags));
  useTitle("Updates", project.data.name);

  const set = (next: Record<string, string | undefined>) =>
    setParams((prev) => {
      const u = new URLSearchParams(prev);
      for (const [k, v] of Object.entries(next)) if (v) u.set(k, v);
      else u.delete(k);
      u.delete("page");
      return u;
    });
  const onSearch = (e: FormEvent) => {
    e.preventDefault();
    set({ q: draft.trim() || undefined });
  };
  const hrefFor = (p: number) => {
    const u = new URLSearchParams(params);
    if (p > 1) u.set("page", String(p));
    else u.delete("page");
    const s = u.toString();
    return `/projects/${slug}/updates${s ? `?${s}` : ""}`;
  };

  // Areas come from the posts themselves (the programme's systems are a fixed list).
  const areaTags = useMemo(() => {
    const seen = new Set<string>();
    for (const p of updates.data.items) for (const t of p.tags) if (t.kind === "area") seen.add(t.value);
    if (tag && !SYSTEM_TAGS.includes(tag)) seen.add(tag);
    return [...seen].sort();
  }, [updates.data, tag]);
  const tagChoices = [
    { value: "", label: "All topics" },
    ...SYSTEM_TAGS.map((s) => ({ value: s, label: tagWord({ kind: "system", value: s }) })),
    ...areaTags.map((a) => ({ value: a, label: a })),
  ];

  const zone = project.data.timeZone;
  return (
    <Frame>
      <ProjectMasthead slug={slug} projectName={project.data.name} operatorName={project.data.operatorName} />
      <h1 className="mt-6 text-3xl font-semibold tracking-tight">{about ? `Updates about ${about}` : q ? `Updates mentioning “${q}”` : "Updates from the site"}</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">What changed on site, in the operator's words, with photographs from the site walks.</p>
      <div className="mt-6 flex flex-col gap-4 border border-rule bg-sheet p-4 sm:flex-row sm:items-end">
        <SearchBox id="update-search" label="Search updates" value={draft} onChange={setDraft} onSubmit={onSearch} placeholder="e.g. chillers, generator, Hall 2A" className="flex-1" />
        <div className="sm:w-56">
          <SelectField label="Topic" value={tag ?? ""} onChange={(e) => set({ tag: e.target.value || undefined })} options={tagChoices} />
        </div>
      </div>
      {q || tag || about ? (
        <p className="mt-3 text-sm">
          <button type="button" className="underline underline-offset-4" onClick={() => set({ q: undefined, tag: undefined, block: undefined, plant: undefined })}>
            {about ? "Show every update" : "Clear the search and topic"}
          </button>
        </p>
      ) : null}
      <div className="mt-6">
        {updates.data.items.length === 0 ? (
          <p className="text-ink-soft">{about ? `No published update is about ${about} yet.` : q || tag ? "No published update matches. Try other words or another topic." : "No updates have been published yet."}</p>
        ) : (
          <>
            <p className="sr-only" aria-live="polite">
              {updates.data.total} updates
            </p>
            <div className="flex flex-col gap-6">
              {updates.data.items.map((p) => (
                <PostCard key={p.id} post={p} projectSlug={slug} timeZone={zone} />
              ))}
            </div>
            <Pager page={page} total={updates.data.total} pageSize={10} hrefFor={hrefFor} />
          </>
        )}
      </div>
    </Frame>
  );
}

/** The site path an API redirect names, whether it gives a page path, an API path or a bare slug. */
function redirectTarget(slug: string, kind: "updates" | "stories", to: string): string {
  const path = to.replace(/^https?:\/\/[^/]+/, "").replace(/^\/api\//, "/");
  if (path.startsWith(`/projects/${slug}/${kind}/`)) return path;
  const last = path.split("/").filter(Boolean).pop() ?? "";
  return `/projects/${slug}/${kind}/${last}`;
}

function TagList({ tags, slug }: { tags: Array<PostTag & { name?: string }>; slug: string }) {
  if (tags.length === 0) return null;
  return (
    <ul className="flex flex-wrap gap-1.5" aria-label="Topics">
      {tags.map((t) => (
        <li key={`${t.kind}:${t.value}`}>
          <Link to={`/projects/${slug}/updates?${tagFilter(t)}`} className="block border border-rule px-2 py-0.5 text-sm text-ink-soft hover:border-ink hover:text-ink">
            {tagWord(t)}
          </Link>
        </li>
      ))}
    </ul>
  );
}

function PostArticle({ post, slug, zone }: { post: PostDetail; slug: string; zone: string }) {
  const published = post.publishedAt ? dayOf(post.publishedAt, zone) : null;
  return (
    <article className="mx-auto max-w-3xl" data-testid="post-page">
      <header className="mt-6">
        <p className="flex flex-wrap items-center gap-2 text-sm text-ink-soft">
          {published ? <time dateTime={post.publishedAt ?? undefined}>{published}</time> : null}
          {post.authorName ? <span>· {post.authorName}</span> : null}
          <AudienceMark audience={post.audience} hidePublic />
        </p>
        <h1 className="mt-1 text-3xl font-semibold leading-tight tracking-tight sm:text-4xl">{post.title}</h1>
        {post.summary ? <p className="mt-3 font-serif text-xl leading-relaxed text-ink-soft">{post.summary}</p> : null}
      </header>
      {post.cover ? (
        <figure className="mt-6">
          <Picture picture={post.cover} eager sizes={POST_COVER_SIZES} />
          {post.cover.caption ? <figcaption className="mt-2 text-sm text-ink-soft">{post.cover.caption}</figcaption> : null}
        </figure>
      ) : null}
      <div className="mt-6">
        <PostBody html={post.html} images={post.images} milestones={post.milestones} publishedOn={published} />
      </div>
      {/* Each linked milestone once (decision 055): in the body where it names one, else here. */}
      <MilestonesThenNow milestones={post.milestones} publishedOn={published} inBody={milestoneIdsInBody(post.html)} />
      <footer className="mt-10 flex flex-col gap-4 border-t border-rule pt-4">
        <TagList tags={post.tags} slug={slug} />
        <p className="text-sm">
          <Link to={`/projects/${slug}/updates`} className="font-medium text-ink underline underline-offset-4">
            ← All updates
          </Link>
          <span className="mx-2 text-ink-faint">·</span>
          <a href={`/feed/${slug}.atom`} className="underline underline-offset-4">
            Follow by feed
          </a>
          <span className="mx-2 text-ink-faint">·</span>
          <Link to={`/projects/${slug}/subscribe`} className="underline underline-offset-4">
            Updates by e-mail
          </Link>
        </p>
      </footer>
    </article>
  );
}

/**
 * A published update or photo story under the project's masthead. An address the item left
 * (`asked`) leads to where it is now: the API follows an old slug to the item, and the address
 * bar should say the new one too.
 */
function PublishedItem<T extends { slug: string; title: string }>({
  slug,
  project,
  kind,
  asked,
  answer,
  article,
}: {
  /** The project's address as the page was asked for. */
  slug: string;
  project: Project;
  kind: "updates" | "stories";
  asked: string;
  answer: T | PostRedirect;
  article: (item: T) => ReactNode;
}) {
  const data = isRedirect(answer) ? null : answer;
  useTitle(data?.title, project.name);
  if (isRedirect(answer)) return <Navigate to={redirectTarget(slug, kind, answer.redirectTo)} replace />;
  if (data && data.slug !== asked) return <Navigate to={`/projects/${slug}/${kind}/${data.slug}`} replace />;
  return (
    <Frame>
      <ProjectMasthead slug={slug} projectName={project.name} operatorName={project.operatorName} />
      {data ? article(data) : null}
    </Frame>
  );
}

/** `/projects/:slug/updates/:postSlug`: one update, its photos responsive, its milestones then and now. */
export function PostPage() {
  const { slug = "", postSlug = "" } = useParams();
  const project = useSuspenseQuery(siteProjectQueryOptions(slug)).data;
  const post = useSuspenseQuery(updateQueryOptions(slug, postSlug)).data;
  return <PublishedItem slug={slug} project={project} kind="updates" asked={postSlug} answer={post} article={(p) => <PostArticle post={p} slug={slug} zone={project.timeZone} />} />;
}

function photoMeta(p: Pick<MediaPicture, "takenAt" | "credit" | "isIllustration">, extra: string[] = []): string {
  const parts = [...extra];
  const on = capturedOn(p.takenAt);
  if (on) parts.push(`${p.isIllustration ? "Dated" : "Taken"} ${on}`);
  if (p.isIllustration) parts.push("Illustration");
  if (p.credit) parts.push(`Credit: ${p.credit}`);
  return parts.join(" · ");
}

/** `/projects/:slug/gallery`: the cleared photos of published content, by area, system and month. */
export function GalleryPage() {
  const { slug = "" } = useParams();
  const [params, setParams] = useSearchParams();
  const filters = galleryFiltersOf(params);
  const project = useSuspenseQuery(siteProjectQueryOptions(slug));
  const gallery = useSuspenseQuery(galleryQueryOptions(slug, filters));
  const [open, setOpen] = useState<number | null>(null);
  useTitle("Gallery", project.data.name);

  const set = (k: keyof GalleryFilters, v: string) =>
    setParams((prev) => {
      const u = new URLSearchParams(prev);
      if (v) u.set(k, v);
      else u.delete(k);
      return u;
    });

  const items = gallery.data.items;
  const lightboxItems: LightboxItem[] = items.map((p) => ({
    picture: p,
    caption: p.caption || p.altText,
    meta: photoMeta(p, p.areas.length ? [p.areas.join(", ")] : []),
  }));

  const g = gallery.data;
  const about = facilityFilterName(filters, items.map((p) => (p as GalleryPhoto & { facilityTags?: Array<{ kind: string; id: number; name: string }> }).facilityTags ?? []));
  return (
    <Frame wide>
      <ProjectMasthead slug={slug} projectName={project.data.name} operatorName={project.data.operatorName} />
      <h1 className="mt-6 text-3xl font-semibold tracking-tight">{about ? `Photographs of ${about}` : "Photographs from the site"}</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">Photos published with the updates and photo stories, cleared for the public. Some are illustrations, marked as such in their captions.</p>
      {about ? (
        <p className="mt-2 text-sm">
          <button type="button" className="underline underline-offset-4" onClick={() => set(filters.block ? "block" : "plant", "")}>
            Show every photograph
          </button>
        </p>
      ) : null}
      <SitePlanSection slug={slug} heading="Photographs by area" selected={filters.area ?? null} className="mt-6" />
      <div className="mt-6 grid gap-3 border border-rule bg-sheet p-4 sm:grid-cols-3">
        <SelectField label="Area" value={filters.area ?? ""} onChange={(e) => set("area", e.target.value)} options={[{ value: "", label: "All areas" }, ...g.areas.map((a) => ({ value: a, label: a }))]} />
        <SelectField
          label="System"
          value={filters.system ?? ""}
          onChange={(e) => set("system", e.target.value)}
          options={[{ value: "", label: "All systems" }, ...g.systems.map((s) => ({ value: s, label: tagWord({ kind: "system", value: s }) }))]}
        />
        <SelectField label="Month" value={filters.month ?? ""} onChange={(e) => set("month", e.target.value)} options={[{ value: "", label: "Any month" }, ...g.months.map((m) => ({ value: m, label: monthWords(m) }))]} />
      </div>
      {items.length > 0 ? (
        <PressKitLink slug={slug} operatorName={project.data.operatorName} of={{ area: filters.area }} what={filters.area ? `every public photograph of ${filters.area}` : "every public photograph of the gallery"} className="mt-3" />
      ) : null}
      <div className="mt-6">
        {items.length === 0 ? (
          <p className="text-ink-soft">No published photograph matches these choices.</p>
        ) : (
          // One grid, newest first, as many columns as fit (decision 055): each photo carries its own
          // date, so month headings would only break the rows into part-empty ones.
          <ul className="grid grid-cols-2 gap-x-3 gap-y-5 sm:grid-cols-[repeat(auto-fill,minmax(14rem,1fr))]" data-testid="gallery-grid">
            {items.map((photo, index) => (
              <li key={photo.id}>
                <GalleryThumb photo={photo} onOpen={() => setOpen(index)} />
              </li>
            ))}
          </ul>
        )}
      </div>
      <Lightbox items={lightboxItems} index={open} onIndexChange={setOpen} label="Site photograph" />
    </Frame>
  );
}

function PairItem({ item, sizes, eager }: { item: Extract<StoryItem, { kind: "pair" }>; sizes: string; eager: boolean }) {
  if (!item.before || !item.after) return null;
  const thenOn = capturedOn(item.before.takenAt);
  const nowOn = capturedOn(item.after.takenAt);
  return (
    <figure data-testid="story-pair">
      <CompareSlider
        before={item.before}
        after={item.after}
        beforeLabel={`Then${thenOn ? ` · ${thenOn}` : ""}`}
        afterLabel={`Now${nowOn ? ` · ${nowOn}` : ""}`}
        label={`${item.area}: drag to compare ${thenOn ?? "the earlier photo"} with ${nowOn ?? "the later one"}`}
        sizes={sizes}
        eager={eager}
      />
      <figcaption className="mt-2 text-sm text-ink-soft">
        <span className="font-semibold text-ink">{item.area}</span>
        {thenOn && nowOn ? ` · ${thenOn} and ${nowOn}` : ""}
        {item.caption ? <span className="mt-1 block font-serif text-base text-ink">{item.caption}</span> : null}
        <span className="mt-1 block text-xs">Drag the divider, or focus it and use the arrow keys, to compare.</span>
      </figcaption>
    </figure>
  );
}

function StoryArticle({ story, slug, zone, operatorName }: { story: StoryDetail; slug: string; zone: string; operatorName: string }) {
  const [open, setOpen] = useState<number | null>(null);
  const photos = story.items.flatMap((it) => (it.kind === "photo" && it.media ? [{ media: it.media, caption: it.caption }] : []));
  const lightbox: LightboxItem[] = photos.map((p) => ({ picture: p.media, caption: p.caption || p.media.caption, meta: photoMeta(p.media) }));
  const sizes = "(min-width: 800px) 768px, calc(100vw - 2rem)";
  let photoIndex = -1;
  return (
    <article className="mx-auto max-w-3xl" data-testid="story-page">
      <header className="mt-6">
        <p className="flex flex-wrap items-center gap-2 text-sm text-ink-soft">
          <span className="label-caps">Photo story</span>
          {story.publishedAt ? <time dateTime={story.publishedAt}>{dayOf(story.publishedAt, zone)}</time> : null}
          <AudienceMark audience={story.audience} hidePublic />
        </p>
        <h1 className="mt-1 text-3xl font-semibold leading-tight tracking-tight sm:text-4xl">{story.title}</h1>
        {story.intro ? <p className="mt-3 whitespace-pre-line font-serif text-xl leading-relaxed text-ink-soft">{story.intro}</p> : null}
      </header>
      <ol className="mt-8 flex flex-col gap-10">
        {story.items.map((it, i) => {
          if (it.kind === "pair") {
            return (
              <li key={`pair-${i}`}>
                <PairItem item={it} sizes={sizes} eager={i === 0} />
              </li>
            );
          }
          if (!it.media) return null;
          photoIndex += 1;
          const at = photoIndex;
          const media: MediaPicture = it.media;
          const meta = photoMeta(media);
          return (
            <li key={`photo-${i}`}>
              <figure>
                <button type="button" className="block w-full cursor-zoom-in" onClick={() => setOpen(at)} aria-label={`Enlarge: ${media.altText || it.caption || "photo"}`} data-testid="story-photo">
                  <Picture picture={media} eager={i === 0} sizes={sizes} />
                </button>
                <figcaption className="mt-2 text-sm text-ink-soft">
                  {it.caption ? <span className="block font-serif text-base text-ink">{it.caption}</span> : null}
                  {meta ? <span className="block text-xs">{meta}</span> : null}
                </figcaption>
              </figure>
            </li>
          );
        })}
      </ol>
      {story.audience === "public" ? <PressKitLink slug={slug} operatorName={operatorName} of={{ story: story.slug }} what="the story's photographs" className="mt-10" /> : null}
      <p className="mt-10 border-t border-rule pt-4 text-sm">
        <Link to={`/projects/${slug}/gallery`} className="font-medium text-ink underline underline-offset-4">
          More photographs in the gallery →
        </Link>
      </p>
      <Lightbox items={lightbox} index={open} onIndexChange={setOpen} label="Photo" />
    </article>
  );
}

/** `/projects/:slug/stories/:storySlug`: a photo story, then-and-now pairs as comparison sliders. */
export function StoryPage() {
  const { slug = "", storySlug = "" } = useParams();
  const project = useSuspenseQuery(siteProjectQueryOptions(slug)).data;
  const story = useSuspenseQuery(storyQueryOptions(slug, storySlug)).data;
  return <PublishedItem slug={slug} project={project} kind="stories" asked={storySlug} answer={story} article={(s) => <StoryArticle story={s} slug={slug} zone={project.timeZone} operatorName={project.operatorName} />} />;
}
