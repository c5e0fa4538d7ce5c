import { Link } from "@tiptap/extension-link";
import { EditorContent, useEditor, useEditorState, type Editor } from "@tiptap/react";
import { StarterKit } from "@tiptap/starter-kit";
import { useState, type ReactNode } from "react";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import { HEADING_LEVELS, LinkHrefSchema, type RichTextDoc } from "#shared/schemas/rich-text.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { TextField } from "../../../components/ui/field.tsx";
import { PROSE_EDITOR } from "./editor-style.ts";
import { EditorDataContext, type EditorData } from "./editor-context.ts";
import { MediaPickerDialog } from "./media-picker.tsx";
import { MilestoneBlock, PostImage } from "./editor-nodes.tsx";
import { MilestonePickerDialog } from "./milestone-picker.tsx";
import { onSubmitted } from "../../../lib/forms.ts";

/** The editor's node set: exactly what src/shared/schemas/rich-text.ts accepts. */
function extensions() {
  return [
    StarterKit.configure({ heading: { levels: [...HEADING_LEVELS] }, codeBlock: false, link: false }),
    Link.configure({
      openOnClick: false,
      autolink: true,
      defaultProtocol: "https",
      HTMLAttributes: { target: null, rel: null },
      isAllowedUri: (url) => LinkHrefSchema.safeParse(url).success,
    }),
    PostImage,
    MilestoneBlock,
  ];
}

function ToolButton({ label, pressed, onClick, children, disabled }: { label: string; pressed?: boolean; onClick: () => void; children: ReactNode; disabled?: boolean }) {
  return (
    <button
      type="button"
      aria-label={label}
      title={label}
      aria-pressed={pressed === undefined ? undefined : pressed}
      disabled={disabled}
      onMouseDown={(e) => e.preventDefault()}
      onClick={onClick}
      className={`min-w-8 rounded-sm border px-2 py-1 text-sm disabled:opacity-40 ${pressed ? "border-ink bg-ink text-sheet" : "border-transparent hover:border-rule-strong"}`}
    >
      {children}
    </button>
  );
}

function Toolbar({ editor, onPhoto, onMilestone, onLink }: { editor: Editor; onPhoto: () => void; onMilestone: () => void; onLink: () => void }) {
  const s = useEditorState({
    editor,
    selector: ({ editor: e }) => ({
      block: e.isActive("heading", { level: 2 }) ? "h2" : e.isActive("heading", { level: 3 }) ? "h3" : e.isActive("heading", { level: 4 }) ? "h4" : "p",
      bold: e.isActive("bold"),
      italic: e.isActive("italic"),
      bullet: e.isActive("bulletList"),
      ordered: e.isActive("orderedList"),
      quote: e.isActive("blockquote"),
      link: e.isActive("link"),
      canUndo: e.can().undo(),
      canRedo: e.can().redo(),
    }),
  });
  const setBlock = (v: string) => {
    const chain = editor.chain().focus();
    if (v === "p") chain.setParagraph().run();
    else chain.setHeading({ level: Number(v.slice(1)) as 2 | 3 | 4 }).run();
  };
  return (
    <div role="toolbar" aria-label="Formatting" className="sticky top-0 z-10 flex flex-wrap items-center gap-1 border-b border-rule bg-sheet px-2 py-1.5">
      <label className="sr-only" htmlFor="block-type">
        Text style
      </label>
      <select id="block-type" value={s.block} onChange={(e) => setBlock(e.target.value)} className="rounded-sm border border-rule-strong bg-sheet px-1.5 py-1 text-sm">
        <option value="p">Paragraph</option>
        <option value="h2">Heading</option>
        <option value="h3">Subheading</option>
        <option value="h4">Minor heading</option>
      </select>
      <span aria-hidden className="mx-1 h-5 w-px bg-rule" />
      <ToolButton label="Bold" pressed={s.bold} onClick={() => editor.chain().focus().toggleBold().run()}>
        <strong>B</strong>
      </ToolButton>
      <ToolButton label="Italic" pressed={s.italic} onClick={() => editor.chain().focus().toggleItalic().run()}>
        <em className="font-serif">I</em>
      </ToolButton>
      <ToolButton label="Link" pressed={s.link} onClick={onLink}>
        Link
      </ToolButton>
      <span aria-hidden className="mx-1 h-5 w-px bg-rule" />
      <ToolButton label="Bulleted list" pressed={s.bullet} onClick={() => editor.chain().focus().toggleBulletList().run()}>
        • List
      </ToolButton>
      <ToolButton label="Numbered list" pressed={s.ordered} onClick={() => editor.chain().focus().toggleOrderedList().run()}>
        1. List
      </ToolButton>
      <ToolButton label="Quote" pressed={s.quote} onClick={() => editor.chain().focus().toggleBlockquote().run()}>
        “ Quote
      </ToolButton>
      <span aria-hidden className="mx-1 h-5 w-px bg-rule" />
      <ToolButton label="Insert a photo from the library" onClick={onPhoto}>
        + Photo
      </ToolButton>
      <ToolButton label="Insert a milestone block" onClick={onMilestone}>
        + Milestone
      </ToolButton>
      <span aria-hidden className="mx-1 h-5 w-px bg-rule" />
      <ToolButton label="Undo" disabled={!s.canUndo} onClick={() => editor.chain().focus().undo().run()}>
        ↶
      </ToolButton>
      <ToolButton label="Redo" disabled={!s.canRedo} onClick={() => editor.chain().focus().redo().run()}>
        ↷
      </ToolButton>
    </div>
  );
}

function LinkDialog({ editor, open, onClose }: { editor: Editor; open: boolean; onClose: () => void }) {
  const current = String(editor.getAttributes("link").href ?? "");
  const [href, setHref] = useState(current);
  const [error, setError] = useState<string | undefined>();
  const apply = () => {
    if (!href.trim()) {
      editor.chain().focus().extendMarkRange("link").unsetLink().run();
      onClose();
      return;
    }
    const parsed = LinkHrefSchema.safeParse(href.trim());
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? "is not a usable link");
      return;
    }
    editor.chain().focus().extendMarkRange("link").setLink({ href: parsed.data }).run();
    onClose();
  };
  return (
    <Dialog
      open={open}
      title="Link"
      onClose={onClose}
      dismiss="Cancel"
      footer={
        <Button variant="primary" onClick={apply}>
          {href.trim() ? "Set the link" : "Remove the link"}
        </Button>
      }
    >
      <form
        onSubmit={onSubmitted(() => apply())}
      >
        <TextField label="Address" value={href} onChange={(e) => setHref(e.target.value)} placeholder="https://… or /projects/…" error={error} hint="An http(s) or mailto address, or a path on this site. Leave empty to remove the link." />
      </form>
    </Dialog>
  );
}

/**
 * The body editor: headings, lists, quotes, links, photos from the media library (each
 * with its caption) and milestone blocks that show the milestone's status. Emits the
 * editor's JSON, which the server validates against the shared schema.
 */
export function RichTextEditor({
  slug,
  initial,
  onChange,
  data,
  milestones,
  onPicture,
  label = "Body of the update",
}: {
  slug: string;
  initial: RichTextDoc;
  onChange: (doc: RichTextDoc) => void;
  data: EditorData;
  milestones: readonly Milestone[];
  /** A photo was inserted: the page keeps its picture for previews. */
  onPicture: (p: MediaPicture) => void;
  /** What the text box is called to a screen reader (a report's commentary reuses this editor). */
  label?: string;
}) {
  const [picker, setPicker] = useState<"photo" | "milestone" | "link" | null>(null);
  const editor = useEditor({
    extensions: extensions(),
    content: initial,
    immediatelyRender: true,
    shouldRerenderOnTransaction: false,
    editorProps: { attributes: { class: `${PROSE_EDITOR} min-h-72 px-4 py-3 focus:outline-none`, "aria-label": label, "aria-multiline": "true", role: "textbox" } },
    onUpdate: ({ editor: e }) => onChange(e.getJSON() as RichTextDoc),
  });
  if (!editor) return null;
  return (
    <EditorDataContext.Provider value={data}>
      <div className="border border-rule-strong bg-sheet focus-within:border-ink" data-testid="rich-text-editor">
        <Toolbar editor={editor} onPhoto={() => setPicker("photo")} onMilestone={() => setPicker("milestone")} onLink={() => setPicker("link")} />
        <EditorContent editor={editor} />
      </div>
      <MediaPickerDialog
        slug={slug}
        open={picker === "photo"}
        title="Insert a photo from the library"
        onClose={() => setPicker(null)}
        onChoose={(item, picture) => {
          onPicture(picture);
          const small = picture.sources.webp.find((v) => v.width >= 640) ?? picture.sources.webp[0] ?? picture.sources.jpeg[0];
          editor
            .chain()
            .focus()
            .insertContent({ type: "image", attrs: { mediaId: item.id, src: small?.url ?? null, caption: item.caption ?? null } })
            .run();
          setPicker(null);
        }}
      />
      <MilestonePickerDialog
        open={picker === "milestone"}
        milestones={milestones}
        title="Insert a milestone block"
        onClose={() => setPicker(null)}
        onChoose={(m) => {
          editor.chain().focus().insertContent({ type: "milestone", attrs: { milestoneId: m.id } }).run();
          setPicker(null);
        }}
      />
      {picker === "link" ? <LinkDialog editor={editor} open onClose={() => setPicker(null)} /> : null}
    </EditorDataContext.Provider>
  );
}
