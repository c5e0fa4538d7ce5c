import type { Knex } from "knex";
import type { BudgetSettingsInput } from "#shared/schemas/budget.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { DEFAULT_RISK_SCALE, RiskScaleSchema, type RiskScale } from "#shared/schemas/risks.ts";
import { bool, json, num, numOr, numOrNull, readRow, text, textOrNull } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

const toSettings = readRow<Project["settings"]>({
  toleranceWorkingDays: num(), behindWorkingDays: num(), weekendDays: json<number[]>([6, 7]), holidays: json<string[]>([]), availableFromLevel: numOr(4),
});
const toProject = readRow<Project>({
  id: num(), slug: text(), name: text(), operatorName: text(), locationLabel: text(), timeZone: text(), description: text(), currency: text(), visitsOffered: bool(),
  settings: toSettings,
});

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

const toSender = readRow<ProjectSender>({ id: num(), slug: text(), name: text(), operatorName: text(), postalAddress: textOrNull(), timeZone: text() });

export async function findProjectSender(q: Q, id: number): Promise<ProjectSender | null> {
  const r = await q("projects").where({ id }).first(...SENDER_COLUMNS);
  return r ? toSender(r) : null;
}

/** The senders of several projects in one read (those that exist). */
export async function findProjectSenders(q: Q, ids: readonly number[]): Promise<ProjectSender[]> {
  if (ids.length === 0) return [];
  return (await q("projects").whereIn("id", [...new Set(ids)]).select(...SENDER_COLUMNS)).map(toSender);
}

/**
 * The project's risk scale (levels of likelihood and impact, band edges). A stored setting that no
 * longer reads as a scale (edited by hand) falls back to the default rather than failing every read.
 */
export async function findRiskScale(q: Q, id: number): Promise<RiskScale | null> {
  const r = (await q("projects").where({ id }).first("risk_likelihood_levels", "risk_impact_levels", "risk_band_edges")) as Record<string, unknown> | undefined;
  if (!r) return null;
  let edges: unknown = null;
  try {
    edges = JSON.parse(String(r.risk_band_edges));
  } catch {
    edges = null;
  }
  const parsed = RiskScaleSchema.safeParse({ likelihoodLevels: Number(r.risk_likelihood_levels), impactLevels: Number(r.risk_impact_levels), bandEdges: edges });
  return parsed.success ? parsed.data : DEFAULT_RISK_SCALE;
}

/** The project's budget settings: the contingency held and the EAC the lead chose (kept out of the public project record). */
export async function findBudgetSettings(q: Q, id: number): Promise<BudgetSettingsInput | null> {
  const r = await q("projects").where({ id }).first("contingency_held", "projected_final_cost_method");
  return r ? { contingencyHeld: Number(r.contingency_held), projectedFinalCostMethod: r.projected_final_cost_method } : null;
}

export async function updateBudgetSettings(q: Q, id: number, settings: BudgetSettingsInput): Promise<void> {
  await q("projects").where({ id }).update({ contingency_held: settings.contingencyHeld, projected_final_cost_method: settings.projectedFinalCostMethod });
}

/** The commissioning level from which a unit carries its load (the facility's setting); null when there is no such project. */
export async function findAvailableFromLevel(q: Q, id: number): Promise<number | null> {
  const r = await q("projects").where({ id }).first("available_from_level");
  return r ? (r.available_from_level == null ? 4 : Number(r.available_from_level)) : null;
}

export async function updateAvailableFromLevel(q: Q, id: number, level: number): Promise<void> {
  await q("projects").where({ id }).update({ available_from_level: level });
}

/** The project's chosen hero photograph: the photo (null for none), the point a crop keeps, and the choice's version. */
export interface HeroChoice {
  mediaId: number | null;
  focusX: number;
  focusY: number;
  version: number;
}

const toHero = readRow<HeroChoice>({ mediaId: numOrNull("hero_media_id"), focusX: num("hero_focus_x"), focusY: num("hero_focus_y"), version: num("hero_version") });

export async function findHeroChoice(q: Q, id: number): Promise<HeroChoice | null> {
  const r = await q("projects").where({ id }).first("hero_media_id", "hero_focus_x", "hero_focus_y", "hero_version");
  return r ? toHero(r) : null;
}

/** The hero choices of several projects, by id. */
export async function findHeroChoices(q: Q, ids: readonly number[]): Promise<Map<number, HeroChoice>> {
  if (ids.length === 0) return new Map();
  const rows = (await q("projects").whereIn("id", [...new Set(ids)]).select("id", "hero_media_id", "hero_focus_x", "hero_focus_y", "hero_version")) as Array<Record<string, unknown>>;
  return new Map(rows.map((r) => [Number(r.id), toHero(r)]));
}

/** Writes the choice when its version is still `expected`; false when someone else changed it first. */
export async function updateHeroChoice(q: Q, id: number, expected: number, next: Omit<HeroChoice, "version">): Promise<boolean> {
  const n = await q("projects")
    .where({ id, hero_version: expected })
    .update({ hero_media_id: next.mediaId, hero_focus_x: next.focusX, hero_focus_y: next.focusY, hero_version: expected + 1 });
  return n === 1;
}

/** The line of usage terms the project prints beside its downloadable press photographs; undefined for no such project. */
export async function findPressUsageTerms(q: Q, id: number): Promise<string | null | undefined> {
  const r = (await q("projects").where({ id }).first("press_usage_terms")) as { press_usage_terms: string | null } | undefined;
  return r ? (r.press_usage_terms ?? null) : undefined;
}

export async function updatePressUsageTerms(q: Q, id: number, terms: string | null): Promise<void> {
  await q("projects").where({ id }).update({ press_usage_terms: terms });
}
