import { Router, type RequestHandler } from "express";
import { MulterError } from "multer";
import { z } from "zod";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { sendPrivateFile } from "../core/send-file.ts";
import {
  DocumentCreateFieldsSchema,
  DocumentFileQuerySchema,
  DocumentListQuerySchema,
  DocumentPatchInputSchema,
  DocumentVersionFieldsSchema,
  ViewLogQuerySchema,
} from "#shared/schemas/documents.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { AppError } from "../core/app-error.ts";
import { actorOf, requireRole, requireStaff } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
import type { UploadArea } from "../media/media.storage.ts";
import type { DocumentsService } from "./documents.service.ts";

const writers = () => requireRole("lead", "admin");
const signedIn = () => requireRole();

/** multer's refusals in the house's error shape, naming the field. */
function uploadError(err: unknown, maxFileBytes: number): unknown {
  if (!(err instanceof MulterError)) return err;
  if (err.code === "LIMIT_FILE_SIZE") {
    const mb = Math.round(maxFileBytes / (1024 * 1024));
    return new AppError("too_large", `The file is larger than ${mb} MB, the limit for one document; nothing was kept.`, 413, { file: `at most ${mb} MB` });
  }
  if (err.code === "LIMIT_UNEXPECTED_FILE" || err.code === "LIMIT_FILE_COUNT") {
    return new AppError("unexpected_file", "Send one file, in the field `file`; nothing was kept.", 400, { [err.field ?? "file"]: "send one file, in the field `file`" });
  }
  return new AppError("bad_upload", `The upload could not be read (${err.message}).`, 400);
}

/**
 * A multipart form's text fields as the shared schema reads them: `organisationIds` arrives as
 * JSON text, an empty `periodEnd` means none.
 */
function formFields(body: unknown): Record<string, unknown> {
  const fields: Record<string, unknown> = { ...(body as Record<string, unknown> | undefined) };
  if (typeof fields.organisationIds === "string") {
    try {
      fields.organisationIds = fields.organisationIds.trim() === "" ? [] : (JSON.parse(fields.organisationIds) as unknown);
    } catch {
      throw new AppError("validation", "organisationIds must be a JSON list of organisation ids, such as [1, 2].", 400, { organisationIds: "must be a JSON list of ids" });
    }
  }
  if (fields.periodEnd === "") fields.periodEnd = null;
  return fields;
}

/**
 * The document library API. Every read is for signed-in callers, by audience (the service
 * decides per caller); writes are for leads and admins; the view log is staff's, and an
 * investor's own log is theirs.
 */
export function documentsRouter(documents: DocumentsService, uploads: UploadArea): Router {
  const r = Router();
  const receive = uploads.receiver({ maxFileBytes: documents.limits.maxFileBytes, maxFiles: 1, field: "file" });
  const receiveFile: RequestHandler = (req, res, next) => receive(req, res, (err?: unknown) => next(err ? uploadError(err, documents.limits.maxFileBytes) : undefined));
  /** Parses the form's fields; a refusal removes the received file at once. */
  const parseForm = async <T>(req: Parameters<RequestHandler>[0], parse: () => T): Promise<{ input: T; file: ReturnType<UploadArea["filesOf"]>[number] | undefined }> => {
    const files = uploads.filesOf(req.files);
    try {
      return { input: parse(), file: files[0] };
    } catch (err) {
      await uploads.discard(files);
      throw err;
    }
  };

  r.get("/projects/:slug/documents", signedIn(), route({ ...projectPath, query: DocumentListQuerySchema }, ({ params, query, actor }) => documents.list(params.slug, query, actor)));
  r.post("/projects/:slug/documents", writers(), receiveFile, async (req, res) => {
    const { input, file } = await parseForm(req, () => ({ slug: SlugParamSchema.parse(req.params).slug, fields: DocumentCreateFieldsSchema.parse(formFields(req.body)) }));
    res.status(201).json(await documents.create(input.slug, input.fields, file, actorOf(req)));
  });
  r.get("/documents/:id", signedIn(), route(itemPath, ({ params, actor }) => documents.get(params.id, actor)));
  r.post("/documents/:id/versions", writers(), receiveFile, async (req, res) => {
    const { input, file } = await parseForm(req, () => ({ id: IdParamSchema.parse(req.params).id, fields: DocumentVersionFieldsSchema.parse(formFields(req.body)) }));
    res.status(201).json(await documents.addVersion(input.id, input.fields, file, actorOf(req)));
  });
  r.patch("/documents/:id", writers(), route({ ...itemPath, body: DocumentPatchInputSchema }, ({ params, body, actor }) => documents.patch(params.id, body, actor)));
  r.delete("/documents/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => documents.remove(params.id, actor)));

  // The file: an investor's copy is made for them on each request and sent whole (no ranges), so
  // one request is one entry in the view log; staff get the stored original.
  r.get("/documents/:id/file", signedIn(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const query = DocumentFileQuerySchema.parse({ ...req.query });
    const file = await documents.file(id, query, actorOf(req), { address: req.ip ?? "", agent: req.get("user-agent") ?? "", record: req.method === "GET" });
    sendPrivateFile(res, file);
  });

  r.get("/documents/:id/views", requireStaff(), route(itemPath, ({ params, actor }) => documents.documentViews(params.id, actor)));
  r.get("/projects/:slug/document-views", requireStaff(), route({ ...projectPath, query: ViewLogQuerySchema }, async ({ params, query, actor, res }) => {
    const rows = await documents.projectViews(params.slug, query, actor);
    if (query.format === "json") return rows;
    res.type("text/csv; charset=utf-8").attachment(`${params.slug}-document-views.csv`).send(documents.toCsv(rows));
  }));
  r.get("/projects/:slug/my-document-views", requireRole("investor"), route({ ...projectPath, query: z.strictObject({}) }, ({ params, actor }) => documents.myViews(params.slug, actor)));

  return r;
}
