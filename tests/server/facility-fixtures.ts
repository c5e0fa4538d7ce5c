import { randomBytes } from "node:crypto";
import { expect } from "vitest";
import type { BlockAnswer, FacilityAnswer, FeatureAnswer, SystemAnswer, UnitAnswer } from "../../src/shared/schemas/facility.ts";
import type { TestApp } from "../helpers/app.ts";
import { createProject, type Client } from "./posts-fixtures.ts";

/**
 * Rows for the facility's server tests: each test makes its own project (straight into the
 * database: projects have no write API) and writes its facility through the API as a lead.
 */

let seq = 0;
const unique = () => `${Date.now().toString(36)}${(seq++).toString(36)}${randomBytes(2).toString("hex")}`;

/** A project of the test's own (the house's project fixture), at the commissioning level asked for (default 4). */
export async function makeProject(t: TestApp, opts: { availableFromLevel?: number } = {}): Promise<{ id: number; slug: string }> {
  const p = await createProject(t);
  if (opts.availableFromLevel !== undefined) await t.db("projects").where({ id: p.id }).update({ available_from_level: opts.availableFromLevel });
  return p;
}

async function ok<T>(res: PromiseLike<{ status: number; body: unknown }>, status: number): Promise<T> {
  const r = await res;
  expect(r.status, JSON.stringify(r.body)).toBe(status);
  return r.body as T;
}

/** The writes a lead makes at a site walk, each answering the written subject as staff see it. */
export function facilityWriter(c: Client) {
  const send = (method: "post" | "patch" | "delete", path: string, body?: object) => {
    const req = c.agent[method](path).set("X-CSRF-Token", c.csrf);
    return body === undefined ? req : req.send(body);
  };
  return {
    send,
    milestone: (slug: string, body: Record<string, unknown>) =>
      ok<{ id: number; name: string; version: number }>(send("post", `/api/projects/${slug}/milestones`, { phase: "Commissioning", system: "cooling", weight: 1, baselineFinish: "2027-03-01", audience: "public", ...body }), 201),
    block: (slug: string, body: Record<string, unknown>) =>
      ok<BlockAnswer>(send("post", `/api/projects/${slug}/facility/blocks`, { name: `Hall ${unique()}`, racks: 48, itKw: 480, maxKwPerRack: 10, audience: "public", ...body }), 201),
    system: (slug: string, body: Record<string, unknown>) =>
      ok<SystemAnswer>(send("post", `/api/projects/${slug}/facility/systems`, { name: `Plant ${unique()}`, kind: "cooling", audience: "public", neededPerSystem: 1, ...body }), 201),
    unit: (systemId: number, body: Record<string, unknown>) => ok<UnitAnswer>(send("post", `/api/facility/systems/${systemId}/units`, { label: `Unit ${unique()}`, ...body }), 201),
    stage: (unit: { id: number; version: number }, body: Record<string, unknown>) => ok<UnitAnswer>(send("post", `/api/facility/units/${unit.id}/stage`, { version: unit.version, ...body }), 200),
    feature: (slug: string, body: Record<string, unknown>) =>
      ok<FeatureAnswer>(send("post", `/api/projects/${slug}/facility/features`, { kind: "client", name: `Feature ${unique()}`, status: "planned", audience: "public", ...body }), 201),
  };
}

/** The facility as a caller sees it. */
export async function facilityAs(c: { agent: Client["agent"] }, slug: string, query = ""): Promise<FacilityAnswer> {
  return ok<FacilityAnswer>(c.agent.get(`/api/projects/${slug}/facility${query}`), 200);
}

/** Everything a facility write could touch in a project, so "nothing written" can be checked. */
export async function footprint(t: TestApp, projectId: number) {
  const n = async (q: PromiseLike<Array<Record<string, unknown>>>) => Number((await q)[0]?.n ?? 0);
  const blocks = t.db("capacity_blocks").where({ project_id: projectId });
  const systems = t.db("plant_systems").where({ project_id: projectId });
  return {
    blocks: await n(blocks.clone().count({ n: "*" })),
    blockVersions: await n(blocks.clone().sum({ n: "version" })),
    blockMilestones: await n(t.db("capacity_block_milestones as l").join("capacity_blocks as b", "b.id", "l.block_id").where("b.project_id", projectId).count({ n: "*" })),
    systems: await n(systems.clone().count({ n: "*" })),
    systemVersions: await n(systems.clone().sum({ n: "version" })),
    systemBlocks: await n(t.db("plant_system_blocks as l").join("plant_systems as s", "s.id", "l.system_id").where("s.project_id", projectId).count({ n: "*" })),
    units: await n(t.db("plant_units as u").join("plant_systems as s", "s.id", "u.system_id").where("s.project_id", projectId).count({ n: "*" })),
    unitVersions: await n(t.db("plant_units as u").join("plant_systems as s", "s.id", "u.system_id").where("s.project_id", projectId).sum({ n: "u.version" })),
    features: await n(t.db("site_features").where({ project_id: projectId }).count({ n: "*" })),
    featureVersions: await n(t.db("site_features").where({ project_id: projectId }).sum({ n: "version" })),
    events: await n(t.db("facility_events").where({ project_id: projectId }).count({ n: "*" })),
    audit: await n(t.db("audit_events").where("action", "like", "facility_%").whereRaw("detail like ?", [`%"project":"${(await t.db("projects").where({ id: projectId }).first("slug")).slug}"%`]).count({ n: "*" })),
  };
}
