import { useSuspenseQuery } from "@tanstack/react-query";
import { getCoreRowModel, useReactTable, type ColumnDef } from "@tanstack/react-table";
import { useEffect, useMemo, useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { AudienceSchema, type Audience } from "#shared/schemas/common.ts";
import { POSTS_PAGE_SIZE, type PostSummary } from "#shared/schemas/posts.ts";
import { PostStatusSchema, type PostStatus } from "#shared/schemas/publishing.ts";
import { AudienceMark } from "../../components/ui/audience-mark.tsx";
import { Button, PrimaryLink } from "../../components/ui/button.tsx";
import { DataTable } from "../../components/ui/data-table.tsx";
import { SelectField, TextField } from "../../components/ui/field.tsx";
import { PublishStatusMark, PUBLISH_STATUS_WORD } from "../../components/ui/publish-status.tsx";
import { Pager } from "../../components/ui/pager.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { PageHeader } from "../../components/ui/sheet.tsx";
import { pageCount } from "../../lib/api-client.ts";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { NoProjectNotice } from "../../lib/office-page.tsx";
import { officeProjectSlug, useProjectParam } from "../../lib/projects.ts";
import { publishingWhen } from "../../lib/publishing.ts";
import { AUDIENCE_WORD } from "../../lib/words.ts";
import { postListQueryOptions, postsProjectQueryOptions, postsProjectsQueryOptions, type PostListFilters } from "./api.ts";
import { onSubmitted } from "../../lib/forms.ts";

/** The project the site office is working on: `?project=` or the first one. */
export function useOfficeProject() {
  return useProjectParam(useSuspenseQuery(postsProjectsQueryOptions()).data);
}

function filtersOf(params: URLSearchParams): PostListFilters {
  return {
    status: (PostStatusSchema.safeParse(params.get("status")).data ?? undefined) as PostStatus | undefined,
    audience: (params.get("audience") || undefined) as Audience | undefined,
    q: params.get("q") || undefined,
    page: Math.max(1, Number(params.get("page")) || 1),
  };
}

export const postsLoader: RouteLoader = (qc) => ({ request }) =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const search = new URL(request.url).searchParams;
    const slug = await officeProjectSlug(qc, postsProjectsQueryOptions(), search);
    if (slug) await Promise.all([qc.ensureQueryData(postsProjectQueryOptions(slug)), qc.ensureQueryData(postListQueryOptions(slug, filtersOf(search)))]);
  });

const AUDIENCE_CHOICES = [
  { value: "", label: "Any audience" },
  ...AudienceSchema.options.map((a) => ({ value: a, label: AUDIENCE_WORD[a] })),
];

/** `/office/updates`: every update of the project by state, with filters. */
export function PostsPage() {
  const office = useOfficeProject();
  if (!office.slug) {
    return (
      <>
        <PageHeader sheet="Site office · Updates" title="Updates" description="Write what changed on site; a lead reviews and publishes it. Every save keeps a revision." />
        <NoProjectNotice />
      </>
    );
  }
  return <ProjectPosts {...office} />;
}

function ProjectPosts({ slug, choices, setSlug }: ReturnType<typeof useOfficeProject>) {
  const [params, setParams] = useSearchParams();
  const { status, audience, q, page = 1 } = filtersOf(params);
  const [draftQ, setDraftQ] = useState(q ?? "");
  useEffect(() => setDraftQ(q ?? ""), [q]);
  const project = useSuspenseQuery(postsProjectQueryOptions(slug)).data;
  const zone = project.timeZone;
  const list = useSuspenseQuery(postListQueryOptions(slug, { status, audience, q, page })).data;

  const set = (next: Record<string, string | undefined>) =>
    setParams((prev) => {
      const u = new URLSearchParams(prev);
      for (const [k, v] of Object.entries(next)) if (v) u.set(k, v);
      else u.delete(k);
      if (!("page" in next)) u.delete("page");
      return u;
    });

  const columns = useMemo<ColumnDef<PostSummary>[]>(
    () => [
      {
        id: "title",
        header: "Update",
        cell: ({ row }) => (
          <div className="min-w-56">
            <Link to={`/office/updates/${row.original.id}`} className="font-medium underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
              {row.original.title}
            </Link>
            {row.original.summary ? <p className="line-clamp-1 text-xs text-ink-soft">{row.original.summary}</p> : null}
          </div>
        ),
      },
      { id: "status", header: "State", cell: ({ row }) => <PublishStatusMark status={row.original.status} /> },
      { id: "audience", header: "Audience", cell: ({ row }) => <AudienceMark audience={row.original.audience} /> },
      { id: "author", header: "Written by", cell: ({ row }) => row.original.authorName },
      { id: "when", header: "When", cell: ({ row }) => <span className="whitespace-nowrap text-ink-soft">{publishingWhen(row.original, zone)}</span> },
    ],
    [zone],
  );
  const table = useReactTable({ data: list.items, columns, getCoreRowModel: getCoreRowModel() });
  const total = list.total;
  const pages = pageCount(total, POSTS_PAGE_SIZE);
  const tabs: Array<{ value: PostStatus | undefined; label: string }> = [{ value: undefined, label: "All" }, ...PostStatusSchema.options.map((s) => ({ value: s, label: PUBLISH_STATUS_WORD[s] }))];

  return (
    <>
      <PageHeader
        sheet="Site office · Updates"
        title="Updates"
        description="Write what changed on site; a lead reviews and publishes it. Every save keeps a revision."
        actions={<PrimaryLink to={`/office/updates/new?project=${slug}`}>New update</PrimaryLink>}
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} />
      <div role="group" aria-label="Show updates by state" className="mb-4 flex flex-wrap gap-1 border-b border-rule">
        {tabs.map((t) => (
          <button
            key={t.label}
            type="button"
            aria-pressed={status === t.value}
            onClick={() => set({ status: t.value })}
            className={`-mb-px border-b-2 px-3 py-2 text-sm ${status === t.value ? "border-ink font-semibold" : "border-transparent text-ink-soft hover:text-ink"}`}
          >
            {t.value ? <PublishStatusMark status={t.value} className={status === t.value ? "" : "font-normal"} /> : t.label}
          </button>
        ))}
      </div>
      <div className="mb-4 flex flex-wrap items-end gap-3">
        <form
          className="flex min-w-60 flex-1 items-end gap-2"
          onSubmit={onSubmitted(() => set({ q: draftQ.trim() || undefined }))}
        >
          <div className="flex-1">
            <TextField label="Search titles and text" type="search" value={draftQ} onChange={(e) => setDraftQ(e.target.value)} />
          </div>
          <Button type="submit">Search</Button>
        </form>
        <div className="w-48">
          <SelectField label="Audience" value={audience ?? ""} onChange={(e) => set({ audience: e.target.value || undefined })} options={AUDIENCE_CHOICES} />
        </div>
      </div>
      <DataTable table={table} caption="Updates" empty="No update matches." />
      {pages > 1 ? (
        <Pager page={page} pages={pages} onPage={(n) => set({ page: String(n) })} previous="← Newer" next="Older →" summary={` · ${total} updates`} />
      ) : (
        <p className="mt-2 text-sm text-ink-soft tabular">{total === 1 ? "1 update" : `${total} updates`}</p>
      )}
    </>
  );
}
