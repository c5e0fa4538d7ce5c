import { Link } from "react-router-dom";
import type { MediaPicture } from "#shared/schemas/posts.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Picture } from "../../../components/ui/picture.tsx";
import { Spinner } from "../../../components/ui/sheet.tsx";
import { useStories, useUpdates } from "../api.ts";
import { dayOf } from "../words.ts";
import { PostCard } from "./post-card.tsx";

/** The newest published updates of a project, for its home page. */
export function LatestUpdates({ slug, timeZone, count = 3 }: { slug: string; timeZone: string; count?: number }) {
  const updates = useUpdates(slug);
  if (updates.isPending) return <Spinner label="Loading updates" />;
  if (updates.isError) return null;
  const items = updates.data.items.slice(0, count);
  return (
    <section aria-labelledby="latest-updates">
      <div className="flex flex-wrap items-baseline justify-between gap-2 border-b-2 border-ink pb-2">
        <h2 id="latest-updates" className="text-xl font-semibold">
          Latest updates
        </h2>
        <Link to={`/projects/${slug}/updates`} className="text-sm font-medium text-ink underline underline-offset-4">
          {updates.data.total > items.length ? `All ${updates.data.total} updates →` : "All updates →"}
        </Link>
      </div>
      {items.length === 0 ? (
        <p className="mt-4 text-ink-soft">No updates have been published yet.</p>
      ) : (
        <div className="mt-4 flex flex-col gap-6">
          {items.map((p) => (
            <PostCard key={p.id} post={p} projectSlug={slug} timeZone={timeZone} />
          ))}
        </div>
      )}
    </section>
  );
}

/**
 * The photo at the head of a project's page: the cover of its newest published update
 * (the one the operator chose most recently to show the site).
 */
export function useHeroPhoto(slug: string): { picture: MediaPicture | null; pending: boolean } {
  const updates = useUpdates(slug);
  const withCover = updates.data?.items.find((p) => p.cover && p.audience === "public") ?? updates.data?.items.find((p) => p.cover);
  return { picture: withCover?.cover ?? null, pending: updates.isPending };
}

/** The hero photo in a fixed-ratio box, so the page below never jumps while it loads. */
export function HeroPhoto({ slug }: { slug: string }) {
  const hero = useHeroPhoto(slug);
  if (!hero.pending && !hero.picture) return null;
  return (
    <figure className="mt-6">
      <div className="overflow-hidden border border-rule bg-rule" style={{ aspectRatio: "21 / 9", backgroundColor: hero.picture?.dominantColor ?? undefined }}>
        {hero.picture ? <Picture picture={hero.picture} eager fit="cover" aspect={21 / 9} sizes="(min-width: 1024px) 992px, 100vw" className="h-full" /> : null}
      </div>
      {hero.picture?.caption || hero.picture?.isIllustration ? (
        <figcaption className="mt-2 text-sm text-ink-soft">
          {hero.picture.caption}
          {/* The crop can cut off the mark drawn on an illustration, so it is said here too. */}
          {hero.picture.isIllustration ? <span className="ml-2 border border-rule-strong px-1 text-xs font-semibold uppercase tracking-wide">Illustration</span> : null}
        </figcaption>
      ) : null}
    </figure>
  );
}

/** The project's published photo stories, newest first. */
export function StoryList({ slug, timeZone }: { slug: string; timeZone: string }) {
  const stories = useStories(slug);
  const published = (stories.data ?? []).filter((s) => s.status === "published");
  if (published.length === 0) return null;
  return (
    <section aria-labelledby="photo-stories">
      <h2 id="photo-stories" className="border-b-2 border-ink pb-2 text-xl font-semibold">
        Photo stories
      </h2>
      <ul className="mt-4 grid gap-4 sm:grid-cols-2">
        {published.map((s) => (
          <li key={s.id} className="border border-rule bg-sheet" data-testid="story-card">
            <Link to={`/projects/${slug}/stories/${s.slug}`} className="block hover:bg-paper">
              {s.cover ? <Picture picture={s.cover} alt="" fit="cover" aspect={16 / 9} sizes="(min-width: 640px) 480px, 100vw" /> : null}
              <div className="p-4">
                <p className="flex flex-wrap items-center gap-2 text-sm text-ink-soft">
                  {s.publishedAt ? <time dateTime={s.publishedAt}>{dayOf(s.publishedAt, timeZone)}</time> : null}
                  <span>· {s.itemCount} {s.itemCount === 1 ? "picture" : "pictures"}</span>
                  <AudienceMark audience={s.audience} hidePublic />
                </p>
                <h3 className="mt-1 text-lg font-semibold">{s.title}</h3>
                {s.intro ? <p className="mt-1 line-clamp-2 font-serif text-ink-soft">{s.intro}</p> : null}
              </div>
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}
