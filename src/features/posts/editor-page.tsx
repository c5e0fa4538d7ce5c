import { toast } from "sonner";
import { useCallback, useMemo, useRef, useState } from "react";
import { useNavigate } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import type { User } from "#shared/schemas/auth.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import { PostCreateInputSchema, type PostCreateInput, type PostDetail, type PostPatchInput, type PostTag } from "#shared/schemas/posts.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";
import { SystemSchema, type Milestone } from "#shared/schemas/programme.ts";
import { EMPTY_RICH_TEXT_DOC, imageIdsOf, type RichTextDoc } from "#shared/schemas/rich-text.ts";
import { Button } from "../../components/ui/button.tsx";
import { EditorShell } from "../../components/ui/editor-shell.tsx";
import { TextAreaField, TextField } from "../../components/ui/field.tsx";
import { Picture } from "../../components/ui/picture.tsx";
import { AudienceSheet } from "../../components/ui/publishing-editor.tsx";
import { Sheet } from "../../components/ui/sheet.tsx";
import { StatusMark } from "../../components/ui/status-mark.tsx";
import { facilityChoiceLabel, type FacilityTagChoices } from "../../lib/facility-tags.ts";
import { SYSTEM_WORD } from "../../lib/format.ts";
import { editorStateOf } from "../../lib/publishing.ts";
import { publishingEditorLoader, PublishingEditorRoute } from "../../lib/publishing-editor-route.tsx";
import { RevisionSheets } from "../../lib/publishing-panels.tsx";
import { ReviewLinksSheet } from "../../lib/review-links-panel.tsx";
import type { RouteLoader } from "../../lib/loaders.ts";
import { DraftAddressSchema, usePublishingDraft, WAITING_FOR } from "../../lib/use-publishing-draft.ts";
import { postKeys, postFacilityTagsQueryOptions, postMilestonesQueryOptions, postQueryOptions, postsProjectQueryOptions, postsProjectsQueryOptions, postRevisionHooks, useCreatePost, usePostMilestones, useSavePost, useWorkflow } from "./api.ts";
import { DraftSuggestionPanel } from "./components/draft-suggestion-panel.tsx";
import { FixPhotoDialog } from "./components/fix-photo-dialog.tsx";
import { MediaPickerDialog } from "./components/media-picker.tsx";
import { MilestonePickerDialog } from "./components/milestone-picker.tsx";
import { RichTextEditor } from "./components/rich-text-editor.tsx";
import { onSubmitted } from "../../lib/forms.ts";

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
    // The answer names a block's or system's tag; what is saved is its kind and id.
    tags: p.tags.map(({ kind, value }) => ({ kind, value })),
    milestoneIds: p.milestoneIds,
    body: p.body ?? EMPTY_RICH_TEXT_DOC,
  };
}

/** The draft checked with the fields the server parses; an empty address means "make one from the title". */
const PostDraftSchema = PostCreateInputSchema.extend({ slug: DraftAddressSchema });

/** The fields a create and a save both send, as the writer left them (the server trims). */
function fieldsOf(d: Draft) {
  return { title: d.title, summary: d.summary, body: d.body, audience: d.audience, coverMediaId: d.coverMediaId, milestoneIds: d.milestoneIds, tags: d.tags };
}

/** Tags, each a toggle: the programme's systems, the areas of the site, and the facility's capacity blocks and plant systems. */
function TagPicker({ tags, areas, facility, onChange }: { tags: PostTag[]; areas: string[]; facility: FacilityTagChoices | undefined; onChange: (t: PostTag[]) => void }) {
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
      {(
        [
          ["block", "Block", facility?.blocks],
          ["plant", "Plant system", facility?.plants],
        ] as const
      ).map(([kind, label, choices]) =>
        choices && choices.length > 0 ? (
          <div key={kind} className="flex flex-col gap-2">
            <p className="label-caps">{label}</p>
            <div className="flex flex-wrap gap-1.5">{choices.map((c) => chip({ kind, value: String(c.id) }, facilityChoiceLabel(c)))}</div>
          </div>
        ) : null,
      )}
      <form
        className="flex items-end gap-2"
        onSubmit={onSubmitted(() => {
          const v = newArea.trim();
          if (v && !has({ kind: "area", value: v })) onChange([...tags, { kind: "area", value: v }]);
          setNewArea("");
        })}
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
          <button type="button" className="font-medium text-ink underline underline-offset-2" onClick={() => onFixPhoto(p.mediaId!)}>
            Fix this photo
          </button>
          <button type="button" className="underline underline-offset-2" onClick={() => scrollTo(`[data-testid="editor-image"][data-media-id="${p.mediaId}"], [data-testid="cover-field"]`)}>
            Show it
          </button>
        </>
      ) : null}
      {p.code === "no_cover" ? (
        <button type="button" className="font-medium text-ink underline underline-offset-2" onClick={onShowCover}>
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
  const [dialog, setDialog] = useState<"cover" | "milestone" | null>(null);
  const [fixing, setFixing] = useState<number | null>(null);
  // A new update first offers the draft suggested by the programme (decision 061), until the writer starts blank.
  const [startBlank, setStartBlank] = useState(false);
  const [extraPictures, setExtraPictures] = useState<Map<number, MediaPicture>>(new Map());
  const id = post?.id ?? 0;
  const create = useCreatePost(slug);
  const save = useSavePost(id);
  const workflow = useWorkflow(id, slug);
  const milestones = usePostMilestones(slug);
  const facility = useQuery(postFacilityTagsQueryOptions(slug));
  const coverRef = useRef<HTMLDivElement>(null);
  const draft = usePublishingDraft({
    item: post,
    valuesOf: draftOf,
    empty: EMPTY_DRAFT,
    schema: PostDraftSchema,
    toCreate: (d): PostCreateInput => ({ ...fieldsOf(d), ...(d.slug.trim() ? { slug: d.slug.trim() } : {}) }),
    toPatch: (d, version, p): PostPatchInput => ({ version, ...fieldsOf(d), ...(d.slug.trim() && d.slug !== p.slug ? { slug: d.slug.trim() } : {}) }),
    create,
    save,
    workflow,
    zone,
    onCreated: (made) => navigate(`/office/updates/${made}?project=${slug}`, { replace: true }),
  });
  const { values: d, change, errors: fieldErrors, refusal, setRefusal } = draft;

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

  const cover = d.coverMediaId ? (pictures.get(d.coverMediaId) ?? null) : null;
  const coverProblem = problems.find((p) => p.code === "no_cover" || (p.mediaId !== undefined && p.mediaId === d.coverMediaId));
  const areas = useMemo(() => [...new Set((milestones.data ?? []).map((m) => m.area).filter(Boolean))], [milestones.data]);
  const linked = d.milestoneIds.map((mid) => milestoneMap.get(mid) ?? ({ id: mid, name: `Milestone ${mid}` } as Milestone));
  const imagesInBody = imageIdsOf(d.body).length;
  const problemLine = (p: PublishingProblem) => <ProblemLine key={`${p.code}-${p.mediaId ?? ""}-${p.milestoneId ?? ""}`} p={p} onFixPhoto={setFixing} onShowCover={() => setDialog("cover")} />;

  return (
    <>
      <EditorShell
        {...draft.frame}
        sheet="Site office · Updates"
        title={post ? d.title || "Untitled update" : "New update"}
        noun="update"
        {...editorStateOf(post, me, zone, `/projects/${slug}/updates`)}
        audience={d.audience}
        byline={post ? `by ${post.authorName}` : null}
        waiting={WAITING_FOR}
        unsavedNote="Save the draft first; then it can be submitted for review."
        renderProblem={problemLine}
        returnHint="The writer sees this at the top of the update when they open it."
        timeZone={zone}
        aside={
          <>
            <AudienceSheet label="Who may read it" value={d.audience} onChange={(a) => change("audience", a)} error={fieldErrors.audience} />
            <Sheet label="Cover photo">
              <div ref={coverRef} data-testid="cover-field" data-problem={coverProblem ? true : undefined} className={coverProblem ? "border-2 border-bad p-1" : ""}>
                {cover ? <Picture picture={cover} eager sizes="18rem" /> : d.coverMediaId ? <p className="text-sm text-ink-soft">Photo {d.coverMediaId}</p> : <p className="text-sm text-ink-soft">None yet: lists and link previews show the cover.</p>}
                {coverProblem ? (
                  <p role="alert" className="mt-1 text-sm font-medium text-bad">
                    ▲ {coverProblem.message}
                  </p>
                ) : null}
                <div className="mt-2 flex flex-wrap gap-2">
                  <Button size="sm" onClick={() => setDialog("cover")}>
                    {d.coverMediaId ? "Change…" : "Choose a cover…"}
                  </Button>
                  {d.coverMediaId ? (
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
                      <button type="button" className="text-xs underline" aria-label={`Unlink ${m.name}`} onClick={() => change("milestoneIds", d.milestoneIds.filter((x) => x !== m.id))}>
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
              <TagPicker tags={d.tags} areas={areas} facility={facility.data} onChange={(t) => change("tags", t)} />
            </Sheet>
            {problems.length > 0 && !refusal ? (
              <Sheet label="Before it can be published">
                <ul className="flex flex-col gap-1 text-sm text-bad">{problems.map(problemLine)}</ul>
              </Sheet>
            ) : null}
            {post ? <ReviewLinksSheet kind="post" id={post.id} status={post.status} zone={zone} historyKey={postKeys.history(post.id)} /> : null}
            {post ? <RevisionSheets hooks={postRevisionHooks} id={post.id} zone={zone} onRestored={() => draft.setDirty(false)} onRestoreError={(e) => toast.error(e instanceof Error ? e.message : "Not restored.")} /> : null}
          </>
        }
      >
        {!post && !startBlank ? <DraftSuggestionPanel slug={slug} onStartBlank={() => setStartBlank(true)} /> : null}
        <TextField label="Title" value={d.title} onChange={(e) => change("title", e.target.value)} error={fieldErrors.title} maxLength={200} />
        <TextField
          label="Address"
          value={d.slug}
          onChange={(e) => change("slug", e.target.value.toLowerCase())}
          error={fieldErrors.slug}
          placeholder="made from the title when empty"
          hint={`/projects/${slug}/updates/${d.slug || "…"} — changing it later keeps the old address working.`}
        />
        <TextAreaField label="Summary" rows={2} value={d.summary} onChange={(e) => change("summary", e.target.value)} error={fieldErrors.summary} hint="One or two sentences for lists, the feed and e-mail." maxLength={600} />
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
            key={draft.generation}
            slug={slug}
            initial={d.body}
            onChange={(doc) => change("body", doc)}
            data={{ pictures, milestones: milestoneMap, problems, onFixPhoto: setFixing }}
            milestones={milestones.data ?? []}
            onPicture={addPicture}
          />
          <p className="text-xs text-ink-soft">
            {imagesInBody === 1 ? "1 photo" : `${imagesInBody} photos`} in the body. Ctrl+S saves; every save keeps a revision.
          </p>
        </div>
      </EditorShell>

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
        milestones={(milestones.data ?? []).filter((m) => !d.milestoneIds.includes(m.id))}
        title="Link a milestone"
        onClose={() => setDialog(null)}
        onChoose={(m) => {
          change("milestoneIds", [...d.milestoneIds, m.id]);
          setDialog(null);
        }}
      />
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

/** Primes who is signed in, the update (for `:id`) with its project, and the project's milestones for the pickers. */
export const postEditorLoader: RouteLoader = publishingEditorLoader(postQueryOptions, postsProjectsQueryOptions, (qc, slug) =>
  Promise.all([qc.ensureQueryData(postsProjectQueryOptions(slug)), qc.prefetchQuery(postMilestonesQueryOptions(slug))]),
);

/** `/office/updates/new` and `/office/updates/:id`: the editor, the fields, revisions and the workflow. */
export function PostEditorPage() {
  return (
    <PublishingEditorRoute
      itemQuery={postQueryOptions}
      projectsQuery={postsProjectsQueryOptions}
      projectQuery={postsProjectQueryOptions}
      form={(p) => <PostForm post={p.item} slug={p.slug} me={p.me} zone={p.zone} />}
    />
  );
}
