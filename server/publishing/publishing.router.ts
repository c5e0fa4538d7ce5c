import { Router, type Request, type Response } from "express";
import type { z } from "zod";
import { DiffQuerySchema, ReturnInputSchema, RevisionParamsSchema, ScheduleInputSchema, type PublishingEvent, type RevisionDiff, type RevisionSummary, type ScheduleInput, type WorkflowResult } from "#shared/schemas/publishing.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
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
  const revision = { params: RevisionParamsSchema };

  r.get(
    `/projects/:slug/${plural}/:${routes.itemParam}`,
    route({ params: routes.slugParams }, async ({ params, actor, req, res }) => {
      const { slug } = params;
      const found = await service.getBySlug(slug, params[routes.itemParam], actor);
      cacheForReader(req, res);
      if (found && typeof found === "object" && "redirectTo" in found) {
        // fetch() follows the Location to the current address; the body names the page to show.
        res
          .status(301)
          .location(`/api/projects/${slug}/${plural}/${found.redirectTo}`)
          .json({ redirectTo: `/projects/${slug}/${page}/${found.redirectTo}` });
        return;
      }
      return found;
    }),
  );
  r.post(`/projects/:slug/${plural}`, staff(), route({ params: SlugParamSchema, body: routes.createInput, status: 201 }, ({ params, body, actor }) => service.create(params.slug, body, actor)));

  r.get(
    `/${plural}/:id`,
    staff(),
    route({ ...itemPath, headers: { "Cache-Control": "private, no-cache" } }, ({ params, actor }) => service.getById(params.id, actor)),
  );
  r.patch(`/${plural}/:id`, staff(), route({ ...itemPath, body: routes.patchInput }, ({ params, body, actor }) => service.patch(params.id, body, actor)));
  r.get(`/${plural}/:id/revisions`, staff(), route(itemPath, ({ params }) => service.revisions(params.id)));
  r.get(`/${plural}/:id/history`, staff(), route(itemPath, ({ params }) => service.history(params.id)));
  r.get(`/${plural}/:id/revisions/:n/diff`, staff(), route({ ...revision, query: DiffQuerySchema }, ({ params, query }) => service.diff(params.id, params.n, query.against)));
  r.post(`/${plural}/:id/revisions/:n/restore`, staff(), route(revision, ({ params, actor }) => service.restore(params.id, params.n, actor)));

  // The workflow steps: each reads the id (and its own input) and answers `{ id, status }`.
  r.post(`/${plural}/:id/submit`, staff(), route(itemPath, ({ params, actor }) => service.submit(params.id, actor)));
  r.post(`/${plural}/:id/approve`, approvers(), route(itemPath, ({ params, actor }) => service.approve(params.id, actor)));
  r.post(`/${plural}/:id/return`, approvers(), route({ ...itemPath, body: ReturnInputSchema }, ({ params, body, actor }) => service.returnToDraft(params.id, body.comment, actor)));
  r.post(`/${plural}/:id/publish`, approvers(), route(itemPath, ({ params, actor }) => service.publish(params.id, actor)));
  r.post(`/${plural}/:id/schedule`, approvers(), route({ ...itemPath, body: ScheduleInputSchema }, ({ params, body, actor }) => service.schedule(params.id, body.at, actor)));
  r.post(`/${plural}/:id/withdraw`, approvers(), route(itemPath, ({ params, actor }) => service.withdraw(params.id, actor)));

  return r;
}
