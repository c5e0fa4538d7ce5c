import { Router } from "express";
import { HeroInputSchema } from "#shared/schemas/project-hero.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { ProjectHero } from "./projects.hero.ts";
import type { ProjectsService } from "./projects.service.ts";

export function projectsRouter(projects: ProjectsService, hero: ProjectHero): Router {
  const r = Router();
  r.get("/projects", async (_req, res) => {
    res.json(await projects.list());
  });
  /** The home page's builds: the same for every caller. */
  r.get("/home", async (_req, res) => {
    res.json(await hero.home());
  });
  r.get("/projects/:slug", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await projects.get(slug));
  });
  r.get("/projects/:slug/hero", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await hero.hero(slug));
  });
  // The public face of the build is a publishing decision: leads and admins (decision 055).
  r.put("/projects/:slug/hero", requireRole("lead", "admin"), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = HeroInputSchema.parse(req.body);
    res.json(await hero.setHero(slug, input, actorOf(req)));
  });
  return r;
}
