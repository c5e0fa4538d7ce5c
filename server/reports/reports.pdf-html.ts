/**
 * The lead's commentary arrives as HTML our own sanitiser produced (server/posts/rich-text.ts: a
 * short list of tags, no attributes that matter here), so a small walker is enough to lay it out
 * in the PDF: paragraphs, headings, list items and quotes, with bold and italic runs. Pictures and
 * embeds in commentary are left out of the PDF (the report has its own photographs section).
 */

export interface CommentaryRun {
  text: string;
  bold: boolean;
  italic: boolean;
}

export type CommentaryBlock =
  | { kind: "paragraph" | "heading" | "quote"; runs: CommentaryRun[] }
  | { kind: "item"; bullet: string; runs: CommentaryRun[] };

const ENTITIES: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'", nbsp: "\u00a0" };

function decode(text: string): string {
  return text.replace(/&(#x[0-9a-f]+|#\d+|[a-z]+);/gi, (whole, name: string) => {
    if (name[0] === "#") return String.fromCodePoint(name[1]?.toLowerCase() === "x" ? parseInt(name.slice(2), 16) : parseInt(name.slice(1), 10));
    return ENTITIES[name.toLowerCase()] ?? whole;
  });
}

const BLOCK = new Set(["p", "h2", "h3", "h4", "li", "blockquote", "figure", "hr"]);
const SKIPPED = new Set(["figure", "picture", "figcaption", "img", "source"]);

/** Sanitised HTML (or plain text) → blocks of styled runs, in reading order. */
export function commentaryBlocks(html: string): CommentaryBlock[] {
  if (!/<[a-z][^>]*>/i.test(html)) {
    return html
      .split(/\n\s*\n/)
      .map((p) => p.trim())
      .filter(Boolean)
      .map((p) => ({ kind: "paragraph", runs: [{ text: p, bold: false, italic: false }] }));
  }
  const blocks: CommentaryBlock[] = [];
  const lists: Array<{ ordered: boolean; n: number }> = [];
  let bold = 0;
  let italic = 0;
  let skip = 0;
  let quote = 0;
  let current: CommentaryBlock | null = null;
  const close = () => {
    if (current && current.runs.some((r) => r.text.trim())) {
      const first = current.runs[0]!;
      first.text = first.text.replace(/^\s+/, "");
      const last = current.runs.at(-1)!;
      last.text = last.text.replace(/\s+$/, "");
      blocks.push(current);
    }
    current = null;
  };
  for (const m of html.matchAll(/<(\/?)([a-z0-9]+)[^>]*>|([^<]+)/gi)) {
    const [, slash, rawTag, text] = m;
    if (text !== undefined) {
      if (skip) continue;
      const t = decode(text).replace(/\s+/g, " ");
      if (!current) {
        if (!t.trim()) continue;
        current = { kind: quote ? "quote" : "paragraph", runs: [] };
      }
      current.runs.push({ text: t, bold: bold > 0, italic: italic > 0 });
      continue;
    }
    const tag = rawTag!.toLowerCase();
    const opening = slash === "";
    if (SKIPPED.has(tag)) {
      if (tag === "figure" || tag === "picture" || tag === "figcaption") skip += opening ? 1 : -1;
      continue;
    }
    if (tag === "strong" || tag === "b") bold += opening ? 1 : -1;
    else if (tag === "em" || tag === "i") italic += opening ? 1 : -1;
    else if (tag === "ul" || tag === "ol") {
      close();
      if (opening) lists.push({ ordered: tag === "ol", n: 0 });
      else lists.pop();
    } else if (tag === "blockquote") {
      close();
      quote += opening ? 1 : -1;
    } else if (tag === "br") {
      current?.runs.push({ text: "\n", bold: false, italic: false });
    } else if (BLOCK.has(tag)) {
      close();
      if (!opening) continue;
      if (tag === "li") {
        const list = lists.at(-1);
        if (list) list.n += 1;
        current = { kind: "item", bullet: list?.ordered ? `${list.n}.` : "•", runs: [] };
      } else if (tag === "h2" || tag === "h3" || tag === "h4") current = { kind: "heading", runs: [] };
      else if (tag === "p") current = { kind: quote ? "quote" : "paragraph", runs: [] };
    }
  }
  close();
  return blocks;
}
