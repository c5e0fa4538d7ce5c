import type { Knex } from "knex";
import type { SiteAreaFields } from "../site-plan/site-plan.repository.ts";
import { insertArea, insertAreaEvents, listAreas } from "../site-plan/site-plan.repository.ts";

/**
 * The demo's site plan for Aldermere Campus Phase 2: an invented layout on the 24 × 16 grid,
 * not the shape of any real site. Each name is the area the demo's milestones and photos are
 * tagged with, so the plan's statuses and its gallery filter work from the first start. The
 * contractors' compound is staff's own: it shows that an internal area is never drawn for
 * visitors or investors.
 */
const AREAS: readonly SiteAreaFields[] = [
  { name: "Hall 2A", kind: "hall", audience: "public", x: 2, y: 2, w: 8, h: 6 },
  { name: "HD-1", kind: "suite", audience: "public", x: 10, y: 2, w: 4, h: 6 },
  { name: "Hall 2B", kind: "hall", audience: "public", x: 14, y: 2, w: 8, h: 6 },
  { name: "Energy centre", kind: "energy_centre", audience: "public", x: 2, y: 9, w: 6, h: 4 },
  { name: "Plant yard", kind: "plant_yard", audience: "public", x: 8, y: 9, w: 8, h: 4 },
  { name: "Client areas", kind: "client_area", audience: "public", x: 16, y: 9, w: 6, h: 4 },
  { name: "Site", kind: "other", audience: "public", x: 0, y: 14, w: 8, h: 2 },
  { name: "Contractors' compound", kind: "other", audience: "internal", x: 16, y: 14, w: 8, h: 2 },
];

/** Draws the demo plan into a project that has no area yet (a plan staff have since drawn is left alone). */
export async function seedSitePlan(db: Knex, projectId: number, opts: { byUserId: number | null; at?: Date }): Promise<{ created: string[] }> {
  if ((await listAreas(db, projectId, ["public", "investor", "internal"])).length > 0) return { created: [] };
  const at = opts.at ?? new Date();
  await db.transaction(async (trx) => {
    for (const a of AREAS) {
      const id = await insertArea(trx, projectId, a, at);
      await insertAreaEvents(trx, [{ projectId, subjectId: id, field: "created", from: null, to: a.name, at, byUserId: opts.byUserId, note: null }]);
    }
  });
  return { created: [`site plan of ${AREAS.length} areas`] };
}
