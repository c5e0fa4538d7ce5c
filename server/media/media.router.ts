import { Router, type Request, type RequestHandler, type Response } from "express";
import { MulterError } from "multer";
import parseRange from "range-parser";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { ThenAndNowQuerySchema } from "#shared/schemas/writing-help.ts";
import { BulkTagInputSchema, GalleryQuerySchema, MediaListQuerySchema, MediaPatchInputSchema, ProjectQuerySchema, ReviewInputSchema, SignedVariantQuerySchema } from "#shared/schemas/media.ts";
import { AppError } from "../core/app-error.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
import type { MediaService } from "./media.service.ts";
import type { StoredFile, UploadArea } from "./media.storage.ts";

const staff = () => requireRole("admin", "lead", "marketing");
const reviewers = () => requireRole("lead", "admin");

function formatSize(bytes: number): string {
  const mb = bytes / (1024 * 1024);
  return mb >= 1 ? `${Number(mb.toFixed(1))} MB` : `${Math.round(bytes / 1024)} KB`;
}

/** multer's refusals in the fixed error shape, each saying what to do about it. */
function uploadError(err: unknown, limits: MediaService["limits"]): unknown {
  if (!(err instanceof MulterError)) return err;
  switch (err.code) {
    case "LIMIT_FILE_SIZE": {
      const size = formatSize(limits.maxFileBytes);
      const name = (err as MulterError & { filename?: string }).filename ?? "A file";
      return new AppError("too_large", `${name} is larger than ${size}, the limit for one photo; nothing was kept.`, 413, { files: `each photo at most ${size}` });
    }
    case "LIMIT_FILE_COUNT":
      return new AppError("too_many_files", `At most ${limits.maxFiles} files can be uploaded at once; nothing was kept. Send the rest in another upload.`, 413, { files: `at most ${limits.maxFiles} files` });
    case "LIMIT_UNEXPECTED_FILE":
      return err.field === "files"
        ? new AppError("too_many_files", `At most ${limits.maxFiles} files can be uploaded at once; nothing was kept. Send the rest in another upload.`, 413, { files: `at most ${limits.maxFiles} files` })
        : new AppError("unexpected_field", `Send the photos in the field \`files\`, not \`${err.field ?? ""}\`.`, 400, { [err.field ?? "_"]: "is not a known field" });
    case "LIMIT_PART_COUNT":
    case "LIMIT_FIELD_COUNT":
      return new AppError("too_many_parts", "The upload has too many parts; send the photos in the field `files` and nothing else.", 413);
    default:
      return new AppError("bad_upload", `The upload could not be read (${err.message}).`, 400);
  }
}

/**
 * The media library API (under /api): staff only. Sensitivity is a lead's or an admin's
 * decision (the review routes, and the sensitivity field of PATCH, checked in the service).
 */
export function mediaRouter(media: MediaService, uploads: UploadArea): Router {
  const r = Router();
  const receive = uploads.receiver({ maxFileBytes: media.limits.maxFileBytes, maxFiles: media.limits.maxFiles });
  const receiveFiles: RequestHandler = (req, res, next) => receive(req, res, (err?: unknown) => next(err ? uploadError(err, media.limits) : undefined));


  r.get("/media", staff(), route({ query: MediaListQuerySchema }, ({ query }) => media.list(query)));
  r.post("/media", staff(), receiveFiles, async (req, res) => {
    const files = uploads.filesOf(req.files);
    const body = (req.body ?? {}) as Record<string, unknown>;
    const raw = (req.query.project as string | undefined) ?? (typeof body.project === "string" ? body.project : undefined);
    let project: string | undefined;
    try {
      project = ProjectQuerySchema.parse(raw === undefined ? {} : { project: raw }).project;
    } catch (err) {
      await uploads.discard(files);
      throw err;
    }
    const results = await media.upload({ project, files }, actorOf(req));
    res.status(201).json(results);
  });
  r.get("/media/review", reviewers(), route({ query: ProjectQuerySchema }, ({ query }) => media.reviewQueue(query.project)));
  // The public gallery: what a visitor may see, or an investor's wider view when signed in.
  r.get(
    "/projects/:slug/gallery",
    route({ params: SlugParamSchema, query: GalleryQuerySchema }, ({ params, query, req, res }) => {
      const audiences = req.user ? (["public", "investor"] as const) : (["public"] as const);
      res.set("Cache-Control", req.user ? "private, no-cache" : "public, max-age=60");
      return media.gallery(params.slug, [...audiences], query);
    }),
  );

  // Then-and-now pairs found among the project's photos, for a story of one audience (decision 063).
  r.get("/projects/:slug/then-and-now", staff(), route({ params: SlugParamSchema, query: ThenAndNowQuerySchema, headers: { "Cache-Control": "private, no-store" } }, ({ params, query }) => media.thenAndNow(params.slug, query)));

  r.get("/media/vocabulary", staff(), route({ query: ProjectQuerySchema }, ({ query }) => media.vocabulary(query.project)));
  r.post("/media/bulk-tags", staff(), route({ body: BulkTagInputSchema }, ({ body }) => media.bulkTag(body)));
  r.get("/media/:id", staff(), route(itemPath, ({ params }) => media.get(params.id)));
  r.patch("/media/:id", staff(), route({ ...itemPath, body: MediaPatchInputSchema }, ({ params, body, actor }) => media.update(params.id, body, actor)));
  r.post("/media/:id/review", reviewers(), route({ ...itemPath, body: ReviewInputSchema }, ({ params, body, actor }) => media.review(params.id, body, actor)));
  r.post("/media/:id/retry", staff(), route(itemPath, ({ params }) => media.retry(params.id)));
  r.get("/media/:id/original", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const file = await media.original(id);
    const disposition = `inline; filename*=UTF-8''${encodeURIComponent(file.name)}`;
    // The original may carry GPS and other metadata: never kept by a shared cache.
    res.set("Cache-Control", "private, no-store");
    const sent = await sendStored(req, res, file, { redirect: true, disposition });
    if (!sent) throw new AppError("original_missing", "The original file of this photo is missing from storage.", 404);
  });
  return r;
}

/** A missing derivative answers like a forbidden one: nobody learns that a hidden photo exists. */
const fileNotFound = { error: { code: "not_found", message: "There is no such image." } };

/**
 * GET /media/v/:name — derivative bytes with the audience check on every request. Public use
 * is cached for ever by anyone (`public, …, immutable`: the name is the bytes' hash); anything
 * else only by the reader's own browser (`private`).
 *
 * GET /media/s/:name?exp=&sig= — the same bytes for the holder of a signed, expiring link (investor
 * images in e-mail, where nobody is signed in): kept only by the recipient's own cache, and not past
 * the link's expiry.
 */
/**
 * Sends a stored file whose reader has been checked: with `redirect` and presigned delivery
 * configured, a 302 to the store's own short-lived URL (never cached: the URL is a bearer pass);
 * otherwise the bytes through the app, one byte range when asked (206, or 416 when none of it is
 * inside the file), the whole file for a malformed or multi-range request. False when the store
 * holds no bytes for it (the caller answers 404). Headers set by the caller stay.
 */
async function sendStored(req: Request, res: Response, file: StoredFile & { etag?: string }, opts: { redirect: boolean; disposition?: string }): Promise<boolean> {
  if (file.etag && req.headers["if-none-match"] === file.etag) {
    res.status(304).end();
    return true;
  }
  const url = opts.redirect ? file.presigned(opts.disposition) : null;
  if (url) {
    res.set("Cache-Control", "private, no-store").redirect(302, await url);
    return true;
  }
  let opened = await file.open();
  if (!opened) return false;
  res.set({ "Content-Type": file.contentType, "Accept-Ranges": "bytes" });
  const header = req.headers.range;
  // If-Range with another validator than the current one asks for the whole file (RFC 9110 §13.1.5).
  const rangeStillValid = req.headers["if-range"] === undefined || (file.etag !== undefined && req.headers["if-range"] === file.etag);
  if (header && rangeStillValid) {
    const ranges = parseRange(opened.size, header, { combine: true });
    if (ranges === -1) {
      opened.stream.destroy();
      res.status(416).set("Content-Range", `bytes */${opened.size}`).end();
      return true;
    }
    const only = ranges !== -2 && ranges.type === "bytes" && ranges.length === 1 ? ranges[0] : undefined;
    if (only) {
      // The whole file was opened to learn its size; the range is a second, exact read.
      opened.stream.destroy();
      const part = await file.open({ start: only.start, end: only.end });
      if (!part) return false;
      opened = part;
      res.status(206).set("Content-Range", `bytes ${only.start}-${only.end}/${part.size}`);
    }
  }
  if (opts.disposition) res.set("Content-Disposition", opts.disposition);
  res.set("Content-Length", String(opened.bytes));
  const { stream } = opened;
  stream.on("error", (err: Error) => res.destroy(err));
  stream.pipe(res);
  return true;
}

export function mediaFilesRouter(media: MediaService): Router {
  const r = Router();
  r.get("/media/v/:name", async (req, res) => {
    const role = req.user?.role;
    const reader = role === "admin" || role === "lead" || role === "marketing" ? "staff" : role === "investor" ? "investor" : "visitor";
    const file = await media.variantFile(req.params.name, reader);
    if (!file) {
      res.status(404).set("Cache-Control", "no-store").json(fileNotFound);
      return;
    }
    res.set({
      "Cache-Control": `${file.isPublic ? "public" : "private"}, max-age=31536000, immutable`,
      ETag: file.etag,
      // Public derivatives appear in e-mail and feed readers on other origins.
      ...(file.isPublic ? { "Cross-Origin-Resource-Policy": "cross-origin" } : {}),
    });
    // Public derivatives are always the app's to send, under their immutable names (decision 066).
    if (!(await sendStored(req, res, file, { redirect: !file.isPublic }))) {
      res.removeHeader("ETag");
      res.status(404).set("Cache-Control", "no-store").json(fileNotFound);
    }
  });
  r.get("/media/s/:name", async (req, res) => {
    // Refusals (400, 404, 410) are never stored, by any cache.
    res.set("Cache-Control", "no-store");
    const link = SignedVariantQuerySchema.parse({ ...req.query });
    const file = await media.readSignedVariant(req.params.name, link);
    if (!file) {
      res.status(404).json(fileNotFound);
      return;
    }
    res.set({
      // Never `public`: a shared cache must not hand an investor's image to anyone else.
      "Cache-Control": `private, max-age=${file.maxAgeSeconds}`,
      ETag: file.etag,
      // Mail clients and web copies show it from other origins.
      "Cross-Origin-Resource-Policy": "cross-origin",
      "X-Robots-Tag": "noindex",
    });
    if (!(await sendStored(req, res, file, { redirect: true }))) {
      res.removeHeader("ETag");
      res.status(404).set("Cache-Control", "no-store").json(fileNotFound);
    }
  });
  return r;
}
