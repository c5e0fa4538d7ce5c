import { Router, type Request, type Response } from "express";
import { ReviewAnswerInputSchema, ReviewLinkInputSchema, ReviewRevisionQuerySchema, ReviewTokenParamSchema, type ReviewContentKind } from "#shared/schemas/review-links.ts";
import { AppError } from "../core/app-error.ts";
import { requireStaff } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
import type { ReviewClient, ReviewLinksService } from "./review-links.service.ts";

const NEVER_STORED = "private, no-store";
/** A derivative's file name, as the media module names them (anything else is not a file of ours). */
const VARIANT_NAME = /^[0-9a-f]{16}-\d{1,5}w\.(avif|webp|jpg)$/;

const TOKEN_IN_PATH = /^(\/(?:api\/)?review\/)[^/?#]+/;

/** A request as logged, its review token (and the parameters naming it) left out: the token is its reader's key. */
export function withoutReviewTokens<T extends { url?: string; params?: unknown }>(req: T): T {
  if (typeof req.url !== "string" || !TOKEN_IN_PATH.test(req.url)) return req;
  return { ...req, url: req.url.replace(TOKEN_IN_PATH, "$1…"), params: {} };
}

const clientOf = (req: Request): ReviewClient => ({ ip: req.ip ?? null, userAgent: req.get("user-agent") ?? null });

/** What a reviewer's answers carry: never kept by any cache, never indexed. */
function forReviewer(res: Response): Response {
  return res.set({ "Cache-Control": NEVER_STORED, "X-Robots-Tag": "noindex" });
}

/**
 * Review links. Staff (whoever may edit the content) make, list and revoke them; the reviewer,
 * without an account, reads the revision, its photos and answers through the link's token. The
 * answer is a state-changing /api request like any other, so it carries the CSRF token an
 * anonymous visitor fetches from GET /api/auth/csrf, as enquiries and subscriptions do.
 */
export function reviewLinksRouter(reviewLinks: ReviewLinksService): Router {
  const r = Router();

  const kinds: Array<[string, ReviewContentKind]> = [
    ["/posts/:id/review-links", "post"],
    ["/stories/:id/review-links", "story"],
  ];
  for (const [path, kind] of kinds) {
    r.post(path, requireStaff(), route({ ...itemPath, body: ReviewLinkInputSchema, status: 201, headers: { "Cache-Control": NEVER_STORED } }, ({ params, body, actor }) => reviewLinks.create(kind, params.id, body, actor)));
    r.get(path, requireStaff(), route({ ...itemPath, headers: { "Cache-Control": NEVER_STORED } }, ({ params }) => reviewLinks.list(kind, params.id)));
  }

  r.delete("/review-links/:id", requireStaff(), route({ ...itemPath, status: 204 }, async ({ params, actor, res }) => {
    await reviewLinks.revoke(params.id, actor);
    res.set("Cache-Control", NEVER_STORED);
  }));

  r.get("/review/:token", async (req, res) => {
    forReviewer(res);
    const { token } = ReviewTokenParamSchema.parse(req.params);
    const query = ReviewRevisionQuerySchema.parse({ ...req.query });
    res.json(await reviewLinks.open(token, query, clientOf(req)));
  });

  r.post("/review/:token/answer", async (req, res) => {
    forReviewer(res);
    const { token } = ReviewTokenParamSchema.parse(req.params);
    const query = ReviewRevisionQuerySchema.parse({ ...req.query });
    const input = ReviewAnswerInputSchema.parse(req.body);
    res.status(201).json(await reviewLinks.answer(token, query, input, clientOf(req)));
  });

  r.get("/review/:token/media/:name", async (req, res) => {
    forReviewer(res);
    const { token } = ReviewTokenParamSchema.parse({ token: req.params.token });
    const name = String(req.params.name);
    const file = VARIANT_NAME.test(name) ? await reviewLinks.photoFile(token, name) : null;
    if (!file) throw new AppError("not_found", "That photo is not part of this review.", 404);
    res.set({ "Content-Type": file.contentType, "Content-Length": String(file.bytes), ETag: file.etag });
    file.stream.on("error", (err) => res.destroy(err));
    file.stream.pipe(res);
  });

  return r;
}
