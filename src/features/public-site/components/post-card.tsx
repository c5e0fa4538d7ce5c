import { Link } from "react-router-dom";
import type { PostSummary } from "#shared/schemas/posts.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Picture } from "../../../components/ui/picture.tsx";
import { dayOf, tagWord } from "../words.ts";

/** One update in a list: cover, date, title, summary; investors' posts marked as such. */
export function PostCard({ post, projectSlug, timeZone, compact = false }: { post: PostSummary; projectSlug: string; timeZone: string; compact?: boolean }) {
  const href = `/projects/${projectSlug}/updates/${post.slug}`;
  return (
    <article className={`grid gap-4 border-b border-rule pb-6 last:border-b-0 ${compact ? "" : "sm:grid-cols-[14rem_1fr]"}`} data-testid="post-card" data-audience={post.audience}>
      {post.cover && !compact ? (
        <Link to={href} tabIndex={-1} aria-hidden className="block overflow-hidden border border-rule">
          <Picture picture={post.cover} alt="" fit="cover" aspect={3 / 2} sizes="(min-width: 640px) 14rem, calc(100vw - 2rem)" />
        </Link>
      ) : null}
      <div className="min-w-0">
        <p className="flex flex-wrap items-center gap-2 text-sm text-ink-soft">
          <time dateTime={post.publishedAt ?? undefined}>{dayOf(post.publishedAt, timeZone)}</time>
          <AudienceMark audience={post.audience} hidePublic />
        </p>
        <h3 className={`mt-1 font-semibold leading-snug ${compact ? "text-lg" : "text-xl"}`}>
          <Link to={href} className="underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
            {post.title}
          </Link>
        </h3>
        {post.summary ? <p className="mt-1 line-clamp-3 font-serif text-ink-soft">{post.summary}</p> : null}
        {post.tags.length > 0 && !compact ? (
          <ul className="mt-2 flex flex-wrap gap-1.5" aria-label="Tags">
            {post.tags.map((t) => (
              <li key={`${t.kind}:${t.value}`} className="border border-rule px-1.5 py-0.5 text-xs text-ink-soft">
                {tagWord(t)}
              </li>
            ))}
          </ul>
        ) : null}
      </div>
    </article>
  );
}
