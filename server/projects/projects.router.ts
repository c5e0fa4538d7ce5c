import { Router } from "express";
import { HeroInputSchema } from "#shared/schemas/project-hero.ts";
import { requireRole } from "../core/auth.ts";
import { projectPath, route } from "../core/route.ts";
import type { ProjectHero } from "./projects.hero.ts";
import type { ProjectsService } from "./projects.service.ts";

export function projectsRouter(projects: ProjectsService, hero: ProjectHero): Router {
  const r = Router();
  r.get("/projects", route({}, () => projects.list()));
  /** The home page's builds: the same for every caller. */
  r.get("/home", route({}, () => hero.home()));
  r.get("/projects/:slug", route(projectPath, ({ params }) => projects.get(params.slug)));
  r.get("/projects/:slug/hero", route(projectPath, ({ params }) => hero.hero(params.slug)));
  // The public face of the build is a publishing decision: leads and admins (decision 055).
  r.put("/projects/:slug/hero", requireRole("lead", "admin"), route({ ...projectPath, body: HeroInputSchema }, ({ params, body, actor }) => hero.setHero(params.slug, body, actor)));
  return r;
}
