import { useSuspenseQuery } from "@tanstack/react-query";
import { getCoreRowModel, useReactTable, type ColumnDef } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { Link, useNavigate } from "react-router-dom";
import { toast } from "sonner";
import { z } from "zod";
import type { User } from "#shared/schemas/auth.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { WorkflowAction } from "#shared/schemas/publishing.ts";
import { StoryCreateInputSchema, type StoryCreateInput, type StoryDetail, type StoryItemInput, type StoryPatchInput, type StorySummary } from "#shared/schemas/stories.ts";
import { AudienceMark } from "../../components/ui/audience-mark.tsx";
import { Button, PrimaryLink } from "../../components/ui/button.tsx";
import { DataTable } from "../../components/ui/data-table.tsx";
import { TextAreaField, TextField } from "../../components/ui/field.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { PublishStatusMark } from "../../components/ui/publish-status.tsx";
import { EditorShell } from "../../components/ui/editor-shell.tsx";
import { AudienceSheet } from "../../components/ui/publishing-editor.tsx";
import { PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { PressKitSheet } from "./components/press-kit-sheet.tsx";
import { NoProjectNotice, officePageLoader } from "../../lib/office-page.tsx";
import { useProjectParam } from "../../lib/projects.ts";
import { publishingEditorLoader, PublishingEditorRoute } from "../../lib/publishing-editor-route.tsx";
import { RevisionSheets } from "../../lib/publishing-panels.tsx";
import { ReviewLinksSheet } from "../../lib/review-links-panel.tsx";
import { editorStateOf, publishingProblemsOf, publishingWhen } from "../../lib/publishing.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { DraftAddressSchema, usePublishingDraft, WAITING_FOR } from "../../lib/use-publishing-draft.ts";
import { storyKeys, storiesProjectQueryOptions, storiesProjectsQueryOptions, storyListQueryOptions, storyQueryOptions, storyRevisionHooks, useCreateStory, useSaveStory, useStoryWorkflow } from "./api.ts";
import { StoryPhotoPicker } from "./components/photo-picker.tsx";
import { StoryItemsEditor, type EditItem, type PickTarget } from "./components/story-items.tsx";
import { ThenAndNowPanel } from "./components/then-and-now-panel.tsx";

/** The steps the stories API offers: the same workflow and rules as updates. */
const STORY_ACTIONS: readonly WorkflowAction[] = ["submit", "approve", "publish", "schedule", "return", "withdraw"];

/** Where the words for updates do not fit a photo story. */
const DONE: Partial<Record<WorkflowAction, string>> = { return: "Returned with your comments" };
const WAITING: Record<StoryDetail["status"], string> = { ...WAITING_FOR, published: "Published. A lead or an admin can withdraw it." };

/** The project the site office is working on: `?project=` or the first one. */
function useOfficeProject() {
  return useProjectParam(useSuspenseQuery(storiesProjectsQueryOptions()).data);
}

export const storiesLoader: RouteLoader = officePageLoader(storiesProjectsQueryOptions, (qc, slug) => Promise.all([qc.ensureQueryData(storiesProjectQueryOptions(slug)), qc.ensureQueryData(storyListQueryOptions(slug))]));

/** Primes who is signed in, the story (for `:id`) and its project. */
export const storyEditorLoader: RouteLoader = publishingEditorLoader(storyQueryOptions, storiesProjectsQueryOptions, (qc, slug) => qc.ensureQueryData(storiesProjectQueryOptions(slug)));

/** `/office/stories`: the project's photo stories by state. */
export function StoriesPage() {
  const office = useOfficeProject();
  if (!office.slug) {
    return (
      <>
        <PageHeader sheet="Site office · Photo stories" title="Photo stories" description={STORIES_PAGE_WORDS} />
        <NoProjectNotice />
      </>
    );
  }
  return <ProjectStories {...office} />;
}

const STORIES_PAGE_WORDS = "Curated sequences of site photos, including then-and-now pairs of one area. Published through the same review as updates.";

function ProjectStories({ slug, choices, setSlug }: ReturnType<typeof useOfficeProject>) {
  const list = useSuspenseQuery(storyListQueryOptions(slug)).data;
  const zone = useSuspenseQuery(storiesProjectQueryOptions(slug)).data.timeZone;
  const columns = useMemo<ColumnDef<StorySummary>[]>(
    () => [
      {
        id: "title",
        header: "Story",
        cell: ({ row }) => (
          <Link to={`/office/stories/${row.original.id}`} className="font-medium underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
            {row.original.title}
          </Link>
        ),
      },
      { id: "status", header: "State", cell: ({ row }) => <PublishStatusMark status={row.original.status} /> },
      { id: "audience", header: "Audience", cell: ({ row }) => <AudienceMark audience={row.original.audience} /> },
      { id: "items", header: "Items", cell: ({ row }) => <span className="tabular">{row.original.itemCount}</span> },
      { id: "when", header: "When", cell: ({ row }) => <span className="whitespace-nowrap text-ink-soft">{publishingWhen(row.original, zone)}</span> },
    ],
    [zone],
  );
  const table = useReactTable({ data: list, columns, getCoreRowModel: getCoreRowModel() });
  return (
    <>
      <PageHeader
        sheet="Site office · Photo stories"
        title="Photo stories"
        description={STORIES_PAGE_WORDS}
        actions={<PrimaryLink to={`/office/stories/new?project=${slug}`}>New photo story</PrimaryLink>}
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} />
      <DataTable table={table} caption="Photo stories" empty="No photo story yet." />
    </>
  );
}

let keySeq = 0;
const nextKey = () => `item-${++keySeq}`;

function editItemsOf(s: StoryDetail): EditItem[] {
  return s.items.map((it) =>
    it.kind === "photo"
      ? { key: nextKey(), kind: "photo", mediaId: it.mediaId, caption: it.caption }
      : { key: nextKey(), kind: "pair", area: it.area, beforeMediaId: it.beforeMediaId, afterMediaId: it.afterMediaId, caption: it.caption },
  );
}

function picturesOf(s: StoryDetail | null): Map<number, MediaPicture> {
  const m = new Map<number, MediaPicture>();
  for (const it of s?.items ?? []) {
    if (it.kind === "photo" && it.media) m.set(it.media.id, it.media);
    if (it.kind === "pair") {
      if (it.before) m.set(it.before.id, it.before);
      if (it.after) m.set(it.after.id, it.after);
    }
  }
  return m;
}

/** The items as the API takes them, or the first reason they cannot be sent yet. */
function itemsInput(items: EditItem[]): { ok: true; items: StoryItemInput[] } | { ok: false; message: string } {
  const out: StoryItemInput[] = [];
  for (const [i, it] of items.entries()) {
    if (it.kind === "photo") {
      if (!it.mediaId) return { ok: false, message: `Item ${i + 1} has no photo yet.` };
      out.push({ kind: "photo", mediaId: it.mediaId, caption: it.caption });
    } else {
      if (!it.area.trim()) return { ok: false, message: `Item ${i + 1}: name the area both photos show.` };
      if (!it.beforeMediaId || !it.afterMediaId) return { ok: false, message: `Item ${i + 1} needs both its photos.` };
      out.push({ kind: "pair", area: it.area.trim(), beforeMediaId: it.beforeMediaId, afterMediaId: it.afterMediaId, caption: it.caption });
    }
  }
  return { ok: true, items: out };
}

interface StoryDraft {
  title: string;
  slug: string;
  intro: string;
  audience: Audience;
  items: EditItem[];
}

const EMPTY_STORY: StoryDraft = { title: "", slug: "", intro: "", audience: "public", items: [] };

function storyDraftOf(s: StoryDetail): StoryDraft {
  return { title: s.title, slug: s.slug, intro: s.intro, audience: s.audience, items: editItemsOf(s) };
}

/**
 * The story's own fields checked as the server checks them; the items are checked by
 * `itemsInput`, which names the item that is not ready yet.
 */
const StoryDraftSchema = StoryCreateInputSchema.pick({ title: true, intro: true, audience: true }).extend({ slug: DraftAddressSchema, items: z.array(z.unknown()) });

function StoryForm({ story, slug, me, zone }: { story: StoryDetail | null; slug: string; me: User; zone: string }) {
  const navigate = useNavigate();
  const [pictures, setPictures] = useState<Map<number, MediaPicture>>(() => picturesOf(story));
  const [picking, setPicking] = useState<PickTarget | null>(null);
  const id = story?.id ?? 0;
  const draft = usePublishingDraft({
    item: story,
    valuesOf: storyDraftOf,
    empty: EMPTY_STORY,
    schema: StoryDraftSchema,
    toCreate: (d): StoryCreateInput | string => {
      const built = itemsInput(d.items);
      return built.ok ? { title: d.title, intro: d.intro, audience: d.audience, items: built.items, ...(d.slug.trim() ? { slug: d.slug.trim() } : {}) } : built.message;
    },
    toPatch: (d, version, s): StoryPatchInput | string => {
      const built = itemsInput(d.items);
      return built.ok ? { version, title: d.title, intro: d.intro, audience: d.audience, items: built.items, ...(d.slug.trim() && d.slug !== s.slug ? { slug: d.slug.trim() } : {}) } : built.message;
    },
    create: useCreateStory(slug),
    save: useSaveStory(id),
    workflow: useStoryWorkflow(id, slug),
    done: DONE,
    zone,
    onCreated: (made) => navigate(`/office/stories/${made}?project=${slug}`, { replace: true }),
    onTakeIn: (s) => setPictures((prev) => new Map([...prev, ...picturesOf(s)])),
  });
  const { values: d, change, errors: fieldErrors, refusal, setRefusal } = draft;
  const problems = refusal?.problems ?? story?.problems ?? [];

  const onRestoreError = (e: unknown) => {
    const found = publishingProblemsOf(e);
    if (found) setRefusal({ message: e instanceof Error ? e.message : "It cannot be restored while published.", problems: found });
    else toast.error(e instanceof Error ? e.message : "Not restored.");
  };

  const pickingItem = picking ? d.items.find((i) => i.key === picking.key) : undefined;
  return (
    <>
      <EditorShell
        {...draft.frame}
        sheet="Site office · Photo stories"
        title={story ? d.title || "Untitled story" : "New photo story"}
        noun="photo story"
        {...editorStateOf(story, me, zone, `/projects/${slug}/stories`)}
        audience={d.audience}
        offered={STORY_ACTIONS}
        waiting={WAITING}
        renderProblem={(p) => <li key={`${p.code}-${p.mediaId ?? ""}`}>▲ {p.message}</li>}
        returnHint="The writer sees this at the top of the photo story when they open it."
        timeZone={zone}
        asideWidth="18rem"
        aside={
          <>
            <AudienceSheet label="Who may see it" value={d.audience} onChange={(a) => change("audience", a)} error={fieldErrors.audience} />
            <Sheet label="How it is shown">
              <p className="text-sm text-ink-soft">Then-and-now pairs become a comparison slider with each photo's capture date; single photos open in a lightbox. Both photos of a pair need capture dates on different days.</p>
            </Sheet>
            {story ? <PressKitSheet slug={slug} storyId={story.id} /> : null}
            {story ? <ReviewLinksSheet kind="story" id={story.id} status={story.status} zone={zone} historyKey={storyKeys.history(story.id)} /> : null}
            {story ? (
              <RevisionSheets
                hooks={storyRevisionHooks}
                id={story.id}
                zone={zone}
                restoreWhat="The title, introduction and items of that revision become a new revision (the address and audience stay); nothing is lost, and you can restore the current one again later."
                onRestored={() => {
                  draft.setDirty(false);
                  toast.success("Restored as a new revision");
                }}
                onRestoreError={(e, done) => {
                  done();
                  onRestoreError(e);
                }}
              />
            ) : null}
          </>
        }
      >
        <TextField label="Title" value={d.title} error={fieldErrors.title} onChange={(e) => change("title", e.target.value)} maxLength={200} />
        <TextField label="Address" value={d.slug} error={fieldErrors.slug} onChange={(e) => change("slug", e.target.value.toLowerCase())} placeholder="made from the title when empty" hint={`/projects/${slug}/stories/${d.slug || "…"} — changing it later keeps the old address working.`} />
        <TextAreaField label="Introduction" rows={3} value={d.intro} error={fieldErrors.intro} onChange={(e) => change("intro", e.target.value)} className="font-serif" />
        <section aria-labelledby="items-h" className="flex flex-col gap-3">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 id="items-h" className="font-semibold">
              Items <span className="text-sm font-normal text-ink-soft">({d.items.length})</span>
            </h2>
            <div className="flex flex-wrap gap-2">
              <Button size="sm" onClick={() => change("items", [...d.items, { key: nextKey(), kind: "photo", mediaId: null, caption: "" }])}>
                + Photo
              </Button>
              <Button size="sm" onClick={() => change("items", [...d.items, { key: nextKey(), kind: "pair", area: "", beforeMediaId: null, afterMediaId: null, caption: "" }])}>
                + Then and now
              </Button>
            </div>
          </div>
          {fieldErrors.items ? (
            <p role="alert" className="text-sm text-bad">
              ▲ {fieldErrors.items}
            </p>
          ) : null}
          {d.items.length === 0 ? <p className="border border-dashed border-rule-strong p-6 text-center text-ink-soft">Add photos, or a then-and-now pair of one area.</p> : null}
          <StoryItemsEditor items={d.items} pictures={pictures} problems={problems} onChange={(next) => change("items", next)} onPick={setPicking} />
        </section>
        <ThenAndNowPanel
          slug={slug}
          audience={d.audience}
          inStory={new Set(d.items.flatMap((it) => (it.kind === "pair" ? [`${it.beforeMediaId}-${it.afterMediaId}`] : [])))}
          onAdd={(pair) => {
            setPictures((prev) => new Map(prev).set(pair.then.mediaId, pair.then.picture).set(pair.now.mediaId, pair.now.picture));
            change("items", [...d.items, { key: nextKey(), kind: "pair", area: pair.area, beforeMediaId: pair.then.mediaId, afterMediaId: pair.now.mediaId, caption: "" }]);
            toast.success(`Then-and-now pair of ${pair.area} added`);
          }}
        />
      </EditorShell>
      {picking ? (
        <StoryPhotoPicker
          slug={slug}
          title={picking.slot === "photo" ? "Choose a photo" : picking.slot === "before" ? "Choose the earlier photo" : "Choose the later photo"}
          area={pickingItem?.kind === "pair" && pickingItem.area ? pickingItem.area : undefined}
          onClose={() => setPicking(null)}
          onChoose={(item, picture) => {
            setPictures((prev) => new Map(prev).set(picture.id, picture));
            change(
              "items",
              d.items.map((it) => {
                if (it.key !== picking.key) return it;
                if (it.kind === "photo") return { ...it, mediaId: item.id, caption: it.caption || item.caption || "" };
                const area = it.area || item.tags.areas[0] || "";
                return picking.slot === "before" ? { ...it, area, beforeMediaId: item.id } : { ...it, area, afterMediaId: item.id };
              }),
            );
            setPicking(null);
          }}
        />
      ) : null}
    </>
  );
}

/** `/office/stories/new` and `/office/stories/:id`. */
export function StoryEditorPage() {
  return (
    <PublishingEditorRoute
      itemQuery={storyQueryOptions}
      projectsQuery={storiesProjectsQueryOptions}
      projectQuery={storiesProjectQueryOptions}
      form={(p) => <StoryForm story={p.item} slug={p.slug} me={p.me} zone={p.zone} />}
    />
  );
}
