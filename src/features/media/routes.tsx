import { useMemo, useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { SensitivitySchema } from "#shared/schemas/media.ts";
import { SystemSchema } from "#shared/schemas/programme.ts";
import { Button } from "../../components/ui/button.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { useMe } from "../../lib/session.ts";
import { canReview, LIBRARY_PAGE_SIZE, useMediaList, useMediaProjects, useReviewQueue, useVocabulary, type LibraryFilters } from "./api.ts";
import { BulkTagBar } from "./components/bulk-tag-bar.tsx";
import { EditPanel } from "./components/edit-panel.tsx";
import { LibraryFiltersForm } from "./components/library-filters.tsx";
import { MediaGrid } from "./components/media-grid.tsx";
import { ReviewQueue } from "./components/review-queue.tsx";
import { UploadPanel } from "./components/upload-panel.tsx";

/** The project the library shows: `?project=` or the first one (the server's default too). */
function useProjectSlug() {
  const [params, setParams] = useSearchParams();
  const projects = useMediaProjects();
  const slug = params.get("project") ?? projects.data?.[0]?.slug ?? "";
  const choices = (projects.data ?? []).map((p) => ({ value: p.slug, label: p.name }));
  const setSlug = (s: string) => setParams(new URLSearchParams({ project: s }));
  return { slug, pending: projects.isPending, choices, setSlug, params, setParams };
}

const bool = (v: string | null) => (v === "true" ? true : undefined);

function filtersFrom(params: URLSearchParams): LibraryFilters {
  const system = params.get("system");
  const sensitivity = params.get("sensitivity");
  const milestone = Number(params.get("milestone"));
  const page = Number(params.get("page"));
  return {
    q: params.get("q") || undefined,
    area: params.get("area") || undefined,
    system: SystemSchema.safeParse(system).success ? (system as LibraryFilters["system"]) : undefined,
    milestone: Number.isInteger(milestone) && milestone > 0 ? milestone : undefined,
    takenFrom: params.get("takenFrom") || undefined,
    takenTo: params.get("takenTo") || undefined,
    sensitivity: SensitivitySchema.safeParse(sensitivity).success ? (sensitivity as LibraryFilters["sensitivity"]) : undefined,
    missingAlt: bool(params.get("missingAlt")),
    flagged: bool(params.get("flagged")),
    page: Number.isInteger(page) && page > 1 ? page : 1,
  };
}

function toParams(slug: string, f: LibraryFilters): URLSearchParams {
  const p = new URLSearchParams({ project: slug });
  for (const [k, v] of Object.entries(f)) {
    if (v === undefined || v === "" || v === false || (k === "page" && v === 1)) continue;
    p.set(k, String(v));
  }
  return p;
}

function Library({ slug, filters, setFilters }: { slug: string; filters: LibraryFilters; setFilters: (f: LibraryFilters) => void }) {
  const vocabulary = useVocabulary(slug);
  const list = useMediaList(slug, filters);
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [open, setOpen] = useState<number | null>(null);
  const items = useMemo(() => list.data?.items ?? [], [list.data]);
  const pages = list.data ? Math.max(1, Math.ceil(list.data.total / LIBRARY_PAGE_SIZE)) : 1;
  const page = filters.page ?? 1;

  if (vocabulary.isPending) return <Spinner label="Loading the library" />;
  if (vocabulary.isError) return <Notice tone="error">{vocabulary.error.message}</Notice>;
  const toggle = (id: number) =>
    setSelected((s) => {
      const next = new Set(s);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });
  const allOnPage = items.length > 0 && items.every((i) => selected.has(i.id));

  return (
    <div className="flex flex-col gap-6">
      <Sheet label="Upload" title="Add photos">
        <UploadPanel slug={slug} vocabulary={vocabulary.data} />
      </Sheet>
      <Sheet label="Library" title="Find photos">
        <LibraryFiltersForm filters={filters} onChange={setFilters} vocabulary={vocabulary.data} />
      </Sheet>
      {selected.size > 0 ? <BulkTagBar slug={slug} ids={[...selected]} vocabulary={vocabulary.data} onDone={() => undefined} onClear={() => setSelected(new Set())} /> : null}
      <div className={`grid gap-4 ${open ? "lg:grid-cols-[minmax(0,1fr)_26rem]" : ""}`}>
        <section aria-labelledby="media-grid-h" className="min-w-0">
          <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
            <h2 id="media-grid-h" className="text-lg font-semibold">
              Photos{" "}
              {list.data ? (
                <span className="tabular text-sm font-normal text-ink-soft">
                  ({list.data.total} {list.data.total === 1 ? "photo" : "photos"})
                </span>
              ) : null}
            </h2>
            {items.length > 0 ? (
              <Button size="sm" variant="ghost" onClick={() => setSelected((s) => (allOnPage ? new Set([...s].filter((id) => !items.some((i) => i.id === id))) : new Set([...s, ...items.map((i) => i.id)])))}>
                {allOnPage ? "Unselect this page" : "Select this page"}
              </Button>
            ) : null}
          </div>
          {list.isPending ? (
            <Spinner label="Loading photos" />
          ) : list.isError ? (
            <Notice tone="error">{list.error.message}</Notice>
          ) : items.length === 0 ? (
            <Notice>No photos match. Upload some, or change the filters.</Notice>
          ) : (
            <MediaGrid items={items} selected={selected} onToggle={toggle} onOpen={setOpen} />
          )}
          {pages > 1 ? (
            <nav aria-label="Pages" className="mt-4 flex items-center justify-between gap-2">
              <Button size="sm" disabled={page <= 1} onClick={() => setFilters({ ...filters, page: page - 1 })}>
                ← Newer
              </Button>
              <span className="tabular text-sm">
                Page {page} of {pages}
              </span>
              <Button size="sm" disabled={page >= pages} onClick={() => setFilters({ ...filters, page: page + 1 })}>
                Older →
              </Button>
            </nav>
          ) : null}
        </section>
        {open ? <EditPanel key={open} id={open} slug={slug} vocabulary={vocabulary.data} onClose={() => setOpen(null)} /> : null}
      </div>
    </div>
  );
}

/** Site office › Media: upload, find, tag and edit the project's photos. */
export function MediaLibraryPage() {
  const { slug, pending, choices, setSlug, params, setParams } = useProjectSlug();
  const me = useMe();
  const filters = filtersFrom(params);
  return (
    <>
      <PageHeader
        sheet="Site office · Media"
        title="Media library"
        description="Site photos for updates and photo stories. Location data is stripped from everything published; a project lead clears each photo before it can appear outside the site office."
        actions={
          canReview(me.data) && slug ? (
            <Link to={`/office/media/review?project=${slug}`} className="inline-flex items-center rounded-sm border border-ink bg-sheet px-4 py-2 text-[0.95rem] font-medium hover:bg-paper">
              Review queue
            </Link>
          ) : null
        }
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className="mb-4 w-full sm:w-72" />
      {pending ? <Spinner /> : slug ? <Library key={slug} slug={slug} filters={filters} setFilters={(f) => setParams(toParams(slug, f))} /> : <Notice>There is no project in this site office yet.</Notice>}
    </>
  );
}

function Queue({ slug }: { slug: string }) {
  const queue = useReviewQueue(slug);
  if (queue.isPending) return <Spinner label="Loading the review queue" />;
  if (queue.isError) return <Notice tone="error">{queue.error.message}</Notice>;
  return <ReviewQueue items={queue.data} slug={slug} />;
}

/** Site office › Media › Review: leads clear or restrict unreviewed photos. */
export function MediaReviewPage() {
  const { slug, pending, choices, setSlug } = useProjectSlug();
  const me = useMe();
  return (
    <>
      <PageHeader
        sheet="Site office · Media"
        title="Photo review"
        description="Only cleared photos can appear in public or investor content. Restricted photos stay in the site office."
        actions={
          <Link to={`/office/media${slug ? `?project=${slug}` : ""}`} className="inline-flex items-center rounded-sm border border-ink bg-sheet px-4 py-2 text-[0.95rem] font-medium hover:bg-paper">
            Back to the library
          </Link>
        }
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className="mb-4 w-full sm:w-72" />
      {me.isPending || pending ? (
        <Spinner />
      ) : !canReview(me.data) ? (
        <Notice>The review queue is for project leads and administrators, who decide what may be published.</Notice>
      ) : slug ? (
        <Queue key={slug} slug={slug} />
      ) : (
        <Notice>There is no project in this site office yet.</Notice>
      )}
    </>
  );
}
