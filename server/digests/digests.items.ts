import { createHash } from "node:crypto";
import sanitizeHtml from "sanitize-html";

/**
 * One thing a digest tells of, by reference: what the archive checks against what its reader may
 * see now (decision 045). Facility items are named (a block's or a system's name), the rest by id.
 */
export type DigestItemRef =
  | { kind: "post" | "picture" | "milestone" | "risk" | "decision" | "change" | "document"; id: number }
  | { kind: "facility"; name: string };

/**
 * The class a rendered item carries, so the archive can cut it out of the stored HTML without
 * parsing the layout: `pl-item-post-12`, `pl-item-facility-<hash of the name>`.
 */
export function itemClass(ref: DigestItemRef): string {
  if (ref.kind === "facility") return `pl-item-facility-${createHash("sha256").update(ref.name).digest("hex").slice(0, 12)}`;
  return `pl-item-${ref.kind}-${ref.id}`;
}

/** The same item met twice (a milestone moved and also due soon) is one reference. */
export function uniqueRefs(refs: readonly DigestItemRef[]): DigestItemRef[] {
  const seen = new Map<string, DigestItemRef>();
  for (const r of refs) seen.set(itemClass(r), r);
  return [...seen.values()];
}

/** The stored column: JSON, or null for a content rendered before refs were kept. */
export function parseItemRefs(stored: string | null): DigestItemRef[] | null {
  if (stored === null) return null;
  const parsed = JSON.parse(stored) as unknown;
  return Array.isArray(parsed) ? (parsed as DigestItemRef[]) : null;
}

/**
 * The stored HTML without the elements of these items (each item's own section or line, with
 * everything inside it). Re-serialising drops comments (Outlook's conditional tables), which a
 * browser ignores anyway; a copy with nothing to withhold is served byte for byte as stored.
 */
export function withholdItems(html: string, hidden: readonly DigestItemRef[]): string {
  if (hidden.length === 0) return html;
  const classes = new Set(hidden.map(itemClass));
  return sanitizeHtml(html, {
    allowedTags: false,
    allowedAttributes: false,
    allowVulnerableTags: true,
    exclusiveFilter: (frame) => (frame.attribs.class ?? "").split(/\s+/).some((c) => classes.has(c)),
  });
}

/** "One item in this digest is no longer available to you and has been withheld." */
export function withheldNotice(count: number): string {
  if (count === 1) return "One item in this digest is no longer available to you and has been withheld.";
  return `${count} items in this digest are no longer available to you and have been withheld.`;
}
