import { Node, type Extensions } from "@tiptap/core";
import { generateHTML } from "@tiptap/html/server";
import { StarterKit } from "@tiptap/starter-kit";
import sanitizeHtml from "sanitize-html";
import { formatLongDate } from "#shared/domain/locale-dates.ts";
import type { MediaPicture, MilestoneSnapshot } from "#shared/schemas/posts.ts";
import { cleanRichText, HEADING_LEVELS, type RichTextDoc, type RichTextNode } from "#shared/schemas/rich-text.ts";

/**
 * Renders a post body (the editor's JSON, already validated by RichTextDocSchema) to the one
 * sanitised HTML that serves the page, the feed and e-mail. The node set matches
 * src/shared/schemas/rich-text.ts; the editor builds the same nodes on the client.
 */

/** What a milestone block shows: the figures captured at publication, or today's before it. */
export interface MilestoneBlockData extends MilestoneSnapshot {
  name: string;
}

export interface RenderContext {
  pictures: ReadonlyMap<number, MediaPicture>;
  milestones: ReadonlyMap<number, MilestoneBlockData>;
}

/** Milestone status in words and shape (the same marks the client's StatusMark uses). */
export const STATUS_MARKS: Record<MilestoneSnapshot["status"], { word: string; glyph: string }> = {
  complete: { word: "Complete", glyph: "●" },
  on_programme: { word: "On programme", glyph: "○" },
  at_risk: { word: "At risk", glyph: "▲" },
  behind: { word: "Behind", glyph: "■" },
};

/** `YYYY-MM-DD` → "14 March 2027" (a calendar date: no time zone involved). */
export function dateInWords(date: string): string {
  return formatLongDate(date.slice(0, 10));
}

/** Inline images sit in a text column of about 45 rem. */
/** The figure of a photo that cannot be shown (missing, or not for this reader): its words, no image. */
const MISSING_PHOTO = "This photo is not available.";

/**
 * Published HTML with the figures of the given photos replaced by the "not available" figure. The
 * HTML is our own rendering (`renderRichText`), so a figure is found by its class and media id.
 */
export function withoutPhotos(html: string, mediaIds: readonly number[]): string {
  if (mediaIds.length === 0) return html;
  const hidden = new Set(mediaIds.map(String));
  return html.replace(/<figure class="post-image" data-media-id="(\d+)">[\s\S]*?<\/figure>/g, (figure, id: string) =>
    hidden.has(id) ? `<figure class="post-image post-image-missing" data-media-id="${id}"><figcaption>${MISSING_PHOTO}</figcaption></figure>` : figure,
  );
}

export const INLINE_SIZES = "(min-width: 48rem) 720px, 100vw";

const srcset = (variants: MediaPicture["sources"]["jpeg"]) => variants.map((v) => `${v.url} ${v.width}w`).join(", ");

/** The fallback `src`: the JPEG nearest 1024 px wide (the middle of the usual range). */
function fallbackOf(p: MediaPicture): string | null {
  const jpeg = [...p.sources.jpeg].sort((a, b) => Math.abs(a.width - 1024) - Math.abs(b.width - 1024));
  return jpeg[0]?.url ?? p.sources.webp[0]?.url ?? p.sources.avif[0]?.url ?? null;
}

/**
 * A `<picture>` as a ProseMirror DOM spec: AVIF and WebP sources, a JPEG `<img>` with srcset,
 * sizes, intrinsic width and height (so nothing shifts while loading), lazy loading and the
 * dominant colour painted underneath.
 */
export function pictureSpec(p: MediaPicture, alt: string, sizes: string, lazy = true): unknown[] {
  const sources: unknown[] = [];
  if (p.sources.avif.length) sources.push(["source", { type: "image/avif", srcset: srcset(p.sources.avif), sizes }]);
  if (p.sources.webp.length) sources.push(["source", { type: "image/webp", srcset: srcset(p.sources.webp), sizes }]);
  const img: Record<string, string> = {
    src: fallbackOf(p) ?? "",
    alt,
    width: String(p.width),
    height: String(p.height),
    loading: lazy ? "lazy" : "eager",
    decoding: "async",
  };
  if (p.sources.jpeg.length) {
    img.srcset = srcset(p.sources.jpeg);
    img.sizes = sizes;
  }
  if (p.dominantColor && /^#[0-9a-f]{6}$/i.test(p.dominantColor)) img.style = `background-color: ${p.dominantColor}`;
  return ["picture", {}, ...sources, ["img", img]];
}

function buildExtensions(ctx: RenderContext): Extensions {
  const PostImage = Node.create({
    name: "image",
    group: "block",
    atom: true,
    addAttributes() {
      return {
        mediaId: { default: null, rendered: false },
        alt: { default: null, rendered: false },
        caption: { default: null, rendered: false },
        src: { default: null, rendered: false },
        title: { default: null, rendered: false },
        width: { default: null, rendered: false },
        height: { default: null, rendered: false },
      };
    },
    renderHTML({ node }) {
      const mediaId = Number(node.attrs.mediaId);
      const picture = ctx.pictures.get(mediaId);
      const caption = String(node.attrs.caption ?? "").trim() || picture?.caption?.trim() || "";
      if (!picture) {
        return ["figure", { class: "post-image post-image-missing", "data-media-id": String(mediaId) }, ["figcaption", {}, caption || MISSING_PHOTO]];
      }
      const alt = String(node.attrs.alt ?? "").trim() || (picture.altText ?? "").trim();
      const parts: unknown[] = [pictureSpec(picture, alt, INLINE_SIZES)];
      const credit = picture.credit?.trim();
      if (caption || credit) {
        parts.push(["figcaption", {}, caption, ...(credit ? [" ", ["span", { class: "post-image-credit" }, `Photo: ${credit}`]] : [])]);
      }
      // The shape of a DOMOutputSpec is recursive arrays; the cast saves restating its type.
      return ["figure", { class: "post-image", "data-media-id": String(mediaId) }, ...parts] as never;
    },
  });

  const MilestoneBlock = Node.create({
    name: "milestone",
    group: "block",
    atom: true,
    addAttributes() {
      return { milestoneId: { default: null, rendered: false } };
    },
    renderHTML({ node }) {
      const id = Number(node.attrs.milestoneId);
      const m = ctx.milestones.get(id);
      if (!m) return ["aside", { class: "milestone-block", "data-milestone-id": String(id) }, ["p", { class: "milestone-name" }, "A programme milestone (not shown here)"]];
      const mark = STATUS_MARKS[m.status];
      const dates: string[] = [];
      if (m.actualFinish) dates.push(`finished ${dateInWords(m.actualFinish)}`);
      else if (m.forecastFinish) dates.push(`forecast ${dateInWords(m.forecastFinish)}`);
      if (m.baselineFinish) dates.push(`baseline ${dateInWords(m.baselineFinish)}`);
      if (!m.actualFinish) dates.push(`${Math.round(m.percentComplete)} % complete`);
      return [
        "aside",
        { class: "milestone-block", "data-milestone-id": String(id) },
        ["p", { class: "milestone-name" }, m.name],
        [
          "p",
          { class: "milestone-figures" },
          ["span", { class: `milestone-status status-${m.status}` }, `${mark.glyph} ${mark.word}`],
          ` · ${dates.join(" · ")}`,
        ],
      ] as never;
    },
  });

  return [
    StarterKit.configure({
      heading: { levels: [...HEADING_LEVELS] },
      codeBlock: false,
      undoRedo: false,
      dropcursor: false,
      gapcursor: false,
      trailingNode: false,
      listKeymap: false,
      link: {
        openOnClick: false,
        autolink: false,
        protocols: [],
        HTMLAttributes: { rel: "noopener noreferrer nofollow", target: null, class: null },
      },
    }),
    PostImage,
    MilestoneBlock,
  ];
}

const STATUS_CLASSES = Object.keys(STATUS_MARKS).map((s) => `status-${s}`);

/** The allow-list: the elements and attributes our renderer makes, and nothing else. */
export const SANITIZE_OPTIONS: sanitizeHtml.IOptions = {
  allowedTags: ["p", "h2", "h3", "h4", "ul", "ol", "li", "blockquote", "strong", "em", "s", "u", "code", "a", "br", "hr", "figure", "figcaption", "picture", "source", "img", "aside", "span"],
  allowedAttributes: {
    a: ["href", "rel"],
    ol: ["start"],
    figure: ["class", "data-media-id"],
    aside: ["class", "data-milestone-id"],
    p: ["class"],
    span: ["class"],
    source: ["type", "srcset", "sizes"],
    img: ["src", "srcset", "sizes", "alt", "width", "height", "loading", "decoding", "style"],
  },
  allowedClasses: {
    figure: ["post-image", "post-image-missing"],
    aside: ["milestone-block"],
    p: ["milestone-name", "milestone-figures"],
    span: ["milestone-status", "post-image-credit", ...STATUS_CLASSES],
  },
  allowedStyles: { img: { "background-color": [/^#[0-9a-f]{6}$/i] } },
  allowedSchemes: ["http", "https", "mailto"],
  allowedSchemesByTag: { img: [], source: [] },
  allowedSchemesAppliedToAttributes: ["href", "src", "srcset"],
  allowProtocolRelative: false,
  allowedIframeHostnames: [],
  selfClosing: ["img", "br", "hr", "source"],
  disallowedTagsMode: "discard",
  // Script and style contents go with their tags; they are never text worth keeping.
  nonTextTags: ["script", "style", "textarea", "option", "noscript", "svg", "math", "template", "iframe", "object"],
  transformTags: {
    a: (tagName, attribs) => ({ tagName, attribs: { ...attribs, rel: "noopener noreferrer nofollow" } }),
  },
};

/** Sanitises HTML against the allow-list above. */
export function sanitizePostHtml(html: string): string {
  return sanitizeHtml(html, SANITIZE_OPTIONS);
}

/**
 * Renders a validated document to sanitised HTML. Bodies stored before control characters were
 * removed on input are cleaned here too, so no page, feed or e-mail carries one.
 */
export function renderRichText(doc: RichTextDoc, ctx: RenderContext): string {
  const raw = generateHTML(cleanRichText(doc) as never, buildExtensions(ctx));
  return sanitizePostHtml(raw);
}

/**
 * The document as plain text, one block a line (for full-text search and revision diffs).
 * Images show as their caption, milestone blocks as the milestone's name.
 */
export function plainTextOf(doc: RichTextDoc, ctx?: Partial<RenderContext>): string {
  const lines: string[] = [];
  const inlineText = (n: RichTextNode): string => {
    if (n.type === "text") return n.text ?? "";
    if (n.type === "hardBreak") return "\n";
    return (n.content ?? []).map(inlineText).join("");
  };
  const block = (n: RichTextNode, prefix: string) => {
    switch (n.type) {
      case "paragraph":
      case "heading": {
        const text = inlineText(n).trim();
        if (text) lines.push(prefix + text);
        return;
      }
      case "bulletList":
      case "orderedList":
        (n.content ?? []).forEach((li, i) => {
          const marker = n.type === "bulletList" ? "• " : `${i + 1}. `;
          (li.content ?? []).forEach((child, j) => block(child, prefix + (j === 0 ? marker : "   ")));
        });
        return;
      case "blockquote":
        (n.content ?? []).forEach((child) => block(child, prefix + "> "));
        return;
      case "horizontalRule":
        lines.push(prefix + "—");
        return;
      case "image": {
        const id = Number(n.attrs?.mediaId);
        const caption = String(n.attrs?.caption ?? "").trim() || ctx?.pictures?.get(id)?.caption?.trim() || "";
        lines.push(`${prefix}[Photo${caption ? `: ${caption}` : ""}]`);
        return;
      }
      case "milestone": {
        const id = Number(n.attrs?.milestoneId);
        const name = ctx?.milestones?.get(id)?.name;
        lines.push(`${prefix}[Milestone${name ? `: ${name}` : ""}]`);
        return;
      }
      default:
        (n.content ?? []).forEach((child) => block(child, prefix));
    }
  };
  (cleanRichText(doc).content ?? []).forEach((n) => block(n, ""));
  return lines.join("\n");
}

/** Prefixes same-site paths in href/src/srcset with the public address (feeds and e-mail are read elsewhere). */
export function absolutizeHtml(html: string, publicUrl: string): string {
  const base = publicUrl.replace(/\/+$/, "");
  const abs = (u: string) => (u.startsWith("/") && !u.startsWith("//") ? base + u : u);
  return sanitizeHtml(html, {
    ...SANITIZE_OPTIONS,
    // Photos are then absolute URLs of our own derivatives.
    allowedSchemesByTag: { img: ["https", "http"], source: ["https", "http"] },
    transformTags: {
      ...SANITIZE_OPTIONS.transformTags,
      "*": (tagName, attribs) => {
        const next = { ...attribs };
        if (next.href) next.href = abs(next.href);
        if (next.src) next.src = abs(next.src);
        if (next.srcset) next.srcset = next.srcset.split(",").map((part) => {
          const [url, ...rest] = part.trim().split(/\s+/);
          return [abs(url ?? ""), ...rest].join(" ");
        }).join(", ");
        return { tagName, attribs: next };
      },
    },
  });
}
