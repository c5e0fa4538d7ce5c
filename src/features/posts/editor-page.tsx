import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { useNavigate, useParams } from "react-router-dom";
import { toast } from "sonner";
import type { User } from "#shared/schemas/auth.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { PostDetail, PostPatchInput, PostTag, PublishingProblem, WorkflowAction } from "#shared/schemas/posts.ts";
import { SystemSchema, type Milestone } from "#shared/schemas/programme.ts";
import { EMPTY_RICH_TEXT_DOC, imageIdsOf, type RichTextDoc } from "#shared/schemas/rich-text.ts";
import { Button } from "../../components/ui/button.tsx";
import { TextAreaField, TextField } from "../../components/ui/field.tsx";
import { Picture } from "../../components/ui/picture.tsx";
import { AudienceSheet, EditorHeader, NextStepBar, RefusalNotice, ReturnedNotice } from "../../components/ui/publishing-editor.tsx";
import { Notice, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { StatusMark } from "../../components/ui/status-mark.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { formatInstant, SYSTEM_WORD } from "../../lib/format.ts";
import { publishingProblemsOf } from "../../lib/publishing.ts";
import { useMe } from "../../lib/session.ts";
import { conflictOf, useCreatePost, usePost, usePostMilestones, usePostsProject, useSavePost, useWorkflow, type WorkflowInput } from "./api.ts";
import { FixPhotoDialog } from "./components/fix-photo-dialog.tsx";
import { MediaPickerDialog } from "./components/media-picker.tsx";
import { MilestonePickerDialog } from "./components/milestone-picker.tsx";
import { PostHistoryPanel, RevisionsPanel } from "./components/revisions-panel.tsx";
import { RichTextEditor } from "./components/rich-text-editor.tsx";
import { ReturnDialog, ScheduleDialog } from "./components/workflow-dialogs.tsx";
import { useOfficeProject } from "./routes.tsx";

interface Draft {
  title: string;
  slug: string;
  summary: string;
  audience: Audience;
  coverMediaId: number | null;
  tags: PostTag[];
  milestoneIds: number[];
  body: RichTextDoc;
}

const EMPTY_DRAFT: Draft = { title: "", slug: "", summary: "", audience: "public", coverMediaId: null, tags: [], milestoneIds: [], body: EMPTY_RICH_TEXT_DOC };

function draftOf(p: PostDetail): Draft {
  return {
    title: p.title,
    slug: p.slug,
    summary: p.summary,
    audience: p.audience,
    coverMediaId: p.coverMediaId,
    tags: p.tags,
    milestoneIds: p.milestoneIds,
    body: p.body ?? EMPTY_RICH_TEXT_DOC,
  };
}

const DONE: Record<WorkflowAction, string> = {
  submit: "Submitted for review",
  approve: "Approved",
  return: "Returned to the writer with your comments",
  publish: "Published",
  schedule: "Scheduled",
  withdraw: "Withdrawn",
};

/** What happens next when this person has no step to take. */
const WAITING: Record<PostDetail["status"], string> = {
  draft: "Nothing to do here yet.",
  in_review: "Waiting for a lead to review it.",
  approved: "Approved: a lead publishes or schedules it.",
  scheduled: "Scheduled: it goes out by itself at the time shown above.",
  published: "Published. A lead or an admin can change or withdraw it.",
  withdrawn: "Withdrawn: no longer on the public pages.",
};

/** Tags of two kinds, each a toggle: the programme's systems and the areas of the site. */
function TagPicker({ tags, areas, onChange }: { tags: PostTag[]; areas: string[]; onChange: (t: PostTag[]) => void }) {
  const [newArea, setNewArea] = useState("");
  const has = (t: PostTag) => tags.some((x) => x.kind === t.kind && x.value === t.value);
  const toggle = (t: PostTag) => onChange(has(t) ? tags.filter((x) => !(x.kind === t.kind && x.value === t.value)) : [...tags, t]);
  const allAreas = [...new Set([...areas, ...tags.filter((t) => t.kind === "area").map((t) => t.value)])].sort();
  const chip = (t: PostTag, label: string) => (
    <button key={`${t.kind}:${t.value}`} type="button" aria-pressed={has(t)} onClick={() => toggle(t)} className={`border px-2 py-0.5 text-xs ${has(t) ? "border-ink bg-ink text-sheet" : "border-rule-strong hover:border-ink"}`}>
      {has(t) ? <span aria-hidden>✓ </span> : null}
      {label}
    </button>
  );
  return (
    <fieldset className="flex flex-col gap-2">
      <legend className="sr-only">Tags</legend>
      <p className="label-caps">Systems</p>
      <div className="flex flex-wrap gap-1.5">{SystemSchema.options.map((s) => chip({ kind: "system", value: s }, SYSTEM_WORD[s]))}</div>
      <p className="label-caps">Areas</p>
      <div className="flex flex-wrap gap-1.5">{allAreas.map((a) => chip({ kind: "area", value: a }, a))}</div>
      <form
        className="flex items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          const v = newArea.trim();
          if (v && !has({ kind: "area", value: v })) onChange([...tags, { kind: "area", value: v }]);
          setNewArea("");
        }}
      >
        <div className="flex-1">
          <TextField label="Another area" value={newArea} onChange={(e) => setNewArea(e.target.value)} placeholder="e.g. Hall 2B" />
        </div>
        <Button type="submit" size="sm">
          Add
        </Button>
      </form>
    </fieldset>
  );
}

/** One problem of a refusal, shown with a way to reach what it names. */
function ProblemLine({ p, onFixPhoto, onShowCover }: { p: PublishingProblem; onFixPhoto: (id: number) => void; onShowCover: () => void }) {
  const scrollTo = (selector: string) => document.querySelector(selector)?.scrollIntoView({ behavior: "smooth", block: "center" });
  return (
    <li className="flex flex-wrap items-baseline gap-x-3">
      <span>▲ {p.message}</span>
      {p.mediaId ? (
        <>
          <button type="button" className="font-medium text-accent underline underline-offset-2" onClick={() => onFixPhoto(p.mediaId!)}>
            Fix this photo
          </button>
          <button type="button" className="underline underline-offset-2" onClick={() => scrollTo(`[data-testid="editor-image"][data-media-id="${p.mediaId}"], [data-testid="cover-field"]`)}>
            Show it
          </button>
        </>
      ) : null}
      {p.code === "no_cover" ? (
        <button type="button" className="font-medium text-accent underline underline-offset-2" onClick={onShowCover}>
          Choose a cover
        </button>
      ) : null}
      {p.milestoneId ? (
        <button type="button" className="underline underline-offset-2" onClick={() => scrollTo(`[data-linked-milestone="${p.milestoneId}"], [data-testid="editor-milestone"][data-milestone-id="${p.milestoneId}"]`)}>
          Show it
        </button>
      ) : null}
    </li>
  );
}

function PostForm({ post, slug, me, zone }: { post: PostDetail | null; slug: string; me: User; zone: string }) {
  const navigate = useNavigate();
  const [draft, setDraft] = useState<Draft>(() => (post ? draftOf(post) : EMPTY_DRAFT));
  const [dirty, setDirty] = useState(false);
  const [editorKey, setEditorKey] = useState(0);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [refusal, setRefusal] = useState<{ message: string; problems: PublishingProblem[] } | null>(null);
  const [conflict, setConflict] = useState<PostDetail | null>(null);
  const [dialog, setDialog] = useState<"cover" | "milestone" | "schedule" | "return" | null>(null);
  const [fixing, setFixing] = useState<number | null>(null);
  const [extraPictures, setExtraPictures] = useState<Map<number, MediaPicture>>(new Map());
  const id = post?.id ?? 0;
  const create = useCreatePost(slug);
  const save = useSavePost(id);
  const workflow = useWorkflow(id, slug);
  const milestones = usePostMilestones(slug);
  const coverRef = useRef<HTMLDivElement>(null);

  // A restore or someone else's save changes the post underneath: take it in when nothing local is unsaved.
  const seenVersion = useRef(post?.version);
  useEffect(() => {
    if (post && post.version !== seenVersion.current && !dirty) {
      seenVersion.current = post.version;
      setDraft(draftOf(post));
      setEditorKey((k) => k + 1);
    }
  }, [post, dirty]);

  useEffect(() => {
    if (!dirty) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener("beforeunload", warn);
    return () => window.removeEventListener("beforeunload", warn);
  }, [dirty]);

  const change = <K extends keyof Draft>(k: K, v: Draft[K]) => {
    setDraft((d) => ({ ...d, [k]: v }));
    setDirty(true);
  };

  const pictures = useMemo(() => {
    const m = new Map<number, MediaPicture>();
    for (const p of post?.images ?? []) m.set(p.id, p);
    if (post?.cover) m.set(post.cover.id, post.cover);
    for (const [k, v] of extraPictures) m.set(k, v);
    return m;
  }, [post, extraPictures]);
  const addPicture = useCallback((p: MediaPicture) => setExtraPictures((prev) => new Map(prev).set(p.id, p)), []);
  const milestoneMap = useMemo(() => new Map((milestones.data ?? []).map((m) => [m.id, m])), [milestones.data]);
  const problems = refusal?.problems ?? post?.problems ?? [];

  const payload = (): PostPatchInput => ({
    version: post?.version,
    title: draft.title,
    summary: draft.summary,
    body: draft.body,
    audience: draft.audience,
    coverMediaId: draft.coverMediaId,
    milestoneIds: draft.milestoneIds,
    tags: draft.tags,
    ...(draft.slug.trim() && draft.slug !== post?.slug ? { slug: draft.slug.trim() } : {}),
  });

  const onSaveError = (e: unknown) => {
    const current = conflictOf(e);
    if (current) {
      setConflict(current);
      return;
    }
    if (e instanceof ApiError && Object.keys(e.fields).length) {
      setFieldErrors(e.fields);
      toast.error("Some fields need attention before it can be saved.");
      return;
    }
    toast.error(e instanceof Error ? e.message : "Not saved.");
  };

  /** Saves (a new revision); answers whether it worked. */
  const doSave = async (): Promise<boolean> => {
    setFieldErrors({});
    try {
      if (!post) {
        const { version: _v, ...input } = payload();
        const made = await create.mutateAsync({ ...input, title: draft.title, body: draft.body, audience: draft.audience, summary: draft.summary });
        setDirty(false);
        toast.success("Saved as a draft");
        navigate(`/office/updates/${made.id}?project=${slug}`, { replace: true });
        return true;
      }
      const saved = await save.mutateAsync(payload());
      seenVersion.current = saved.version;
      setDirty(false);
      setRefusal(null);
      setDraft((d) => ({ ...d, slug: saved.slug }));
      toast.success("Saved");
      return true;
    } catch (e) {
      onSaveError(e);
      return false;
    }
  };

  const runWorkflow = async (input: WorkflowInput) => {
    if (dirty && !(await doSave())) return;
    setRefusal(null);
    try {
      const r = await workflow.mutateAsync(input);
      setDialog(null);
      toast.success(r.status === "scheduled" && r.scheduledFor ? `Scheduled for ${formatInstant(r.scheduledFor, zone)}` : DONE[input.action]);
    } catch (e) {
      const found = publishingProblemsOf(e);
      if (found) {
        setDialog(null);
        setRefusal({ message: e instanceof Error ? e.message : "It cannot be published yet.", problems: found });
        return;
      }
      if (e instanceof ApiError && input.action === "schedule" && Object.keys(e.fields).length === 0 && e.status < 500) {
        setFieldErrors({ at: e.message });
        return;
      }
      if (e instanceof ApiError && Object.keys(e.fields).length) {
        setFieldErrors(e.fields);
        return;
      }
      toast.error(e instanceof Error ? e.message : "That step did not go through.");
    }
  };

  // Ctrl+S (Cmd+S) saves, as writers expect; the listener calls whatever save is current.
  const saveRef = useRef(doSave);
  saveRef.current = doSave;
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if ((e.ctrlKey || e.metaKey) && e.key.toLowerCase() === "s") {
        e.preventDefault();
        void saveRef.current();
      }
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, []);

  const cover = draft.coverMediaId ? (pictures.get(draft.coverMediaId) ?? null) : null;
  const coverProblem = problems.find((p) => p.code === "no_cover" || (p.mediaId !== undefined && p.mediaId === draft.coverMediaId));
  const areas = useMemo(() => [...new Set((milestones.data ?? []).map((m) => m.area).filter(Boolean))], [milestones.data]);
  const linked = draft.milestoneIds.map((mid) => milestoneMap.get(mid) ?? ({ id: mid, name: `Milestone ${mid}` } as Milestone));
  const ownWork = !post || post.authorName === me.name;
  const status = post?.status ?? "draft";
  const saving = create.isPending || save.isPending;
  const imagesInBody = imageIdsOf(draft.body).length;

  return (
    <>
      <EditorHeader
        sheet="Site office · Updates"
        title={post ? draft.title || "Untitled update" : "New update"}
        status={status}
        audience={draft.audience}
        byline={post ? `by ${post.authorName}` : null}
        goesOut={post?.status === "scheduled" && post.scheduledFor ? formatInstant(post.scheduledFor, zone) : null}
        publishedHref={post?.status === "published" ? `/projects/${slug}/updates/${post.slug}` : null}
        saved={Boolean(post)}
        saving={saving}
        dirty={dirty}
        onSave={() => void doSave()}
      />

      {conflict ? (
        <div className="mb-4">
          <Notice tone="caution" title="Someone else saved this update since you opened it">
            Your changes are still here and not saved.{" "}
            <button
              type="button"
              className="font-medium underline underline-offset-2"
              onClick={() => {
                seenVersion.current = conflict.version;
                setDraft(draftOf(conflict));
                setEditorKey((k) => k + 1);
                setDirty(false);
                setConflict(null);
              }}
            >
              Load their version (drops yours)
            </button>
          </Notice>
        </div>
      ) : null}
      {post?.reviewComment && post.status === "draft" ? <ReturnedNotice comment={post.reviewComment} /> : null}
      {refusal ? (
        <RefusalNotice
          message={refusal.message}
          problems={refusal.problems}
          renderProblem={(p) => <ProblemLine key={`${p.code}-${p.mediaId ?? ""}-${p.milestoneId ?? ""}`} p={p} onFixPhoto={setFixing} onShowCover={() => setDialog("cover")} />}
        />
      ) : null}

      {post ? (
        <NextStepBar
          status={status}
          role={me.role}
          ownWork={ownWork}
          busy={workflow.isPending ? (workflow.variables?.action ?? null) : null}
          onAction={(a) => {
            if (a === "schedule") setDialog("schedule");
            else if (a === "return") setDialog("return");
            else void runWorkflow({ action: a });
          }}
          waiting={WAITING[status]}
        />
      ) : (
        <p className="mb-4 text-sm text-ink-soft">Save the draft first; then it can be submitted for review.</p>
      )}

      <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <div className="flex min-w-0 flex-col gap-4">
          <TextField label="Title" value={draft.title} onChange={(e) => change("title", e.target.value)} error={fieldErrors.title} maxLength={200} />
          <TextField
            label="Address"
            value={draft.slug}
            onChange={(e) => change("slug", e.target.value.toLowerCase())}
            error={fieldErrors.slug}
            placeholder="made from the title when empty"
            hint={`/projects/${slug}/updates/${draft.slug || "…"} — changing it later keeps the old address working.`}
          />
          <TextAreaField label="Summary" rows={2} value={draft.summary} onChange={(e) => change("summary", e.target.value)} error={fieldErrors.summary} hint="One or two sentences for lists, the feed and e-mail." maxLength={600} />
          <div className="flex flex-col gap-1">
            <span className="text-sm font-medium" id="body-label">
              Body
            </span>
            {fieldErrors.body ? (
              <p role="alert" className="text-sm text-bad">
                ▲ {fieldErrors.body}
              </p>
            ) : null}
            <RichTextEditor
              key={editorKey}
              slug={slug}
              initial={draft.body}
              onChange={(doc) => change("body", doc)}
              data={{ pictures, milestones: milestoneMap, problems, onFixPhoto: setFixing }}
              milestones={milestones.data ?? []}
              onPicture={addPicture}
            />
            <p className="text-xs text-ink-soft">
              {imagesInBody === 1 ? "1 photo" : `${imagesInBody} photos`} in the body. Ctrl+S saves; every save keeps a revision.
            </p>
          </div>
        </div>

        <aside className="flex flex-col gap-4">
          <AudienceSheet label="Who may read it" value={draft.audience} onChange={(a) => change("audience", a)} error={fieldErrors.audience} />
          <Sheet label="Cover photo">
            <div ref={coverRef} data-testid="cover-field" data-problem={coverProblem ? true : undefined} className={coverProblem ? "border-2 border-bad p-1" : ""}>
              {cover ? <Picture picture={cover} eager sizes="18rem" /> : draft.coverMediaId ? <p className="text-sm text-ink-soft">Photo {draft.coverMediaId}</p> : <p className="text-sm text-ink-soft">None yet: lists and link previews show the cover.</p>}
              {coverProblem ? (
                <p role="alert" className="mt-1 text-sm font-medium text-bad">
                  ▲ {coverProblem.message}
                </p>
              ) : null}
              <div className="mt-2 flex flex-wrap gap-2">
                <Button size="sm" onClick={() => setDialog("cover")}>
                  {draft.coverMediaId ? "Change…" : "Choose a cover…"}
                </Button>
                {draft.coverMediaId ? (
                  <Button size="sm" variant="ghost" onClick={() => change("coverMediaId", null)}>
                    Remove
                  </Button>
                ) : null}
                {coverProblem?.mediaId ? (
                  <Button size="sm" variant="ghost" onClick={() => setFixing(coverProblem.mediaId!)}>
                    Fix this photo
                  </Button>
                ) : null}
              </div>
            </div>
          </Sheet>
          <Sheet label="Linked milestones">
            <ul className="flex flex-col gap-2 text-sm">
              {linked.map((m) => {
                const bad = problems.find((p) => p.milestoneId === m.id);
                return (
                  <li key={m.id} data-linked-milestone={m.id} className={`flex items-start justify-between gap-2 ${bad ? "border-l-4 border-bad pl-2" : ""}`}>
                    <span className="min-w-0">
                      <span className="block font-medium">{m.name}</span>
                      {m.status ? <StatusMark status={m.status} className="text-xs" /> : null}
                      {bad ? <span className="block text-xs text-bad">▲ {bad.message}</span> : null}
                    </span>
                    <button type="button" className="text-xs underline" aria-label={`Unlink ${m.name}`} onClick={() => change("milestoneIds", draft.milestoneIds.filter((x) => x !== m.id))}>
                      Unlink
                    </button>
                  </li>
                );
              })}
              {linked.length === 0 ? <li className="text-ink-soft">None. Linked milestones are shown on the page as they stood at publication, and as they are now.</li> : null}
            </ul>
            <Button size="sm" className="mt-2" onClick={() => setDialog("milestone")}>
              Link a milestone…
            </Button>
          </Sheet>
          <Sheet label="Topics">
            <TagPicker tags={draft.tags} areas={areas} onChange={(t) => change("tags", t)} />
          </Sheet>
          {problems.length > 0 && !refusal ? (
            <Sheet label="Before it can be published">
              <ul className="flex flex-col gap-1 text-sm text-bad">
                {problems.map((p) => (
                  <ProblemLine key={`${p.code}-${p.mediaId ?? ""}-${p.milestoneId ?? ""}`} p={p} onFixPhoto={setFixing} onShowCover={() => setDialog("cover")} />
                ))}
              </ul>
            </Sheet>
          ) : null}
          {post ? (
            <>
              <Sheet label="Revisions">
                <RevisionsPanel postId={post.id} zone={zone} onRestored={() => setDirty(false)} />
              </Sheet>
              <Sheet label="Publishing history">
                <PostHistoryPanel postId={post.id} zone={zone} />
              </Sheet>
            </>
          ) : null}
        </aside>
      </div>

      <MediaPickerDialog
        slug={slug}
        open={dialog === "cover"}
        title="Choose the cover photo"
        onClose={() => setDialog(null)}
        onChoose={(item, picture) => {
          addPicture(picture);
          change("coverMediaId", item.id);
          setDialog(null);
        }}
      />
      <MilestonePickerDialog
        open={dialog === "milestone"}
        milestones={(milestones.data ?? []).filter((m) => !draft.milestoneIds.includes(m.id))}
        title="Link a milestone"
        onClose={() => setDialog(null)}
        onChoose={(m) => {
          change("milestoneIds", [...draft.milestoneIds, m.id]);
          setDialog(null);
        }}
      />
      {dialog === "schedule" ? (
        <ScheduleDialog timeZone={zone} busy={workflow.isPending} error={fieldErrors.at} onClose={() => setDialog(null)} onSchedule={(at) => void runWorkflow({ action: "schedule", at })} />
      ) : null}
      {dialog === "return" ? <ReturnDialog busy={workflow.isPending} error={fieldErrors.comment} onClose={() => setDialog(null)} onReturn={(comment) => void runWorkflow({ action: "return", comment })} /> : null}
      {fixing !== null ? (
        <FixPhotoDialog
          slug={slug}
          postId={post?.id}
          picture={pictures.get(fixing) ?? null}
          problems={problems.filter((p) => p.mediaId === fixing)}
          role={me.role}
          onClose={() => setFixing(null)}
          onFixed={(p, fixed) => {
            addPicture(p);
            const code = fixed === "alt" ? "missing_alt_text" : "not_cleared";
            setRefusal((r) => {
              if (!r) return r;
              const rest = r.problems.filter((x) => !(x.mediaId === p.id && x.code === code));
              return rest.length ? { ...r, problems: rest } : null;
            });
          }}
        />
      ) : null}
    </>
  );
}

/** `/office/updates/new` and `/office/updates/:id`: the editor, the fields, revisions and the workflow. */
export function PostEditorPage() {
  const { id: idParam = "new" } = useParams();
  const id = idParam === "new" ? 0 : Number(idParam);
  const office = useOfficeProject();
  const post = usePost(id);
  const me = useMe();
  const slug = post.data?.projectSlug ?? office.slug;
  const project = usePostsProject(slug);
  if (me.isPending || (id > 0 && post.isPending) || !slug) return <Spinner label="Opening the update" />;
  if (id > 0 && post.isError) return <Notice tone="error" title="This update could not be opened">{post.error.message}</Notice>;
  if (!me.data) return null;
  return <PostForm key={id || "new"} post={id > 0 ? (post.data ?? null) : null} slug={slug} me={me.data} zone={project.data?.timeZone ?? "Europe/London"} />;
}
