import { z } from "zod";
import { foldLines, stripControls } from "./text.ts";

/**
 * The rich-text document of posts: the editor's (tiptap/ProseMirror) JSON, limited to the
 * nodes and marks Plumbline's editor offers. The server refuses any other node or mark type,
 * renders the document to HTML with the same set and sanitises the result.
 *
 * Nodes: doc, paragraph, text, heading (levels 2–4; the post title is the page's h1),
 * bulletList, orderedList, listItem, blockquote, hardBreak, horizontalRule,
 * image (a media-library photo by `mediaId`, with an optional `alt` override and `caption`)
 * and milestone (a block naming a programme milestone by `milestoneId`).
 * Marks: bold, italic, strike, underline, code, link (`href` http(s), mailto or a same-site path).
 *
 * The editor may send the attributes tiptap keeps with default values (`null`); unknown
 * attributes are dropped, unknown node and mark types are refused.
 *
 * Control characters (see text.ts) are removed rather than refused: a body is pasted from
 * anywhere, and one stray character should not cost the writer the whole document. Text keeps
 * tab and line breaks. In attribute values a link target loses them too, as a browser's URL
 * parser would; alt text, captions and titles get a space for each run of them. A text node
 * left empty is dropped.
 */

export const RICH_TEXT_NODE_TYPES = [
  "doc",
  "paragraph",
  "text",
  "heading",
  "bulletList",
  "orderedList",
  "listItem",
  "blockquote",
  "hardBreak",
  "horizontalRule",
  "image",
  "milestone",
] as const;
export type RichTextNodeType = (typeof RICH_TEXT_NODE_TYPES)[number];

export const RICH_TEXT_MARK_TYPES = ["bold", "italic", "strike", "underline", "code", "link"] as const;
export type RichTextMarkType = (typeof RICH_TEXT_MARK_TYPES)[number];

/** Heading levels the editor offers: the page title is the h1. */
export const HEADING_LEVELS = [2, 3, 4] as const;

/** Deepest nesting accepted (lists in quotes in lists…); far beyond what an update needs. */
export const MAX_RICH_TEXT_DEPTH = 24;
/** Most nodes in one document. */
export const MAX_RICH_TEXT_NODES = 20_000;

const SAFE_HREF = /^(https?:\/\/|mailto:|\/(?!\/)|#)/i;

/** A link target: http(s), mailto, a same-site path or an in-page anchor. Nothing else (no javascript:, data:, vbscript:). */
export const LinkHrefSchema = z
  .string()
  .trim()
  .min(1, "is empty")
  .max(2000, "is too long")
  // Browsers read "/\host" like "//host", another site; no backslashes at all.
  .refine((href) => SAFE_HREF.test(href) && !/[\u0000-\u0020\\]/.test(href), "must be an http(s), mailto or same-site link");

const describeType = (input: unknown): string => {
  const type = input && typeof input === "object" ? (input as { type?: unknown }).type : undefined;
  return typeof type === "string" ? `type "${type.slice(0, 40)}"` : "no type";
};

const NoAttrs = z.object({}).optional();

export const RichTextMarkSchema = z.discriminatedUnion("type", [
  z.strictObject({ type: z.literal("bold"), attrs: NoAttrs }),
  z.strictObject({ type: z.literal("italic"), attrs: NoAttrs }),
  z.strictObject({ type: z.literal("strike"), attrs: NoAttrs }),
  z.strictObject({ type: z.literal("underline"), attrs: NoAttrs }),
  z.strictObject({ type: z.literal("code"), attrs: NoAttrs }),
  z.strictObject({
    type: z.literal("link"),
    attrs: z.object({
      href: LinkHrefSchema,
      // Kept by tiptap with defaults; the server sets its own rel/target.
      target: z.string().max(20).nullable().optional(),
      rel: z.string().max(100).nullable().optional(),
      class: z.string().max(100).nullable().optional(),
      title: z.string().max(300).nullable().optional(),
    }),
  }),
], { error: (iss) => (iss.code === "invalid_union" ? `is not a mark the editor offers (${describeType(iss.input)})` : undefined) });
export type RichTextMark = z.infer<typeof RichTextMarkSchema>;

/** The attributes of an inline image: which library photo, an optional alt override and a caption. */
export const ImageAttrsSchema = z.object({
  mediaId: z.number({ error: "must name a photo from the media library" }).int().positive(),
  /** When set, used instead of the photo's library alt text in this post. */
  alt: z.string().trim().max(500).nullable().optional(),
  caption: z.string().trim().max(1000).nullable().optional(),
  /** The editor's preview URL; ignored by the server, which picks the derivatives itself. */
  src: z.string().max(2000).nullable().optional(),
  title: z.string().max(300).nullable().optional(),
  width: z.number().nullable().optional(),
  height: z.number().nullable().optional(),
});
export type ImageAttrs = z.infer<typeof ImageAttrsSchema>;

export const MilestoneAttrsSchema = z.object({
  milestoneId: z.number({ error: "must name a milestone" }).int().positive(),
});

/** One node of the document tree. */
export interface RichTextNode {
  type: RichTextNodeType;
  attrs?: Record<string, unknown>;
  content?: RichTextNode[];
  marks?: RichTextMark[];
  text?: string;
}

/** A whole document (`type: "doc"`). */
export interface RichTextDoc extends RichTextNode {
  type: "doc";
  content: RichTextNode[];
}

// Each node type is a strict object so a stray key or unknown type is refused with a path.
const Inline: z.ZodType<RichTextNode> = z.lazy(() =>
  z.discriminatedUnion("type", [
    z.strictObject({
      type: z.literal("text"),
      text: z.string().min(1, "is empty").max(100_000),
      marks: z.array(RichTextMarkSchema).max(12).optional(),
    }),
    z.strictObject({ type: z.literal("hardBreak"), attrs: NoAttrs, marks: z.array(RichTextMarkSchema).max(12).optional() }),
  ], { error: (iss) => (iss.code === "invalid_union" ? `is not inline content the editor offers (${describeType(iss.input)})` : undefined) }),
);

const Block: z.ZodType<RichTextNode> = z.lazy(() =>
  z.discriminatedUnion("type", [
    z.strictObject({
      type: z.literal("paragraph"),
      attrs: z.object({ textAlign: z.string().nullable().optional() }).optional(),
      content: z.array(Inline).max(5000).optional(),
    }),
    z.strictObject({
      type: z.literal("heading"),
      attrs: z.object({
        level: z.number().int().refine((l) => (HEADING_LEVELS as readonly number[]).includes(l), "must be a heading level of 2, 3 or 4"),
      }),
      content: z.array(Inline).max(5000).optional(),
    }),
    z.strictObject({ type: z.literal("bulletList"), attrs: NoAttrs, content: z.array(ListItem).min(1).max(1000) }),
    z.strictObject({
      type: z.literal("orderedList"),
      attrs: z.object({ start: z.number().int().min(0).max(100_000).nullable().optional(), type: z.string().max(5).nullable().optional() }).optional(),
      content: z.array(ListItem).min(1).max(1000),
    }),
    z.strictObject({ type: z.literal("blockquote"), attrs: NoAttrs, content: z.array(Block).min(1).max(1000) }),
    z.strictObject({ type: z.literal("horizontalRule"), attrs: NoAttrs }),
    z.strictObject({ type: z.literal("image"), attrs: ImageAttrsSchema }),
    z.strictObject({ type: z.literal("milestone"), attrs: MilestoneAttrsSchema }),
  ], { error: (iss) => (iss.code === "invalid_union" ? `is not a block the editor offers (${describeType(iss.input)})` : undefined) }),
);

const ListItem: z.ZodType<RichTextNode> = z.lazy(() =>
  z.strictObject({ type: z.literal("listItem"), attrs: NoAttrs, content: z.array(Block).min(1).max(1000) }),
);

function depthAndCount(value: unknown, depth: number, acc: { nodes: number; depth: number }): void {
  if (acc.depth > MAX_RICH_TEXT_DEPTH || acc.nodes > MAX_RICH_TEXT_NODES) return;
  if (!value || typeof value !== "object") return;
  acc.nodes += 1;
  acc.depth = Math.max(acc.depth, depth);
  const content = (value as { content?: unknown }).content;
  if (Array.isArray(content)) for (const child of content) depthAndCount(child, depth + 1, acc);
}

const cleanAttr = (key: string, value: string) => (key === "href" ? stripControls(value, false) : foldLines(stripControls(value)));

const cleanAttrs = (attrs: unknown): unknown => {
  if (!attrs || typeof attrs !== "object" || Array.isArray(attrs)) return attrs;
  return Object.fromEntries(Object.entries(attrs).map(([k, v]) => [k, typeof v === "string" ? cleanAttr(k, v) : v]));
};

const cleanMarks = (marks: unknown): unknown =>
  Array.isArray(marks) ? marks.map((m) => (m && typeof m === "object" && !Array.isArray(m) && "attrs" in m ? { ...m, attrs: cleanAttrs(m.attrs) } : m)) : marks;

/**
 * The document with control characters removed from text nodes and from the string values of
 * node and mark attributes. Runs on the raw input after the depth check (so recursion is
 * bounded); anything not shaped like a node is left for the shape check to refuse.
 */
function cleanNode(value: unknown): unknown {
  if (!value || typeof value !== "object" || Array.isArray(value)) return value;
  const node = { ...(value as Record<string, unknown>) };
  if (typeof node.text === "string") node.text = stripControls(node.text);
  if ("attrs" in node) node.attrs = cleanAttrs(node.attrs);
  if ("marks" in node) node.marks = cleanMarks(node.marks);
  if (Array.isArray(node.content)) node.content = node.content.filter((child) => !onlyControls(child)).map(cleanNode);
  return node;
}

/** A text node that had text and would have none left. */
function onlyControls(value: unknown): boolean {
  const text = value && typeof value === "object" ? (value as { type?: unknown; text?: unknown }) : null;
  return text?.type === "text" && typeof text.text === "string" && text.text !== "" && stripControls(text.text) === "";
}

/** A stored or received document with control characters removed (see above); the renderer applies it to older bodies too. */
export function cleanRichText<T>(doc: T): T {
  return cleanNode(doc) as T;
}

const DocShape = z.strictObject({
  type: z.literal("doc", { error: 'must be a document (type "doc")' }),
  attrs: NoAttrs,
  content: z.array(Block).max(5000),
});

/**
 * A post body. The depth and size are checked before the tree is walked, so a hostile
 * document cannot exhaust the stack.
 */
export const RichTextDocSchema = z
  .custom<unknown>((v) => {
    if (!v || typeof v !== "object" || Array.isArray(v)) return false;
    const acc = { nodes: 0, depth: 0 };
    depthAndCount(v, 1, acc);
    return acc.depth <= MAX_RICH_TEXT_DEPTH && acc.nodes <= MAX_RICH_TEXT_NODES;
  }, `must be an editor document (at most ${MAX_RICH_TEXT_DEPTH} levels deep and ${MAX_RICH_TEXT_NODES} nodes)`)
  .transform(cleanNode)
  .pipe(DocShape) as unknown as z.ZodType<RichTextDoc>;

/** An empty document: one empty paragraph, as the editor starts. */
export const EMPTY_RICH_TEXT_DOC: RichTextDoc = { type: "doc", content: [{ type: "paragraph" }] };

/** Every node of a document, depth first, in document order. */
export function walkRichText(node: RichTextNode, visit: (n: RichTextNode) => void): void {
  visit(node);
  for (const child of node.content ?? []) walkRichText(child, visit);
}

/** The ids a document's nodes of one type carry in one attribute, in order of first appearance. */
function idsOfNodes(doc: RichTextDoc, type: string, attr: string): number[] {
  const ids: number[] = [];
  walkRichText(doc, (n) => {
    if (n.type === type) {
      const id = Number((n.attrs as Record<string, unknown>)[attr]);
      if (!ids.includes(id)) ids.push(id);
    }
  });
  return ids;
}

/** The media ids of a document's inline images, in order of first appearance. */
export const imageIdsOf = (doc: RichTextDoc): number[] => idsOfNodes(doc, "image", "mediaId");

/** The milestone ids of a document's milestone blocks, in order of first appearance. */
export const milestoneBlockIdsOf = (doc: RichTextDoc): number[] => idsOfNodes(doc, "milestone", "milestoneId");
