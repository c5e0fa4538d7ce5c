import { useEffect, useState, type FormEvent, type ReactNode } from "react";
import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams, useSearchParams } from "react-router-dom";
import { SEARCH_KINDS, type SearchKind, type SearchResult } from "#shared/schemas/search.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { siteProjectQueryOptions } from "./api.ts";
import { ProjectMasthead } from "./components/project-nav.tsx";
import { SearchBox } from "./components/search-box.tsx";
import { searchQueryOptions } from "./search-api.ts";
import { useTitle } from "../../lib/use-title.ts";

/** Each kind's heading, in the order the groups are shown. */
const KIND_HEADINGS: Record<SearchKind, string> = {
  block: "Capacity blocks",
  system: "Plant",
  milestone: "Programme milestones",
  update: "Updates",
  story: "Photo stories",
};

const qOf = (params: URLSearchParams) => (params.get("q") ?? "").trim().slice(0, 200);

/** Primes the project for the masthead and, with `?q=`, the answer (a search a visitor was sent to paints at once). */
export const searchLoader: RouteLoader = (qc) => async ({ params, request }) => {
  const slug = params.slug ?? "";
  const q = qOf(new URL(request.url).searchParams);
  await Promise.all([qc.ensureQueryData(siteProjectQueryOptions(slug)), q ? qc.prefetchQuery(searchQueryOptions(slug, q)) : null]);
  return null;
};

const ENTITIES: Record<string, string> = { "&amp;": "&", "&lt;": "<", "&gt;": ">", "&quot;": '"', "&#39;": "'" };
const unescape = (s: string) => s.replace(/&(?:amp|lt|gt|quot|#39);/g, (e) => ENTITIES[e]!);

/**
 * A snippet as text with its matched words marked. The server escapes the text and marks with
 * `<mark>`; it is split here into React text, so nothing in it is ever read as markup.
 */
export function Snippet({ html }: { html: string }) {
  const parts: ReactNode[] = html.split(/<mark>(.*?)<\/mark>/g).map((part, i) => (i % 2 === 1 ? <mark key={i} className="bg-transparent font-semibold text-ink underline decoration-2 underline-offset-2">{unescape(part)}</mark> : unescape(part)));
  return <p className="mt-1 text-sm text-ink-soft [overflow-wrap:anywhere]">{parts}</p>;
}

/** The results grouped by kind (kinds in a fixed order; within a kind, best first). */
export function groupResults(results: readonly SearchResult[]): Array<[SearchKind, SearchResult[]]> {
  return SEARCH_KINDS.map((k): [SearchKind, SearchResult[]] => [k, results.filter((r) => r.kind === k)]).filter(([, list]) => list.length > 0);
}

function Results({ slug, q }: { slug: string; q: string }) {
  const answer = useQuery(searchQueryOptions(slug, q));
  if (answer.isPending) return <p className="min-h-24 text-ink-soft">Searching…</p>;
  if (answer.isError) return <p role="alert">The search could not be run just now. Try again in a moment.</p>;
  const { total, results } = answer.data;
  const groups = groupResults(results);
  return (
    <div>
      <p className="text-sm font-medium" aria-live="polite" data-testid="search-count">
        {total === 0 ? `Nothing matches “${q}”. Try a shorter word, or a code such as HD-1.` : `${total} ${total === 1 ? "result" : "results"} for “${q}”${total > results.length ? `, the best ${results.length} shown` : ""}`}
      </p>
      <div className="mt-4 flex flex-col gap-8">
        {groups.map(([kind, list]) => (
          <section key={kind} aria-labelledby={`results-${kind}`} data-testid={`search-group-${kind}`}>
            <h2 id={`results-${kind}`} className="label-caps mb-2">
              {KIND_HEADINGS[kind]} <span className="font-normal">({list.length})</span>
            </h2>
            <ul className="flex flex-col divide-y divide-rule border-y border-rule">
              {list.map((r) => (
                <li key={r.url} className="py-3" data-testid="search-result">
                  <Link to={r.url} className="inline-block min-h-6 font-semibold underline-offset-4 hover:underline [overflow-wrap:anywhere]">
                    {r.title}
                  </Link>
                  <Snippet html={r.snippet} />
                </li>
              ))}
            </ul>
          </section>
        ))}
      </div>
    </div>
  );
}

/** `/projects/:slug/search?q=…`: the project's updates, photo stories, milestones, capacity blocks and plant that match, by kind. */
export function SearchPage() {
  const { slug = "" } = useParams();
  const [params, setParams] = useSearchParams();
  const q = qOf(params);
  const [draft, setDraft] = useState(q);
  useEffect(() => setDraft(q), [q]);
  const project = useSuspenseQuery(siteProjectQueryOptions(slug));
  useTitle(q ? `“${q}” · Search` : "Search", project.data.name);
  const onSearch = (e: FormEvent) => {
    e.preventDefault();
    // The field's own value: words typed while a server-rendered page was still being taken over are in it, not yet in `draft`.
    const next = String(new FormData(e.currentTarget as HTMLFormElement).get("q") ?? draft).trim();
    setParams(next ? { q: next } : {});
  };
  return (
    <div className="mx-auto max-w-5xl px-4 py-8">
      <ProjectMasthead slug={slug} projectName={project.data.name} operatorName={project.data.operatorName} />
      <h1 className="mt-6 text-3xl font-semibold tracking-tight">Search this build</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">Updates, photo stories, programme milestones, capacity blocks and plant. Codes match exactly (HD-1, 2A, kW); a word also finds its plural and longer words it begins.</p>
      <SearchBox id="site-search" label="Words or codes" value={draft} onChange={setDraft} onSubmit={onSearch} placeholder="e.g. HD-1, chillers, Hall 2A" className="mt-6 border border-rule bg-sheet p-4" />
      <div className="mt-6">{q ? <Results slug={slug} q={q} /> : <p className="text-ink-soft">Type a word or a code to search the build.</p>}</div>
    </div>
  );
}
