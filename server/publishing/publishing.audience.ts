import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";
import { firstRow, type Row } from "../db/rows.ts";

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

type Q = Knex | Knex.Transaction;

/**
 * A content kind's reads of one item (posts, stories): by id in any state (`forUpdate` locks its
 * row), and at its address in a project when the viewer may read it.
 */
export function contentFinders<R>(table: string, toRecord: (row: Row) => R) {
  const recordOf = (row: Row | undefined) => (row ? toRecord(row) : null);
  return {
    byId: async (q: Q, id: number, opts: { forUpdate?: boolean } = {}) => recordOf(await firstRow(q(table).where(`${table}.id`, id), opts)),
    visibleBySlug: async (q: Q, projectId: number, slug: string, viewer: Viewer) =>
      recordOf(await firstRow(visibleContent(q(table).where({ [`${table}.project_id`]: projectId, [`${table}.slug`]: slug }), viewer, table))),
  };
}
