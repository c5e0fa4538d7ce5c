import { Router, type Request, type Response } from "express";
import type { Store } from "express-rate-limit";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { PressUsageTermsInputSchema } from "#shared/schemas/press-kits.ts";
import { PressKitInputSchema, PublicPressKitQuerySchema } from "#shared/schemas/writing-help.ts";
import { NEVER_STORED } from "../core/cache-policy.ts";
import { actorOf, requireStaff } from "../core/auth.ts";
import { requestLimit } from "../core/request-limit.ts";
import { projectPath, route } from "../core/route.ts";
import type { PressKitDownload, PressKitsService } from "./press-kits.service.ts";

/**
 * The zip as it is built: headers first, then the archive piped to the caller (it waits while
 * the caller reads slowly). A caller who goes away stops the build; a failure after the headers
 * cuts the answer short, so the client sees a broken download rather than a short zip.
 */
function sendKit(req: Request, res: Response, kit: PressKitDownload, cacheControl: string): void {
  res.set({
    "Content-Type": "application/zip",
    "Content-Disposition": `attachment; filename="${kit.fileName}"`,
    "Cache-Control": cacheControl,
    "X-Robots-Tag": "noindex",
  });
  if (req.method === "HEAD") {
    res.end();
    return;
  }
  const zip = kit.open();
  zip.on("error", (err) => {
    req.log?.error({ err }, "press kit stopped while streaming");
    res.destroy(err);
  });
  res.on("close", () => {
    if (!res.writableFinished) kit.abort();
  });
  zip.pipe(res);
}

/** Press kits under /api: a staff kit (POST), and the project's usage terms (read by anyone, set by staff). */
export function pressKitsRouter(pressKits: PressKitsService): Router {
  const r = Router();
  r.get("/projects/:slug/press-kit/terms", route(projectPath, ({ params }) => pressKits.usageTerms(params.slug)));
  r.put("/projects/:slug/press-kit/terms", requireStaff(), route({ ...projectPath, body: PressUsageTermsInputSchema }, ({ params, body, actor }) => pressKits.setUsageTerms(params.slug, body, actor)));
  r.post("/projects/:slug/press-kit", requireStaff(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = PressKitInputSchema.parse(req.body);
    sendKit(req, res, await pressKits.staffKit(slug, input, actorOf(req)), NEVER_STORED);
  });
  return r;
}

/**
 * GET /projects/:slug/press-kit.zip?area=|story=&size= — the public download (outside /api, as a
 * plain link): cleared photos of published public content only, limited per network address in
 * the shared store, since each answer reads many files.
 */
export function pressKitFilesRouter(deps: { pressKits: PressKitsService; limit: { perIp: number; windowMs: number }; store: Store }): Router {
  const r = Router();
  const perIp = requestLimit({
    windowMs: deps.limit.windowMs,
    limit: deps.limit.perIp,
    store: deps.store,
    message: "Too many photograph downloads from this network. Wait a few minutes and try again.",
  });
  r.get("/projects/:slug/press-kit.zip", perIp, async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = PublicPressKitQuerySchema.parse({ ...req.query });
    // Checked at the moment of each download: no shared cache may keep an answer past a photo's withdrawal.
    sendKit(req, res, await deps.pressKits.publicKit(slug, query), "no-store");
  });
  return r;
}
