import { createHash } from "node:crypto";
import { fileTypeFromBuffer } from "file-type";
import { PDFArray, PDFDict, PDFDocument, PDFName, PDFRef, PDFStream, type PDFObject } from "pdf-lib";
import type { DocumentFileType } from "#shared/schemas/documents.ts";
import { AppError } from "../core/app-error.ts";

/**
 * Taking a file into the library: what it really is (from its bytes, never its name), whether it
 * can be read, and — for a PDF — the same file without its active content. Bytes in, bytes out:
 * storage and rows are the library's business (documents.library.ts).
 */

export interface IntakeLimits {
  maxFileBytes: number;
  maxPages: number;
}

export interface TakenFile {
  fileType: DocumentFileType;
  mime: string;
  /** The bytes to store: for a PDF, the cleaned file. */
  bytes: Buffer;
  sha256: string;
  pages: number | null;
  /** What was removed before storing, in words ("document JavaScript", "embedded file report.xlsx" …). */
  removed: string[];
}

const ALLOWED: Record<string, { fileType: DocumentFileType; mime: string }> = {
  "application/pdf": { fileType: "pdf", mime: "application/pdf" },
  "image/jpeg": { fileType: "jpeg", mime: "image/jpeg" },
  "image/png": { fileType: "png", mime: "image/png" },
  "image/webp": { fileType: "webp", mime: "image/webp" },
};

export const MIME_OF: Record<DocumentFileType, string> = { pdf: "application/pdf", jpeg: "image/jpeg", png: "image/png", webp: "image/webp" };

const refuse = (code: string, message: string, status = 422) => new AppError(code, message, status, { file: message });

/** Checks and cleans one received file; throws a 413/415/422 naming `file` when it is refused. */
export async function takeFile(data: Buffer, limits: IntakeLimits): Promise<TakenFile> {
  if (data.length === 0) throw refuse("empty_file", "The file is empty.");
  if (data.length > limits.maxFileBytes) {
    throw refuse("too_large", `The file is larger than ${Math.round(limits.maxFileBytes / (1024 * 1024))} MB, the limit for one document.`, 413);
  }
  const detected = await fileTypeFromBuffer(data);
  const allowed = detected ? ALLOWED[detected.mime] : undefined;
  if (!allowed) {
    const what = detected ? `a ${detected.ext.toUpperCase()} file` : "not a file type this library takes";
    throw refuse("unsupported_type", `The file is ${what}, whatever its name says; the library takes PDF, JPEG, PNG and WebP.`, 415);
  }
  if (allowed.fileType !== "pdf") {
    return { ...allowed, bytes: data, sha256: sha256(data), pages: null, removed: [] };
  }
  const { bytes, pages, removed } = await cleanPdf(data, limits.maxPages);
  return { ...allowed, bytes, sha256: sha256(bytes), pages, removed };
}

const sha256 = (b: Buffer) => createHash("sha256").update(b).digest("hex");

/** Action types that run or open something outside the document; links (URI) and moves within it (GoTo, Named) stay. */
const ACTIVE_ACTIONS = new Set(["JavaScript", "Launch", "ImportData", "SubmitForm", "GoToE", "GoToR", "Rendition", "Sound", "Movie", "RichMediaExecute", "SetOCGState", "Hide", "Trans", "GoTo3DView"]);
const ACTION_WORDS: Record<string, string> = { JavaScript: "JavaScript", Launch: "launch action", ImportData: "data import action", SubmitForm: "form submission action", GoToE: "embedded-file action", GoToR: "remote-file action" };

/**
 * Parses a PDF with pdf-lib and removes what can act on the reader's machine: document-level
 * JavaScript, the open action, additional actions (catalog, pages, annotations, form fields),
 * active actions in annotations and bookmarks, embedded files and file-attachment annotations,
 * and XFA forms. Objects nothing refers to any more are dropped too, so the removed bytes are not
 * left behind in the file. Encrypted, unreadable, empty and over-long files are refused.
 */
export async function cleanPdf(data: Buffer, maxPages: number): Promise<{ bytes: Buffer; pages: number; removed: string[] }> {
  let doc: PDFDocument;
  try {
    doc = await PDFDocument.load(data, { ignoreEncryption: true, updateMetadata: false, throwOnInvalidObject: false });
  } catch (err) {
    throw refuse("unreadable_pdf", `The PDF cannot be read (${err instanceof Error ? err.message.split("\n")[0] : "unknown error"}); export it again and upload the new file.`);
  }
  if (doc.isEncrypted) throw refuse("encrypted_pdf", "Encrypted PDFs are refused: remove the password or protection and upload it again.");
  let pages: number;
  try {
    pages = doc.getPageCount();
  } catch {
    pages = 0;
  }
  if (pages === 0) throw refuse("unreadable_pdf", "The PDF cannot be read: no pages were found in it.");
  if (pages > maxPages) throw refuse("too_many_pages", `The PDF has ${pages} pages; the limit is ${maxPages}.`);

  const removed = new Set<string>();
  const ctx = doc.context;
  const catalog = doc.catalog;
  const resolveDict = (o: PDFObject | undefined): PDFDict | undefined => {
    const v = o instanceof PDFRef ? ctx.lookup(o) : o;
    return v instanceof PDFDict ? v : undefined;
  };
  const nameOf = (o: PDFObject | undefined): string | undefined => {
    const v = o instanceof PDFRef ? ctx.lookup(o) : o;
    return v instanceof PDFName ? v.decodeText() : undefined;
  };

  /** The active types in an action and its chain (`Next`), if any. */
  const activeIn = (action: PDFObject | undefined, seen = new Set<PDFObject>()): string[] => {
    const items = (() => {
      const v = action instanceof PDFRef ? ctx.lookup(action) : action;
      return v instanceof PDFArray ? v.asArray() : v ? [v] : [];
    })();
    const found: string[] = [];
    for (const item of items) {
      const dict = resolveDict(item);
      if (!dict || seen.has(dict)) continue;
      seen.add(dict);
      const type = nameOf(dict.get(PDFName.of("S")));
      if (type && ACTIVE_ACTIONS.has(type)) found.push(ACTION_WORDS[type] ?? `${type} action`);
      found.push(...activeIn(dict.get(PDFName.of("Next")), seen));
    }
    return found;
  };

  const note = (what: string) => removed.add(what);
  /** Takes `key` out of `dict` when it is there, and says what went. */
  const strip = (dict: PDFDict | undefined, key: string, what: string) => {
    if (!dict?.has(PDFName.of(key))) return;
    dict.delete(PDFName.of(key));
    note(what);
  };

  // The catalog: the open action, its additional actions, document JavaScript, embedded files, XFA.
  if (catalog.has(PDFName.of("OpenAction"))) {
    const active = activeIn(catalog.get(PDFName.of("OpenAction")));
    // A plain "open at page N" destination is harmless; an action that runs something is not.
    if (active.length > 0) {
      catalog.delete(PDFName.of("OpenAction"));
      note(`open action (${[...new Set(active)].join(", ")})`);
    }
  }
  strip(catalog, "AA", "document additional actions");
  const names = resolveDict(catalog.get(PDFName.of("Names")));
  strip(names, "JavaScript", "document JavaScript");
  strip(names, "EmbeddedFiles", "embedded files");
  strip(resolveDict(catalog.get(PDFName.of("AcroForm"))), "XFA", "XFA form");

  // Every other dictionary: pages, annotations, form fields, bookmarks. One sweep finds them all.
  for (const [, object] of ctx.enumerateIndirectObjects()) {
    const dict = object instanceof PDFStream ? object.dict : object instanceof PDFDict ? object : undefined;
    if (!dict) continue;
    const type = nameOf(dict.get(PDFName.of("Type")));
    const subtype = nameOf(dict.get(PDFName.of("Subtype")));
    strip(dict, "AA", type === "Page" ? "page additional actions" : "additional actions");
    if (dict.has(PDFName.of("A"))) {
      const active = activeIn(dict.get(PDFName.of("A")));
      if (active.length > 0) {
        dict.delete(PDFName.of("A"));
        for (const a of active) note(subtype === "Link" || subtype === "Widget" ? `${a} in a link` : type === undefined && dict.has(PDFName.of("Title")) ? `${a} in a bookmark` : a);
      }
    }
    if (type === "Page") {
      const annots = dict.get(PDFName.of("Annots"));
      const list = annots instanceof PDFRef ? ctx.lookup(annots) : annots;
      if (list instanceof PDFArray) {
        const kept = list.asArray().filter((a) => {
          const annot = resolveDict(a);
          const kind = annot && nameOf(annot.get(PDFName.of("Subtype")));
          if (kind === "FileAttachment" || kind === "Sound" || kind === "Movie" || kind === "Screen" || kind === "RichMedia") {
            note(kind === "FileAttachment" ? "file attachment annotation" : `${kind} annotation`);
            return false;
          }
          return true;
        });
        if (kept.length !== list.size()) dict.set(PDFName.of("Annots"), ctx.obj(kept));
      }
    }
  }

  if (removed.size > 0) dropUnreachable(doc);
  let saved: Uint8Array;
  try {
    // Plain objects (no object streams): what is stored can be read back and checked as it is.
    saved = await doc.save({ useObjectStreams: false, updateFieldAppearances: false });
  } catch (err) {
    throw refuse("unreadable_pdf", `The PDF cannot be read (${err instanceof Error ? err.message.split("\n")[0] : "unknown error"}).`);
  }
  return { bytes: removed.size > 0 ? Buffer.from(saved) : data, pages, removed: [...removed].sort() };
}

/** Removes every indirect object the trailer cannot reach (the bytes of what was cut off stay out of the saved file). */
function dropUnreachable(doc: PDFDocument): void {
  const ctx = doc.context;
  const reached = new Set<string>();
  const stack: PDFObject[] = [ctx.trailerInfo.Root, ctx.trailerInfo.Info, ctx.trailerInfo.ID].filter((o): o is PDFObject => o !== undefined);
  while (stack.length > 0) {
    const o = stack.pop()!;
    if (o instanceof PDFRef) {
      const key = o.toString();
      if (reached.has(key)) continue;
      reached.add(key);
      const target = ctx.lookup(o);
      if (target) stack.push(target);
    } else if (o instanceof PDFDict) {
      for (const [, v] of o.entries()) stack.push(v);
    } else if (o instanceof PDFStream) {
      stack.push(o.dict);
    } else if (o instanceof PDFArray) {
      stack.push(...o.asArray());
    }
  }
  for (const [ref] of ctx.enumerateIndirectObjects()) {
    if (!reached.has(ref.toString())) ctx.delete(ref);
  }
}
