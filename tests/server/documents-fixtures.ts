import { PDFDocument, PDFName, PDFString, StandardFonts } from "pdf-lib";
import { getDocument } from "pdfjs-dist/legacy/build/pdf.mjs";
import { createUser, signIn, type TestApp } from "../helpers/app.ts";
import type { Client } from "./posts-fixtures.ts";

/**
 * What the document tests share: PDFs made here with pdf-lib (plain, with active content,
 * encrypted), investors of organisations of their own, uploads through the API, and the text of
 * each page of a PDF read back with pdfjs-dist (the reader investors' browsers use).
 */

let seq = 0;

/** A plain PDF of `pages` pages, each saying which page it is. */
export async function plainPdf(pages = 3, title = "Monitoring report"): Promise<Buffer> {
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  for (let i = 0; i < pages; i += 1) doc.addPage([595, 842]).drawText(`${title} page ${i + 1}`, { x: 50, y: 780, size: 14, font });
  return Buffer.from(await doc.save());
}

/**
 * A PDF with an OpenAction that runs JavaScript, document-level JavaScript, an embedded file, a
 * Launch action on a link and a file-attachment annotation; a URI link that must be kept.
 */
export async function activePdf(): Promise<Buffer> {
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const page = doc.addPage([595, 842]);
  page.drawText("A report with active content", { x: 50, y: 780, size: 14, font });
  const ctx = doc.context;
  doc.catalog.set(PDFName.of("OpenAction"), ctx.register(ctx.obj({ Type: "Action", S: "JavaScript", JS: PDFString.of("app.alert('opened-secret-js');") })));
  const js = ctx.register(ctx.obj({ Type: "Action", S: "JavaScript", JS: PDFString.of("app.alert('named-secret-js');") }));
  const attached = ctx.register(ctx.flateStream("attached-secret-bytes", { Type: "EmbeddedFile" }));
  const spec = ctx.register(ctx.obj({ Type: "Filespec", F: PDFString.of("payload.txt"), EF: { F: attached } }));
  doc.catalog.set(PDFName.of("Names"), ctx.obj({ EmbeddedFiles: { Names: [PDFString.of("payload.txt"), spec] }, JavaScript: { Names: [PDFString.of("init"), js] } }));
  const launch = ctx.register(ctx.obj({ Type: "Annot", Subtype: "Link", Rect: [50, 700, 200, 720], A: { Type: "Action", S: "Launch", F: PDFString.of("calc-secret.exe") } }));
  const uri = ctx.register(ctx.obj({ Type: "Annot", Subtype: "Link", Rect: [50, 650, 200, 670], A: { Type: "Action", S: "URI", URI: PDFString.of("https://example.com/kept-link") } }));
  const fileStream = ctx.register(ctx.flateStream("annotation-secret-bytes", { Type: "EmbeddedFile" }));
  const attachment = ctx.register(
    ctx.obj({ Type: "Annot", Subtype: "FileAttachment", Rect: [50, 600, 70, 620], FS: { Type: "Filespec", F: PDFString.of("annot.bin"), EF: { F: fileStream } } }),
  );
  page.node.set(PDFName.of("Annots"), ctx.obj([launch, uri, attachment]));
  page.node.set(PDFName.of("AA"), ctx.obj({ O: { S: "JavaScript", JS: PDFString.of("app.alert('page-secret-js');") } }));
  return Buffer.from(await doc.save({ useObjectStreams: false }));
}

/** A PDF whose trailer says it is encrypted (the standard security handler). */
export async function encryptedPdf(): Promise<Buffer> {
  const doc = await PDFDocument.create();
  doc.addPage([595, 842]);
  const ctx = doc.context;
  ctx.trailerInfo.Encrypt = ctx.register(ctx.obj({ Filter: "Standard", V: 1, R: 2, O: PDFString.of("x".repeat(32)), U: PDFString.of("y".repeat(32)), P: -44 }));
  return Buffer.from(await doc.save({ useObjectStreams: false }));
}

/** The text of each page of a PDF, as pdfjs-dist extracts it. */
export async function pageTexts(bytes: Uint8Array | Buffer): Promise<string[]> {
  const pdf = await getDocument({ data: new Uint8Array(bytes), verbosity: 0, isEvalSupported: false }).promise;
  const out: string[] = [];
  for (let i = 1; i <= pdf.numPages; i += 1) {
    const content = await (await pdf.getPage(i)).getTextContent();
    out.push(content.items.map((item) => ("str" in item ? item.str : "")).join(""));
  }
  await pdf.destroy();
  return out;
}

/** An organisation of its own (the users module's table: tests make their rows directly). */
export async function createOrganisation(t: TestApp, name = "Test fund"): Promise<number> {
  seq += 1;
  const [id] = await t.db("organisations").insert({ name: `${name} ${Date.now().toString(36)}-${seq}` });
  return Number(id);
}

/** A signed-in investor of an organisation (or of none). */
export async function investorOf(t: TestApp, organisationId: number | null): Promise<Client & { id: number; email: string; name: string }> {
  const u = await createUser(t, "investor");
  await t.db("users").where({ id: u.id }).update({ organisation_id: organisationId, name: `Ilse Q. Reader ${u.id}` });
  return { ...(await signIn(t, u.email, u.password)), id: u.id, email: u.email, name: `Ilse Q. Reader ${u.id}` };
}

export interface UploadFields {
  title?: string;
  category?: string;
  audience?: string;
  period?: string;
  organisationIds?: number[];
}

/** POST /api/projects/:slug/documents as multipart, as the site office sends it. */
export function upload(as: Client, slug: string, file: Buffer | null, name = "report.pdf", f: UploadFields = {}) {
  let req = as.agent
    .post(`/api/projects/${slug}/documents`)
    .set("X-CSRF-Token", as.csrf)
    .field("title", f.title ?? "Monthly monitoring report")
    .field("category", f.category ?? "monitoring_report")
    .field("audience", f.audience ?? "investor")
    .field("period", f.period ?? "November 2026")
    .field("organisationIds", JSON.stringify(f.organisationIds ?? []));
  if (file) req = req.attach("file", file, name);
  return req;
}

/** Every key under `documents/` in the private storage. */
export async function storedKeys(t: TestApp): Promise<string[]> {
  const keys: string[] = [];
  for await (const e of t.plumbline.mediaStorage.list("documents")) keys.push(e.key);
  return keys.sort();
}

/** A binary body as a Buffer (supertest leaves PDFs unparsed without this). */
export const binary = (res: { on(event: string, cb: (chunk?: Buffer) => void): void }, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on("data", (c) => chunks.push(c!));
  res.on("end", () => cb(null, Buffer.concat(chunks)));
};
