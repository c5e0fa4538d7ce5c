import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";

/**
 * The audience rule of published content, in one place for every kind and read path: visitors
 * read published public items, investors published public and investor ones, staff every item
 * in every state. `alias` names the content table in the query. Repository code: the posts,
 * stories and publishing repositories call it on their own queries; it names no table.
 */
export function visibleContent<T extends Knex.QueryBuilder>(query: T, viewer: Viewer, alias: string): T {
  if (viewer === "staff") return query;
  return query.where(`${alias}.status`, "published").whereIn(`${alias}.audience`, audiencesFor(viewer) as Audience[]) as T;
}
