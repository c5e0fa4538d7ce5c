import { useSuspenseQuery } from "@tanstack/react-query";
import { useState } from "react";
import { useSearchParams } from "react-router-dom";
import { SensitivitySchema, type MediaItem } from "#shared/schemas/media.ts";
import { SystemSchema } from "#shared/schemas/programme.ts";
import { Button, ButtonLink } from "../../components/ui/button.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { Notice, PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { pageFromParams, UrlPager } from "../../components/ui/pager.tsx";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { NoProjectNotice, OfficeProjectPage } from "../../lib/office-page.tsx";
import { officeProjectSlug } from "../../lib/projects.ts";
import { meQueryOptions } from "../../lib/session.ts";
import { canReview, LIBRARY_PAGE_SIZE, mediaListQueryOptions, mediaProjectsQueryOptions, reviewQueueQueryOptions, vocabularyQueryOptions, type LibraryFilters } from "./api.ts";
import { BulkTagBar } from "./components/bulk-tag-bar.tsx";
import { PressKitBar } from "./components/press-kit-bar.tsx";
import { EditPanel } from "./components/edit-panel.tsx";
import { LibraryFiltersForm } from "./components/library-filters.tsx";
import { MediaGrid } from "./components/media-grid.tsx";
import { ReviewQueue } from "./components/review-queue.tsx";
import { ThenAndNowList } from "./components/then-and-now-list.tsx";
import { UploadPanel } from "./components/upload-panel.tsx";

/** The project the library shows: `?project=` or the first one (the server's default too). */
function useProjectSlug() {
  const [params, setParams] = useSearchParams();
  const projects = useSuspenseQuery(mediaProjectsQueryOptions()).data;
  const slug = params.get("project") ?? projects[0]?.slug ?? "";
  const choices = projects.map((p) => ({ value: p.slug, label: p.name }));
  const setSlug = (s: string) => setParams(new URLSearchParams({ project: s }));
  return { slug, choices, setSlug, params, setParams };
}

const bool = (v: string | null) => (v === "true" ? true : undefined);

function filtersFrom(params: URLSearchParams): LibraryFilters {
  const system = params.get("system");
  const sensitivity = params.get("sensitivity");
  const milestone = Number(params.get("milestone"));
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
    page: pageFromParams(params),
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

/** Primes the project's words for the pickers and the page of photos the address asks for. */
export const mediaLibraryLoader: RouteLoader = (qc) => ({ request }) =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const search = new URL(request.url).searchParams;
    const slug = await officeProjectSlug(qc, mediaProjectsQueryOptions(), search);
    if (slug) await Promise.all([qc.ensureQueryData(vocabularyQueryOptions(slug)), qc.ensureQueryData(mediaListQueryOptions(slug, filtersFrom(search)))]);
  });

/** Primes the review queue for the leads and administrators who decide on it. */
export const mediaReviewLoader: RouteLoader = (qc) => ({ request }) =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const slug = await officeProjectSlug(qc, mediaProjectsQueryOptions(), new URL(request.url).searchParams);
    if (slug && canReview(await qc.ensureQueryData(meQueryOptions()))) await qc.ensureQueryData(reviewQueueQueryOptions(slug));
  });

function Library({ slug, filters, setFilters }: { slug: string; filters: LibraryFilters; setFilters: (f: LibraryFilters) => void }) {
  const vocabulary = useSuspenseQuery(vocabularyQueryOptions(slug)).data;
  const list = useSuspenseQuery(mediaListQueryOptions(slug, filters)).data;
  const [selected, setSelected] = useState<Set<number>>(new Set());
  // The photo being edited, as the grid showed it when it was opened.
  const [openItem, setOpen] = useState<MediaItem | null>(null);
  const items = list.items;

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
        <UploadPanel slug={slug} vocabulary={vocabulary} />
      </Sheet>
      <Sheet label="Library" title="Find photos">
        <LibraryFiltersForm filters={filters} onChange={setFilters} vocabulary={vocabulary} />
      </Sheet>
      <ThenAndNowList slug={slug} />
      {selected.size > 0 ? <BulkTagBar slug={slug} ids={[...selected]} vocabulary={vocabulary} onDone={() => undefined} onClear={() => setSelected(new Set())} /> : null}
      {selected.size > 0 ? <PressKitBar slug={slug} ids={[...selected]} /> : null}
      <div className={`grid gap-4 ${openItem ? "lg:grid-cols-[minmax(0,1fr)_26rem]" : ""}`}>
        <section aria-labelledby="media-grid-h" className="min-w-0">
          <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
            <h2 id="media-grid-h" className="text-lg font-semibold">
              Photos{" "}
              <span className="tabular text-sm font-normal text-ink-soft">
                ({list.total} {list.total === 1 ? "photo" : "photos"})
              </span>
            </h2>
            {items.length > 0 ? (
              <Button size="sm" variant="ghost" onClick={() => setSelected((s) => (allOnPage ? new Set([...s].filter((id) => !items.some((i) => i.id === id))) : new Set([...s, ...items.map((i) => i.id)])))}>
                {allOnPage ? "Unselect this page" : "Select this page"}
              </Button>
            ) : null}
          </div>
          {items.length === 0 ? (
            <Notice>No photos match. Upload some, or change the filters.</Notice>
          ) : (
            <MediaGrid items={items} selected={selected} onToggle={toggle} onOpen={(id) => setOpen(items.find((i) => i.id === id) ?? null)} />
          )}
          <UrlPager total={list.total} pageSize={LIBRARY_PAGE_SIZE} label="Pages of photos" previous="← Newer" next="Older →" />
        </section>
        {openItem ? <EditPanel key={openItem.id} shown={openItem} slug={slug} vocabulary={vocabulary} onClose={() => setOpen(null)} /> : null}
      </div>
    </div>
  );
}

/** Site office › Media: upload, find, tag and edit the project's photos. */
export function MediaLibraryPage() {
  const project = useProjectSlug();
  const me = useSuspenseQuery(meQueryOptions()).data;
  const filters = filtersFrom(project.params);
  return (
    <OfficeProjectPage
      project={project}
      pickerClassName="mb-4 w-full sm:w-72"
      sheet="Site office · Media"
      title="Media library"
      description="Site photos for updates and photo stories. Location data is stripped from everything published; a project lead clears each photo before it can appear outside the site office."
      actions={
        canReview(me) && project.slug ? (
          <>
            <ButtonLink to={`/office/media/review?project=${project.slug}`}>
              Review queue
            </ButtonLink>
            <ButtonLink to={`/office/media/hero?project=${project.slug}`}>
              Hero photograph
            </ButtonLink>
          </>
        ) : null
      }
    >
      {(slug) => <Library slug={slug} filters={filters} setFilters={(f) => project.setParams(toParams(slug, f))} />}
    </OfficeProjectPage>
  );
}

function Queue({ slug }: { slug: string }) {
  const queue = useSuspenseQuery(reviewQueueQueryOptions(slug)).data;
  return <ReviewQueue items={queue} slug={slug} />;
}

/** Site office › Media › Review: leads clear or restrict unreviewed photos. */
export function MediaReviewPage() {
  const { slug, choices, setSlug } = useProjectSlug();
  const me = useSuspenseQuery(meQueryOptions()).data;
  return (
    <>
      <PageHeader
        sheet="Site office · Media"
        title="Photo review"
        description="Only cleared photos can appear in public or investor content. Restricted photos stay in the site office."
        actions={
          <ButtonLink to={`/office/media${slug ? `?project=${slug}` : ""}`}>
            Back to the library
          </ButtonLink>
        }
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className="mb-4 w-full sm:w-72" />
      {!canReview(me) ? (
        <Notice>The review queue is for project leads and administrators, who decide what may be published.</Notice>
      ) : slug ? (
        <Queue key={slug} slug={slug} />
      ) : (
        <NoProjectNotice />
      )}
    </>
  );
}
