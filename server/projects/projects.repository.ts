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
      availableFromLevel: r.available_from_level == null ? 4 : Number(r.available_from_level),
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

/** The projects with these ids, by id (an unknown id is left out). */
export async function findProjectsByIds(q: Q, ids: readonly number[]): Promise<Map<number, Project>> {
  if (ids.length === 0) return new Map();
  const rows = (await q("projects").whereIn("id", [...new Set(ids)])) as Array<Record<string, unknown>>;
  return new Map(rows.map((r) => [Number(r.id), toProject(r)]));
}

/** Locks the project's row until the transaction ends (the caller's writes to the project's records take turns). */
export async function lockProjectRow(trx: Knex.Transaction, id: number): Promise<void> {
  await trx("projects").where({ id }).forUpdate().first("id");
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

const SENDER_COLUMNS = ["id", "slug", "name", "operator_name", "postal_address", "time_zone"] as const;

function toSender(r: Record<string, unknown>): ProjectSender {
  return { id: Number(r.id), slug: String(r.slug), name: String(r.name), operatorName: String(r.operator_name), postalAddress: r.postal_address == null ? null : String(r.postal_address), timeZone: String(r.time_zone) };
}

export async function findProjectSender(q: Q, id: number): Promise<ProjectSender | null> {
  const r = await q("projects").where({ id }).first(...SENDER_COLUMNS);
  return r ? toSender(r) : null;
}

/** The senders of several projects in one read (those that exist). */
export async function findProjectSenders(q: Q, ids: readonly number[]): Promise<ProjectSender[]> {
  if (ids.length === 0) return [];
  return (await q("projects").whereIn("id", [...new Set(ids)]).select(...SENDER_COLUMNS)).map(toSender);
}
