import compression from "compression";
import type { Request, RequestHandler, Response } from "express";

/**
 * Compresses text answers (scripts, CSS, HTML, JSON, SVG, feeds, .ics) with brotli or gzip,
 * whichever the caller accepts, and adds `Vary: Accept-Encoding` (docs/decisions/049-compressed-answers-and-preload-hints.md).
 * Photos and PDFs are already compressed: squeezing them again costs CPU for no bytes, and a
 * PDF or media stream must keep its byte ranges.
 */
export function isCompressibleType(contentType: string): boolean {
  const type = contentType.split(";")[0]!.trim().toLowerCase();
  if (type === "image/svg+xml") return true;
  if (type.startsWith("image/") || type.startsWith("video/") || type.startsWith("audio/") || type === "application/pdf") return false;
  return /^text\/|[/+](json|javascript|xml)$|^application\/(manifest\+json|x-ndjson)$/.test(type);
}

export function compressAnswers(): RequestHandler {
  const compress = compression({
    filter: (req: Request, res: Response) => {
      const type = res.getHeader("content-type");
      if (typeof type !== "string" || !isCompressibleType(type)) return false;
      // Honours Cache-Control: no-transform and the rest of the library's own rules.
      return compression.filter(req, res);
    },
  }) as unknown as RequestHandler;
  // A caller that accepts no encoding (a script, a load generator) gets nothing to negotiate:
  // skip the wrapping of every write, the busiest public answers' largest overhead.
  return (req, res, next) => (req.headers["accept-encoding"] ? compress(req, res, next) : next());
}
