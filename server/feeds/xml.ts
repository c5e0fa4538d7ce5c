/**
 * Writing XML that stays well-formed whatever the text holds (the Atom feed, the sitemap).
 * Every piece of text goes through `xmlText` or `xmlAttr`; nothing is put in CDATA.
 *
 * Input fields already refuse control characters (src/shared/schemas/text.ts), but rows written
 * before that rule, or by other paths (the seed, a database console), may still hold them: a
 * character XML 1.0 cannot carry at all (§2.2 Char: C0 controls other than tab, line feed and
 * carriage return; lone surrogates; U+FFFE, U+FFFF) is dropped here, since no escape can
 * represent it.
 */

// With the `u` flag the surrogate range matches only a surrogate that is not half of a pair.
const NOT_XML_CHAR = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uD800-\uDFFF\uFFFE\uFFFF]/gu;

const TEXT_ESCAPES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", "\r": "&#13;" };
// In attributes, tab and line breaks are escaped too: attribute-value normalisation (XML 1.0
// §3.3.3) would otherwise turn them into spaces.
const ATTR_ESCAPES: Record<string, string> = { ...TEXT_ESCAPES, '"': "&quot;", "'": "&apos;", "\t": "&#9;", "\n": "&#10;" };

/** Text content of an element. A carriage return is escaped so that a reader's end-of-line handling keeps it. */
export function xmlText(value: string): string {
  return value.replace(NOT_XML_CHAR, "").replace(/[&<>\r]/g, (c) => TEXT_ESCAPES[c]!);
}

/** An attribute value, for either quote style. */
export function xmlAttr(value: string): string {
  return value.replace(NOT_XML_CHAR, "").replace(/[&<>"'\t\n\r]/g, (c) => ATTR_ESCAPES[c]!);
}

/** An element with attributes and already-written children; attributes whose value is undefined are left out. */
export function element(name: string, attrs: Record<string, string | undefined>, ...children: string[]): string {
  const a = Object.entries(attrs)
    .filter((e): e is [string, string] => e[1] !== undefined)
    .map(([k, v]) => ` ${k}="${xmlAttr(v)}"`)
    .join("");
  return children.length ? `<${name}${a}>${children.join("")}</${name}>` : `<${name}${a}/>`;
}

/** An element holding text only. */
export const textElement = (name: string, text: string, attrs: Record<string, string | undefined> = {}): string => element(name, attrs, xmlText(text));
