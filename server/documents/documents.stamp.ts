import { concatTransformationMatrix, degrees, PDFDocument, popGraphicsState, pushGraphicsState, rgb, StandardFonts, type PDFFont, type PDFPage } from "pdf-lib";
import sharp from "sharp";
import type { DocumentFileType } from "#shared/schemas/documents.ts";

/**
 * The copy an investor receives: every page carries a light diagonal mark with the reader's
 * name and a footer naming the reader, their organisation, their e-mail and the moment it was
 * made (in the project's time zone). Made in memory at request time and sent; never stored.
 * An image is served the same way, as a one-page PDF with the same marks (decision 038).
 */

export interface StampReader {
  name: string;
  email: string;
  organisation: string | null;
  /** When the copy was made, in words in the project's time zone ("5 December 2026, 14:03 GMT"). */
  madeAt: string;
}

/** Page size an image is fitted into (A4, either way round), in points. */
const A4 = { long: 842, short: 595 };
const GREY = rgb(0.25, 0.27, 0.3);

/** The copy of a stored file stamped for one reader: always a PDF. */
export async function stampForReader(bytes: Uint8Array, fileType: DocumentFileType, reader: StampReader): Promise<Uint8Array> {
  const doc = fileType === "pdf" ? await PDFDocument.load(bytes, { updateMetadata: false }) : await imageAsPdf(bytes, fileType);
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const pages = doc.getPages();
  const who = printable(font, reader.organisation ? `${reader.name}, ${reader.organisation}` : reader.name);
  const footer = printable(font, `Copy for ${reader.name}${reader.organisation ? ` (${reader.organisation})` : ""} · ${reader.email} · made ${reader.madeAt} · not for onward distribution`);
  pages.forEach((page, i) => stampPage(page, { font, bold, who, footer: `${footer} · page ${i + 1} of ${pages.length}` }));
  // Plain objects: quicker to write than object streams, and the copy is never kept.
  return doc.save({ useObjectStreams: false, updateFieldAppearances: false });
}

function stampPage(page: PDFPage, s: { font: PDFFont; bold: PDFFont; who: string; footer: string }): void {
  const box = page.getCropBox();
  const turn = (((page.getRotation().angle % 360) + 360) % 360) as 0 | 90 | 180 | 270;
  const sideways = turn === 90 || turn === 270;
  const width = sideways ? box.height : box.width;
  const height = sideways ? box.width : box.height;

  // Whatever the page's own content leaves in the graphics state is closed off first, then the
  // marks are drawn in the page as the reader sees it (its crop box, turned as it is shown).
  const ctx = page.doc.context;
  page.node.wrapContentStreams(ctx.register(ctx.contentStream([pushGraphicsState()])), ctx.register(ctx.contentStream([popGraphicsState()])));
  const frame: Record<typeof turn, [number, number, number, number, number, number]> = {
    0: [1, 0, 0, 1, box.x, box.y],
    90: [0, 1, -1, 0, box.x + box.width, box.y],
    180: [-1, 0, 0, -1, box.x + box.width, box.y + box.height],
    270: [0, -1, 1, 0, box.x, box.y + box.height],
  };
  page.pushOperators(pushGraphicsState(), concatTransformationMatrix(...frame[turn]));

  // The diagonal mark: light, corner to corner, sized to the page.
  const angle = Math.atan2(height, width);
  const diagonal = Math.hypot(width, height);
  const markSize = Math.max(10, Math.min(60, (diagonal * 0.7) / Math.max(1, s.bold.widthOfTextAtSize(s.who, 1))));
  const markWidth = s.bold.widthOfTextAtSize(s.who, markSize);
  const cx = width / 2 - (Math.cos(angle) * markWidth) / 2 + (Math.sin(angle) * markSize) / 3;
  const cy = height / 2 - (Math.sin(angle) * markWidth) / 2 - (Math.cos(angle) * markSize) / 3;
  page.drawText(s.who, { x: cx, y: cy, size: markSize, font: s.bold, color: GREY, opacity: 0.1, rotate: degrees((angle * 180) / Math.PI) });

  // The footer: on a pale band so it stays legible over the page's own content.
  const margin = Math.min(24, width * 0.04);
  const size = Math.max(4, Math.min(7.5, (width - 2 * margin) / Math.max(1, s.font.widthOfTextAtSize(s.footer, 1))));
  page.drawRectangle({ x: 0, y: 0, width, height: size * 2.6, color: rgb(1, 1, 1), opacity: 0.8 });
  page.drawText(s.footer, { x: margin, y: size * 0.9, size, font: s.font, color: GREY });
  page.pushOperators(popGraphicsState());
}

/** A stored image as a one-page PDF, fitted into A4 the way round that suits it. */
async function imageAsPdf(bytes: Uint8Array, fileType: DocumentFileType): Promise<PDFDocument> {
  const doc = await PDFDocument.create();
  // pdf-lib embeds JPEG and PNG; WebP is converted to PNG first (lossless).
  const image = fileType === "jpeg" ? await doc.embedJpg(bytes) : await doc.embedPng(fileType === "png" ? bytes : await sharp(bytes).png().toBuffer());
  const landscape = image.width > image.height;
  const [pw, ph] = landscape ? [A4.long, A4.short] : [A4.short, A4.long];
  const margin = 28;
  const scale = Math.min((pw - 2 * margin) / image.width, (ph - 3 * margin) / image.height);
  const page = doc.addPage([pw, ph]);
  page.drawImage(image, { x: (pw - image.width * scale) / 2, y: (ph - image.height * scale) / 2 + margin / 2, width: image.width * scale, height: image.height * scale });
  return doc;
}

/**
 * Text the standard font can draw: accents folded where the font lacks the letter ("Łukasz" →
 * "Lukasz" is not possible, so "?ukasz"), never a refusal to make the copy.
 */
export function printable(font: PDFFont, text: string): string {
  const known = new Set(font.getCharacterSet());
  let out = "";
  for (const ch of text) {
    const code = ch.codePointAt(0)!;
    if (known.has(code)) {
      out += ch;
      continue;
    }
    const folded = ch.normalize("NFKD").replace(/\p{M}/gu, "");
    out += [...folded].every((c) => known.has(c.codePointAt(0)!)) && folded.length > 0 ? folded : "?";
  }
  return out;
}
