import { notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import { findProjectBySlug, listProjects } from "./projects.repository.ts";

export function createProjectsService(db: Db) {
  return {
    list: () => listProjects(db),
    async get(slug: string) {
      const p = await findProjectBySlug(db, slug);
      if (!p) throw notFound("That project");
      return p;
    },
  };
}
export type ProjectsService = ReturnType<typeof createProjectsService>;
