import { Router, type Request, type Response } from "express";
import type { z } from "zod";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { DiffQuerySchema, ReturnInputSchema, RevisionParamsSchema, ScheduleInputSchema, type PublishingEvent, type RevisionDiff, type RevisionSummary, type ScheduleInput, type WorkflowResult } from "#shared/schemas/publishing.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { Actor } from "../core/types.ts";

const staff = () => requireRole("admin", "lead", "marketing");
const approvers = () => requireRole("lead", "admin");

/**
 * Reads a CDN may keep: a visitor's answers are public for a minute (ETag revalidation
 * answers 304 after that); a signed-in caller's are private to them.
 */
export function cacheForReader(req: Request, res: Response): void {
  res.vary("Cookie");
  res.set("Cache-Control", req.user ? "private, no-cache" : "public, max-age=60, stale-while-revalidate=300");
}

/** What a kind's service offers for the routes every kind of published content has. */
export interface PublishedService<Detail, CreateInput, PatchInput> {
  getBySlug(slug: string, itemSlug: string, actor: Actor): Promise<Detail | { redirectTo: string }>;
  create(slug: string, input: CreateInput, actor: Actor): Promise<unknown>;
  getById(id: number, actor: Actor): Promise<Detail>;
  patch(id: number, input: PatchInput, actor: Actor): Promise<Detail>;
  revisions(id: number): Promise<RevisionSummary[]>;
  history(id: number): Promise<PublishingEvent[]>;
  diff(id: number, n: number, against?: number): Promise<RevisionDiff>;
  restore(id: number, n: number, actor: Actor): Promise<Detail>;
  submit(id: number, actor: Actor): Promise<WorkflowResult>;
  approve(id: number, actor: Actor): Promise<WorkflowResult>;
  returnToDraft(id: number, comment: string, actor: Actor): Promise<WorkflowResult>;
  publish(id: number, actor: Actor): Promise<WorkflowResult>;
  schedule(id: number, at: ScheduleInput["at"], actor: Actor): Promise<WorkflowResult>;
  withdraw(id: number, actor: Actor): Promise<WorkflowResult>;
}

/** Where a kind lives in the API and on the site, and how its own inputs are read. */
export interface PublishedRoutes<CreateInput, PatchInput, ItemParam extends string> {
  /** The path segment of the API: `/api/projects/:slug/<plural>` and `/api/<plural>/:id`. */
  plural: string;
  /** The path segment of its pages (`/projects/:slug/<page>/:itemSlug`), named by a redirect. */
  page: string;
  /** The route parameter of the item's address (`postSlug`, `storySlug`: the names errors give). */
  itemParam: ItemParam;
  /** The schema of the route parameters: the project's and the item's addresses (`:slug`, `:<itemParam>`). */
  slugParams: z.ZodType<{ slug: string } & Record<ItemParam, string>>;
  createInput: z.ZodType<CreateInput>;
  patchInput: z.ZodType<PatchInput>;
}

/**
 * The routes every kind of published content serves the same way: one item by its address
 * (301 from an old one), creating and editing, the revisions, their diff and restore, the
 * history, and the workflow steps. Reads by address are open to every caller and filtered by
 * audience in the service; writing is for staff; approving, returning, publishing, scheduling
 * and withdrawing for leads and admins (the workflow rules refine who may do what when).
 */
export function publishingRouter<Detail, CreateInput, PatchInput, ItemParam extends string>(routes: PublishedRoutes<CreateInput, PatchInput, ItemParam>, service: PublishedService<Detail, CreateInput, PatchInput>): Router {
  const r = Router();
  const { plural, page } = routes;

  r.get(`/projects/:slug/${plural}/:${routes.itemParam}`, async (req, res) => {
    const params = routes.slugParams.parse(req.params);
    const { slug } = params;
    const found = await service.getBySlug(slug, params[routes.itemParam], actorOf(req));
    cacheForReader(req, res);
    if (found && typeof found === "object" && "redirectTo" in found) {
      // fetch() follows the Location to the current address; the body names the page to show.
      res
        .status(301)
        .location(`/api/projects/${slug}/${plural}/${found.redirectTo}`)
        .json({ redirectTo: `/projects/${slug}/${page}/${found.redirectTo}` });
      return;
    }
    res.json(found);
  });
  r.post(`/projects/:slug/${plural}`, staff(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = routes.createInput.parse(req.body);
    res.status(201).json(await service.create(slug, input, actorOf(req)));
  });

  r.get(`/${plural}/:id`, staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.set("Cache-Control", "private, no-cache").json(await service.getById(id, actorOf(req)));
  });
  r.patch(`/${plural}/:id`, staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = routes.patchInput.parse(req.body);
    res.json(await service.patch(id, input, actorOf(req)));
  });
  r.get(`/${plural}/:id/revisions`, staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await service.revisions(id));
  });
  r.get(`/${plural}/:id/history`, staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await service.history(id));
  });
  r.get(`/${plural}/:id/revisions/:n/diff`, staff(), async (req, res) => {
    const { id, n } = RevisionParamsSchema.parse(req.params);
    const { against } = DiffQuerySchema.parse({ ...req.query });
    res.json(await service.diff(id, n, against));
  });
  r.post(`/${plural}/:id/revisions/:n/restore`, staff(), async (req, res) => {
    const { id, n } = RevisionParamsSchema.parse(req.params);
    res.json(await service.restore(id, n, actorOf(req)));
  });

  // The workflow steps: each reads the id (and its own input) and answers `{ id, status }`.
  const step = (action: string, who: ReturnType<typeof staff>, run: (id: number, req: Request) => Promise<WorkflowResult>) =>
    r.post(`/${plural}/:id/${action}`, who, async (req, res) => {
      const { id } = IdParamSchema.parse(req.params);
      res.json(await run(id, req));
    });
  step("submit", staff(), (id, req) => service.submit(id, actorOf(req)));
  step("approve", approvers(), (id, req) => service.approve(id, actorOf(req)));
  step("return", approvers(), (id, req) => service.returnToDraft(id, ReturnInputSchema.parse(req.body).comment, actorOf(req)));
  step("publish", approvers(), (id, req) => service.publish(id, actorOf(req)));
  step("schedule", approvers(), (id, req) => service.schedule(id, ScheduleInputSchema.parse(req.body).at, actorOf(req)));
  step("withdraw", approvers(), (id, req) => service.withdraw(id, actorOf(req)));

  return r;
}
