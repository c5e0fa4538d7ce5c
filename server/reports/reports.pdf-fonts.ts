import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { inflateSync } from "node:zlib";
import { create, type Font } from "fontkit";

/**
 * The product's own typefaces for the report PDF: Inter for text and figures, Source Serif 4 for
 * the lead's commentary. They come from the static @fontsource packages in WOFF (1.0) form: the
 * site's variable WOFF2 files cannot be embedded, because fontkit's subsetter breaks on their
 * composite glyphs and picks no weight from a WOFF2 variation (decision 043).
 */
const FILES = {
  text: "@fontsource/inter/files/inter-latin-400-normal.woff",
  textItalic: "@fontsource/inter/files/inter-latin-400-italic.woff",
  strong: "@fontsource/inter/files/inter-latin-600-normal.woff",
  heading: "@fontsource/inter/files/inter-latin-700-normal.woff",
  serif: "@fontsource/source-serif-4/files/source-serif-4-latin-400-normal.woff",
  serifItalic: "@fontsource/source-serif-4/files/source-serif-4-latin-400-italic.woff",
  serifBold: "@fontsource/source-serif-4/files/source-serif-4-latin-700-normal.woff",
} as const;

export type ReportFont = keyof typeof FILES;

let loaded: Record<ReportFont, Font> | null = null;

/**
 * The fonts, read, unpacked and parsed once per process (they are package files, not data) and
 * shared by every document: pdfkit takes a parsed fontkit font as it takes a file, and keeps its
 * subset per document, so a report no longer parses seven fonts before its first line.
 */
export function reportFonts(): Record<ReportFont, Font> {
  if (!loaded) {
    const require = createRequire(import.meta.url);
    loaded = Object.fromEntries(Object.entries(FILES).map(([name, file]) => [name, create(woffToSfnt(readFileSync(require.resolve(file))))])) as Record<ReportFont, Font>;
    // Inter's contextual alternates (raised hyphens and colons between capitals and figures) were
    // most of the layout time; the report reads the same without them.
    for (const font of Object.values(loaded)) {
      const layout = font.layout.bind(font);
      font.layout = ((text: string, features?: unknown) => layout(text, (features ?? { calt: false }) as never)) as typeof font.layout;
    }
  }
  return loaded;
}

/**
 * WOFF 1.0 → the TrueType/OpenType file it wraps (W3C WOFF File Format 1.0, §4–5: a header, a
 * table directory, each table zlib-compressed when smaller). fontkit would inflate the tables
 * itself, in JavaScript, for every document (most of a report's render time); node's zlib does it
 * once here.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.readUInt32BE(0) !== 0x774f4646) throw new Error("not a WOFF 1.0 font");
  const numTables = woff.readUInt16BE(12);
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + i * 20;
    const [tag, offset, compLength, origLength, checksum] = [woff.readUInt32BE(at), woff.readUInt32BE(at + 4), woff.readUInt32BE(at + 8), woff.readUInt32BE(at + 12), woff.readUInt32BE(at + 16)];
    const stored = woff.subarray(offset, offset + compLength);
    return { tag, checksum, data: compLength < origLength ? inflateSync(stored) : stored };
  });
  let entrySelector = 0;
  while (2 ** (entrySelector + 1) <= numTables) entrySelector += 1;
  const head = Buffer.alloc(12 + 16 * numTables);
  head.writeUInt32BE(woff.readUInt32BE(4), 0); // the wrapped font's flavour (TrueType or CFF)
  head.writeUInt16BE(numTables, 4);
  head.writeUInt16BE(16 * 2 ** entrySelector, 6);
  head.writeUInt16BE(entrySelector, 8);
  head.writeUInt16BE(numTables * 16 - 16 * 2 ** entrySelector, 10);
  const parts: Buffer[] = [head];
  let offset = head.length;
  tables.forEach((t, i) => {
    const at = 12 + i * 16;
    head.writeUInt32BE(t.tag, at);
    head.writeUInt32BE(t.checksum, at + 4);
    head.writeUInt32BE(offset, at + 8);
    head.writeUInt32BE(t.data.length, at + 12);
    const padded = Buffer.alloc((t.data.length + 3) & ~3);
    t.data.copy(padded);
    parts.push(padded);
    offset += padded.length;
  });
  return Buffer.concat(parts);
}
