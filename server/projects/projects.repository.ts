import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";

type Q = Knex | Knex.Transaction;

function toProject(r: Record<string, unknown>): Project {
  return {
    id: Number(r.id),
    slug: String(r.slug),
    name: String(r.name),
    operatorName: String(r.operator_name),
    locationLabel: String(r.location_label ?? ""),
    timeZone: String(r.time_zone),
    description: String(r.description ?? ""),
    currency: String(r.currency),
    visitsOffered: Boolean(r.visits_offered),
    settings: {
      toleranceWorkingDays: Number(r.tolerance_working_days),
      behindWorkingDays: Number(r.behind_working_days),
      weekendDays: JSON.parse(String(r.weekend_days ?? "[6,7]")) as number[],
      holidays: r.holidays ? (JSON.parse(String(r.holidays)) as string[]) : [],
    },
  };
}

export async function listProjects(q: Q): Promise<Project[]> {
  return (await q("projects").orderBy("name")).map(toProject);
}

export async function findProjectBySlug(q: Q, slug: string): Promise<Project | null> {
  const r = await q("projects").where({ slug }).first();
  return r ? toProject(r) : null;
}

export async function findProjectById(q: Q, id: number): Promise<Project | null> {
  const r = await q("projects").where({ id }).first();
  return r ? toProject(r) : null;
}

/** What an e-mail about the project names: the project, its operator and the operator's postal address. */
export interface ProjectSender {
  id: number;
  slug: string;
  name: string;
  operatorName: string;
  postalAddress: string | null;
  timeZone: string;
}

export async function findProjectSender(q: Q, id: number): Promise<ProjectSender | null> {
  const r = await q("projects").where({ id }).first("id", "slug", "name", "operator_name", "postal_address", "time_zone");
  return r ? { id: Number(r.id), slug: String(r.slug), name: String(r.name), operatorName: String(r.operator_name), postalAddress: r.postal_address ?? null, timeZone: String(r.time_zone) } : null;
}
