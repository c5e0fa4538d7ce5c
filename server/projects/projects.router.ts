import { Router } from "express";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import type { ProjectsService } from "./projects.service.ts";

export function projectsRouter(projects: ProjectsService): Router {
  const r = Router();
  r.get("/projects", async (_req, res) => {
    res.json(await projects.list());
  });
  r.get("/projects/:slug", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await projects.get(slug));
  });
  return r;
}
