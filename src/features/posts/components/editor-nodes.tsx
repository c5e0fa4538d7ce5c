import { Image } from "@tiptap/extension-image";
import { mergeAttributes, Node, NodeViewWrapper, ReactNodeViewRenderer, type ReactNodeViewProps } from "@tiptap/react";
import { ALT_FROM_CAPTION_MARK } from "#shared/domain/draft-suggestion.ts";
import { Picture } from "../../../components/ui/picture.tsx";
import { ProblemAlerts } from "../../../components/ui/publishing-editor.tsx";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import { useEditorData } from "./editor-context.ts";

/** An id attribute kept in the JSON as a number and in copied HTML as `data-…`. */
const idAttr = (key: string, html: string) => ({
  default: null,
  parseHTML: (el: HTMLElement) => {
    const n = Number(el.getAttribute(html) ?? el.closest(`[${html}]`)?.getAttribute(html));
    return Number.isInteger(n) && n > 0 ? n : null;
  },
  renderHTML: (attrs: Record<string, unknown>) => ({ [html]: attrs[key] }),
});

function ImageView({ node, updateAttributes, selected, deleteNode }: ReactNodeViewProps) {
  const { pictures, problems, onFixPhoto } = useEditorData();
  const mediaId = Number(node.attrs.mediaId);
  const picture = pictures.get(mediaId);
  const mine = problems.filter((p) => p.mediaId === mediaId);
  const altMissing = picture ? !(String(node.attrs.alt ?? "").trim() || picture.altText?.trim()) : false;
  const flagged = mine.length > 0;
  return (
    <NodeViewWrapper
      as="figure"
      className={`my-4 border-2 p-2 ${flagged ? "border-bad bg-[#fbeaea]" : selected ? "border-accent" : "border-transparent"}`}
      data-media-id={mediaId}
      data-problem={flagged || undefined}
      data-testid="editor-image"
    >
      <div contentEditable={false} className="flex flex-col gap-2">
        {picture ? <Picture picture={picture} sizes="(min-width: 1024px) 640px, 100vw" alt={String(node.attrs.alt ?? "") || undefined} /> : <p className="bg-paper p-6 text-center text-sm text-ink-soft">Photo {mediaId} (loading or not in the library)</p>}
        <label className="flex flex-col gap-1 font-sans text-sm">
          <span className="font-medium">Caption</span>
          <input
            type="text"
            value={String(node.attrs.caption ?? "")}
            onChange={(e) => updateAttributes({ caption: e.target.value })}
            placeholder={picture?.caption ?? "What the photo shows, in a sentence"}
            maxLength={1000}
            className="rounded-sm border border-rule-strong bg-sheet px-2 py-1"
          />
        </label>
        <div className="flex flex-wrap items-center gap-3 font-sans text-xs text-ink-soft">
          {node.attrs.title === ALT_FROM_CAPTION_MARK && String(node.attrs.alt ?? "").trim() ? (
            // A suggested draft took this alt text from the caption (decision 061): the writer checks it.
            <span data-testid="alt-to-check">
              <strong className="text-watch">! Alt text from the caption, to check:</strong> <q>{String(node.attrs.alt)}</q>{" "}
              <button type="button" className="font-medium text-ink underline underline-offset-2" onClick={() => updateAttributes({ title: null })}>
                Checked
              </button>
            </span>
          ) : (
            <span>
              Alt text: {picture?.altText?.trim() ? <q>{picture.altText}</q> : <strong className="text-bad">▲ none yet</strong>}
            </span>
          )}
          {altMissing || flagged ? (
            <button type="button" className="font-medium text-ink underline underline-offset-2" onClick={() => onFixPhoto(mediaId)}>
              Fix this photo
            </button>
          ) : null}
          <button type="button" className="underline underline-offset-2" onClick={() => deleteNode()}>
            Remove photo
          </button>
        </div>
        <ProblemAlerts problems={mine} className="font-sans" />
      </div>
    </NodeViewWrapper>
  );
}

/** A library photo in the body: `mediaId` names it; the caption and an alt override travel with the node. */
export const PostImage = Image.extend({
  draggable: true,
  addAttributes() {
    return {
      ...this.parent?.(),
      mediaId: idAttr("mediaId", "data-media-id"),
      caption: { default: null, parseHTML: (el: HTMLElement) => el.querySelector("figcaption")?.textContent ?? null, renderHTML: () => ({}) },
    };
  },
  // Only photos from our own library come back in on paste; a pasted foreign <img> has no mediaId.
  parseHTML() {
    return [{ tag: "figure[data-media-id]" }, { tag: "img[data-media-id]" }];
  },
  renderHTML({ HTMLAttributes }) {
    return ["img", mergeAttributes(HTMLAttributes)];
  },
  addNodeView() {
    return ReactNodeViewRenderer(ImageView);
  },
}).configure({ inline: false, allowBase64: false });

function MilestoneView({ node, selected, deleteNode }: ReactNodeViewProps) {
  const { milestones, problems } = useEditorData();
  const id = Number(node.attrs.milestoneId);
  const m = milestones.get(id);
  const mine = problems.filter((p) => p.milestoneId === id);
  return (
    <NodeViewWrapper
      as="aside"
      className={`my-4 border-l-4 bg-paper px-4 py-3 font-sans ${mine.length ? "border-bad" : selected ? "border-accent" : "border-ink"}`}
      data-milestone-id={id}
      data-testid="editor-milestone"
    >
      <div contentEditable={false}>
        <p className="label-caps">Milestone</p>
        <p className="font-semibold">{m ? m.name : `Milestone ${id} (not in this programme)`}</p>
        {m ? (
          <p className="mt-1 flex flex-wrap items-center gap-x-3 text-sm">
            <StatusMark status={m.status} />
            <span className="text-ink-soft">
              {m.actualFinish ? `finished ${formatDate(m.actualFinish)}` : `forecast ${formatDate(m.forecastFinish ?? m.baselineFinish)}`} · {Math.round(m.percentComplete)}% complete
            </span>
          </p>
        ) : null}
        <ProblemAlerts problems={mine} className="mt-1" />
        <button type="button" className="mt-1 text-xs underline underline-offset-2" onClick={() => deleteNode()}>
          Remove block
        </button>
      </div>
    </NodeViewWrapper>
  );
}

/** A block naming a programme milestone; the page shows its status as it stood at publication. */
export const MilestoneBlock = Node.create({
  name: "milestone",
  group: "block",
  atom: true,
  draggable: true,
  addAttributes() {
    return { milestoneId: idAttr("milestoneId", "data-milestone-id") };
  },
  parseHTML() {
    return [{ tag: "aside[data-milestone-id]" }];
  },
  renderHTML({ HTMLAttributes }) {
    return ["aside", mergeAttributes(HTMLAttributes)];
  },
  addNodeView() {
    return ReactNodeViewRenderer(MilestoneView);
  },
});
