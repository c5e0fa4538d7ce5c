import { getCoreRowModel, useReactTable, type ColumnDef } from "@tanstack/react-table";
import { useEffect, useMemo, useRef, useState } from "react";
import { Link, useNavigate, useParams } from "react-router-dom";
import { toast } from "sonner";
import type { User } from "#shared/schemas/auth.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { PublishingProblem, WorkflowAction } from "#shared/schemas/posts.ts";
import type { StoryDetail, StoryItemInput, StorySummary } from "#shared/schemas/stories.ts";
import { AudienceMark } from "../../components/ui/audience-mark.tsx";
import { Button, PrimaryLink } from "../../components/ui/button.tsx";
import { DataTable } from "../../components/ui/data-table.tsx";
import { TextAreaField, TextField } from "../../components/ui/field.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { PublishStatusMark } from "../../components/ui/publish-status.tsx";
import { AudienceSheet, EditorHeader, NextStepBar, RefusalNotice, ReturnedNotice } from "../../components/ui/publishing-editor.tsx";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { ReturnDialog, ScheduleDialog } from "../../components/ui/workflow-dialogs.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { formatInstant } from "../../lib/format.ts";
import { useProjectParam } from "../../lib/projects.ts";
import { publishingProblemsOf, publishingWhen } from "../../lib/publishing.ts";
import { useMe } from "../../lib/session.ts";
import { useCreateStory, useSaveStory, useStoriesProject, useStoriesProjects, useStory, useStoryList, useStoryWorkflow, type StoryWorkflowInput } from "./api.ts";
import { StoryPhotoPicker } from "./components/photo-picker.tsx";
import { StoryHistoryPanel, StoryRevisionsPanel } from "./components/revisions-panel.tsx";
import { StoryItemsEditor, type EditItem, type PickTarget } from "./components/story-items.tsx";

/** The steps the stories API offers: the same workflow and rules as updates. */
const STORY_ACTIONS: readonly WorkflowAction[] = ["submit", "approve", "publish", "schedule", "return", "withdraw"];

const DONE: Record<WorkflowAction, string> = {
  submit: "Submitted for review",
  approve: "Approved",
  publish: "Published",
  schedule: "Scheduled",
  return: "Returned with your comments",
  withdraw: "Withdrawn",
};

/** What happens next when this person has no step to take. */
const WAITING: Record<StoryDetail["status"], string> = {
  draft: "Nothing to do here yet.",
  in_review: "Waiting for a lead to review it.",
  approved: "Approved: a lead publishes or schedules it.",
  scheduled: "Scheduled: it goes out by itself at the time shown above.",
  published: "Published. A lead or an admin can withdraw it.",
  withdrawn: "Withdrawn: no longer on the public pages.",
};

/** The project the site office is working on: `?project=` or the first one. */
function useOfficeProject() {
  return useProjectParam(useStoriesProjects().data);
}

/** `/office/stories`: the project's photo stories by state. */
export function StoriesPage() {
  const { slug, choices, setSlug } = useOfficeProject();
  const list = useStoryList(slug);
  const project = useStoriesProject(slug);
  const zone = project.data?.timeZone ?? "Europe/London";
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
  const table = useReactTable({ data: list.data ?? [], columns, getCoreRowModel: getCoreRowModel() });
  return (
    <>
      <PageHeader
        sheet="Site office · Photo stories"
        title="Photo stories"
        description="Curated sequences of site photos, including then-and-now pairs of one area. Published through the same review as updates."
        actions={<PrimaryLink to={`/office/stories/new?project=${slug}`}>New photo story</PrimaryLink>}
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} />
      {list.isError ? <Notice tone="error">{list.error.message}</Notice> : <DataTable table={table} caption="Photo stories" empty={list.isPending ? "Loading…" : "No photo story yet."} />}
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

function StoryForm({ story, slug, me, zone }: { story: StoryDetail | null; slug: string; me: User; zone: string }) {
  const navigate = useNavigate();
  const [title, setTitle] = useState(story?.title ?? "");
  const [storySlug, setStorySlug] = useState(story?.slug ?? "");
  const [intro, setIntro] = useState(story?.intro ?? "");
  const [audience, setAudience] = useState<Audience>(story?.audience ?? "public");
  const [items, setItems] = useState<EditItem[]>(() => (story ? editItemsOf(story) : []));
  const [pictures, setPictures] = useState<Map<number, MediaPicture>>(() => picturesOf(story));
  const [dirty, setDirty] = useState(false);
  const [picking, setPicking] = useState<PickTarget | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [refusal, setRefusal] = useState<{ message: string; problems: PublishingProblem[] } | null>(null);
  const [dialog, setDialog] = useState<"schedule" | "return" | null>(null);
  const id = story?.id ?? 0;
  const create = useCreateStory(slug);
  const save = useSaveStory(id);
  const workflow = useStoryWorkflow(id, slug);
  const versionRef = useRef(story?.version);

  // A restore or someone else's save changes the story underneath: take it in when nothing local is unsaved.
  useEffect(() => {
    if (story && story.version !== versionRef.current && !dirty) {
      versionRef.current = story.version;
      setTitle(story.title);
      setStorySlug(story.slug);
      setIntro(story.intro);
      setAudience(story.audience);
      setItems(editItemsOf(story));
      setPictures((prev) => new Map([...prev, ...picturesOf(story)]));
    }
  }, [story, dirty]);

  const touch = () => setDirty(true);
  const problems = refusal?.problems ?? story?.problems ?? [];

  const doSave = async (): Promise<boolean> => {
    setFieldErrors({});
    const built = itemsInput(items);
    if (!built.ok) {
      toast.error(built.message);
      return false;
    }
    try {
      if (!story) {
        const made = await create.mutateAsync({ title, intro, audience, items: built.items, ...(storySlug.trim() ? { slug: storySlug.trim() } : {}) });
        setDirty(false);
        toast.success("Saved as a draft");
        navigate(`/office/stories/${made.id}?project=${slug}`, { replace: true });
        return true;
      }
      const saved = await save.mutateAsync({ version: story.version, title, intro, audience, items: built.items, ...(storySlug.trim() && storySlug !== story.slug ? { slug: storySlug.trim() } : {}) });
      versionRef.current = saved.version;
      setStorySlug(saved.slug);
      setDirty(false);
      setRefusal(null);
      toast.success("Saved");
      return true;
    } catch (e) {
      if (e instanceof ApiError && e.status === 409) toast.error("Someone else saved this story since you opened it; reload to see their version.");
      else if (e instanceof ApiError && Object.keys(e.fields).length) setFieldErrors(e.fields);
      else toast.error(e instanceof Error ? e.message : "Not saved.");
      return false;
    }
  };

  const act = async (input: StoryWorkflowInput) => {
    if (dirty && !(await doSave())) return;
    setRefusal(null);
    setFieldErrors({});
    try {
      const r = await workflow.mutateAsync(input);
      setDialog(null);
      toast.success(r.status === "scheduled" && r.scheduledFor ? `Scheduled for ${formatInstant(r.scheduledFor, zone)}` : DONE[input.action]);
    } catch (e) {
      const found = publishingProblemsOf(e);
      if (found) {
        setDialog(null);
        setRefusal({ message: e instanceof Error ? e.message : "It cannot be published yet.", problems: found });
      } else if (e instanceof ApiError && input.action === "schedule" && e.status < 500) {
        // A time in the past, or one the project's clock skips: said beside the fields.
        setFieldErrors({ at: e.message });
      } else if (e instanceof ApiError && input.action === "return" && e.fields.comment) {
        setFieldErrors({ comment: e.fields.comment });
      } else toast.error(e instanceof Error ? e.message : "That step did not go through.");
    }
  };

  const onRestoreError = (e: unknown) => {
    const found = publishingProblemsOf(e);
    if (found) setRefusal({ message: e instanceof Error ? e.message : "It cannot be restored while published.", problems: found });
    else toast.error(e instanceof Error ? e.message : "Not restored.");
  };

  const ownWork = !story || story.authorName === me.name;
  const status = story?.status ?? "draft";
  const pickingItem = picking ? items.find((i) => i.key === picking.key) : undefined;
  const saving = create.isPending || save.isPending;
  return (
    <>
      <EditorHeader
        sheet="Site office · Photo stories"
        title={story ? title || "Untitled story" : "New photo story"}
        status={status}
        audience={audience}
        goesOut={story?.status === "scheduled" && story.scheduledFor ? formatInstant(story.scheduledFor, zone) : null}
        publishedHref={story?.status === "published" ? `/projects/${slug}/stories/${story.slug}` : null}
        saved={Boolean(story)}
        saving={saving}
        dirty={dirty}
        onSave={() => void doSave()}
      />
      {story?.reviewComment && story.status === "draft" ? <ReturnedNotice comment={story.reviewComment} /> : null}
      {refusal ? <RefusalNotice message={refusal.message} problems={refusal.problems} renderProblem={(p) => <li key={`${p.code}-${p.mediaId ?? ""}`}>▲ {p.message}</li>} /> : null}
      {story ? (
        <NextStepBar
          status={status}
          role={me.role}
          ownWork={ownWork}
          offered={STORY_ACTIONS}
          busy={workflow.isPending ? (workflow.variables?.action ?? null) : null}
          onAction={(a) => {
            if (a === "schedule" || a === "return") {
              setFieldErrors({});
              setDialog(a);
            } else void act({ action: a });
          }}
          waiting={WAITING[status]}
        />
      ) : null}
      <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_18rem]">
        <div className="flex min-w-0 flex-col gap-4">
          <TextField label="Title" value={title} error={fieldErrors.title} onChange={(e) => { setTitle(e.target.value); touch(); }} maxLength={200} />
          <TextField label="Address" value={storySlug} error={fieldErrors.slug} onChange={(e) => { setStorySlug(e.target.value.toLowerCase()); touch(); }} placeholder="made from the title when empty" hint={`/projects/${slug}/stories/${storySlug || "…"} — changing it later keeps the old address working.`} />
          <TextAreaField label="Introduction" rows={3} value={intro} error={fieldErrors.intro} onChange={(e) => { setIntro(e.target.value); touch(); }} className="font-serif" />
          <section aria-labelledby="items-h" className="flex flex-col gap-3">
            <div className="flex flex-wrap items-center justify-between gap-2">
              <h2 id="items-h" className="font-semibold">
                Items <span className="text-sm font-normal text-ink-soft">({items.length})</span>
              </h2>
              <div className="flex flex-wrap gap-2">
                <Button size="sm" onClick={() => { setItems([...items, { key: nextKey(), kind: "photo", mediaId: null, caption: "" }]); touch(); }}>
                  + Photo
                </Button>
                <Button size="sm" onClick={() => { setItems([...items, { key: nextKey(), kind: "pair", area: "", beforeMediaId: null, afterMediaId: null, caption: "" }]); touch(); }}>
                  + Then and now
                </Button>
              </div>
            </div>
            {fieldErrors.items ? (
              <p role="alert" className="text-sm text-bad">
                ▲ {fieldErrors.items}
              </p>
            ) : null}
            {items.length === 0 ? <p className="border border-dashed border-rule-strong p-6 text-center text-ink-soft">Add photos, or a then-and-now pair of one area.</p> : null}
            <StoryItemsEditor items={items} pictures={pictures} problems={problems} onChange={(next) => { setItems(next); touch(); }} onPick={setPicking} />
          </section>
        </div>
        <aside className="flex flex-col gap-4">
          <AudienceSheet label="Who may see it" value={audience} onChange={(a) => { setAudience(a); touch(); }} />
          <Sheet label="How it is shown">
            <p className="text-sm text-ink-soft">Then-and-now pairs become a comparison slider with each photo's capture date; single photos open in a lightbox. Both photos of a pair need capture dates on different days.</p>
          </Sheet>
          {story ? (
            <>
              <Sheet label="Revisions">
                <StoryRevisionsPanel storyId={story.id} zone={zone} onRestored={() => { setDirty(false); toast.success("Restored as a new revision"); }} onError={onRestoreError} />
              </Sheet>
              <Sheet label="Publishing history">
                <StoryHistoryPanel storyId={story.id} zone={zone} />
              </Sheet>
            </>
          ) : null}
        </aside>
      </div>
      {dialog === "schedule" ? <ScheduleDialog timeZone={zone} busy={workflow.isPending} error={fieldErrors.at} onClose={() => setDialog(null)} onSchedule={(at) => void act({ action: "schedule", at })} /> : null}
      {dialog === "return" ? (
        <ReturnDialog
          busy={workflow.isPending}
          error={fieldErrors.comment}
          hint="The writer sees this at the top of the photo story when they open it."
          onClose={() => setDialog(null)}
          onReturn={(comment) => void act({ action: "return", comment })}
        />
      ) : null}
      {picking ? (
        <StoryPhotoPicker
          slug={slug}
          title={picking.slot === "photo" ? "Choose a photo" : picking.slot === "before" ? "Choose the earlier photo" : "Choose the later photo"}
          area={pickingItem?.kind === "pair" && pickingItem.area ? pickingItem.area : undefined}
          onClose={() => setPicking(null)}
          onChoose={(item, picture) => {
            setPictures((prev) => new Map(prev).set(picture.id, picture));
            setItems((list) =>
              list.map((it) => {
                if (it.key !== picking.key) return it;
                if (it.kind === "photo") return { ...it, mediaId: item.id, caption: it.caption || item.caption || "" };
                const area = it.area || item.tags.areas[0] || "";
                return picking.slot === "before" ? { ...it, area, beforeMediaId: item.id } : { ...it, area, afterMediaId: item.id };
              }),
            );
            touch();
            setPicking(null);
          }}
        />
      ) : null}
    </>
  );
}

/** `/office/stories/new` and `/office/stories/:id`. */
export function StoryEditorPage() {
  const { id: idParam = "new" } = useParams();
  const id = idParam === "new" ? 0 : Number(idParam);
  const office = useOfficeProject();
  const story = useStory(id);
  const me = useMe();
  const slug = story.data?.projectSlug ?? office.slug;
  const project = useStoriesProject(slug);
  if (me.isPending || (id > 0 && story.isPending) || !slug || project.isPending) return <Spinner label="Opening the story" />;
  if (id > 0 && story.isError) return <Notice tone="error" title="This story could not be opened">{story.error.message}</Notice>;
  if (!me.data) return null;
  return <StoryForm key={id || "new"} story={id > 0 ? (story.data ?? null) : null} slug={slug} me={me.data} zone={project.data?.timeZone ?? "Europe/London"} />;
}
