import { z } from "zod";

/**
 * Text that people type, for every text field of every schema: build a field with
 * `plainText()` (one line: names, titles, tags, filters) or `multilineText()` (what the
 * form offers as a text area: summaries, captions, notes, messages, CSV files), then chain
 * `.min()`/`.max()` as usual. Both refuse the characters below with a 400 naming the field,
 * so whatever staff or visitors type can be written into XML (the Atom feed, the sitemap),
 * HTML and e-mail without breaking them. See docs/decisions/017-text-fields-and-xml.md.
 *
 * Refused everywhere: C0 controls U+0000–U+001F (a multi-line field keeps tab, line feed and
 * carriage return), DEL U+007F and the C1 controls U+0080–U+009F, lone surrogates
 * (U+D800–U+DFFF not in a pair) and U+FFFE, U+FFFF. XML 1.0 (§2.2 Char) cannot carry the
 * C0 controls, lone surrogates, U+FFFE or U+FFFF even as character references; it allows DEL
 * and C1 but discourages them, and they are never meant in typed text (they come from
 * mis-decoded pastes and hostile input).
 *
 * The checks run after trimming, so a pasted title's trailing line break is not an error.
 */

// With the `u` flag a surrogate range matches only a surrogate that is not half of a pair.
const NOT_TEXT_ONE_LINE = /[\u0000-\u001F\u007F-\u009F\uD800-\uDFFF\uFFFE\uFFFF]/u;
const NOT_TEXT_MULTILINE = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F\uD800-\uDFFF\uFFFE\uFFFF]/u;

/** The same sets, global, for removing them (rich-text bodies are cleaned rather than refused). */
const STRIP_ONE_LINE = new RegExp(NOT_TEXT_ONE_LINE.source, "gu");
const STRIP_MULTILINE = new RegExp(NOT_TEXT_MULTILINE.source, "gu");

const codePoint = (c: string) => `U+${c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`;

/** Why a text is refused, in words for the field's error, or null when it is fine. */
export function textProblem(value: string, multiline: boolean): string | null {
  const found = (multiline ? NOT_TEXT_MULTILINE : NOT_TEXT_ONE_LINE).exec(value);
  if (!found) return null;
  const c = found[0];
  const where = multiline && value.includes("\n") ? ` on line ${value.slice(0, found.index).split("\n").length}` : "";
  if (c === "\t" || c === "\n" || c === "\r") return "must be on one line (no tabs or line breaks)";
  if (/[\uD800-\uDFFF\uFFFE\uFFFF]/.test(c)) return `contains a character that is not text (${codePoint(c)})${where}`;
  return `contains a control character (${codePoint(c)})${where}, which is not allowed`;
}

/**
 * Removes what `multilineText()` (or, with `multiline` false, `plainText()`) refuses: for text
 * that is cleaned rather than refused, such as the text and attributes of rich-text bodies.
 */
export function stripControls(value: string, multiline = true): string {
  return value.replace(multiline ? STRIP_MULTILINE : STRIP_ONE_LINE, "");
}

/**
 * Tabs and line breaks as single spaces: for one-line values that arrive wrapped (a CSV cell
 * from a spreadsheet holding a line break), where a space is what was meant.
 */
export function foldLines(value: string): string {
  return value.replace(/[\t\r\n]+/g, " ");
}

interface TextOptions {
  /** The message when the value is missing or not a string. */
  error?: string;
  /** Trim white space at both ends first (default true); off where the text is kept as typed. */
  trim?: boolean;
}

const textCheck = (multiline: boolean) =>
  z.refine<string>((v) => textProblem(v, multiline) === null, { error: (iss) => textProblem(String(iss.input), multiline) ?? "is not valid text" });

/** The two checks, one instance each, so a test can tell which rule a field carries. */
export const TEXT_CHECKS = { oneLine: textCheck(false), multiline: textCheck(true) } as const;

function text(multiline: boolean, o: TextOptions) {
  const base = z.string(o.error ? { error: o.error } : undefined);
  const trimmed = o.trim === false ? base : base.trim();
  return trimmed.check(multiline ? TEXT_CHECKS.multiline : TEXT_CHECKS.oneLine);
}

/** A one-line text field: refuses control characters, tabs and line breaks. */
export const plainText = (o: TextOptions = {}) => text(false, o);

/** A multi-line text field: tab, line feed and carriage return allowed; other control characters refused. */
export const multilineText = (o: TextOptions = {}) => text(true, o);
