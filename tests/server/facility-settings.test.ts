import { describe, expect, it } from "vitest";
import { newClient } from "../helpers/app.ts";
import { facilityAs, facilityWriter, makeProject } from "./facility-fixtures.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";

/*
 * PUT /api/projects/:slug/facility/settings: the commissioning level from which a unit carries its
 * load (L4 by default). Who may change it is in the role matrix; here, what a change does, that it is
 * audited once, and that nothing else is ever written.
 */

const f = useAppAsEveryRole();
const put = (slug: string, body: unknown, who: { agent: typeof f.as.lead.agent; csrf: string } = f.as.lead) => who.agent.put(`/api/projects/${slug}/facility/settings`).set("X-CSRF-Token", who.csrf).send(body as object);
const levelOf = async (projectId: number) => Number((await f.t.db("projects").where({ id: projectId }).first("available_from_level")).available_from_level);
const auditRows = (projectId: number) => f.t.db("audit_events").where({ action: "facility_settings_changed", target_id: String(projectId) }).orderBy("id");

describe("the level from which a unit carries its load", () => {
  it("a lead moves it to L5: every system's 'now' counts only units at L5, once audited with from and to; back to L4 restores it", async () => {
    const p = await makeProject(f.t);
    const w = facilityWriter(f.as.lead);
    const s = await w.system(p.slug, { name: "Chilled water", neededPerSystem: 1 });
    for (const label of ["Chiller 1", "Chiller 2"]) {
      const unit = await w.unit(s.id, { label, stage: "installed", on: "2026-03-02" });
      await w.stage(unit, { stage: "L4", on: "2026-04-14" });
    }
    const before = (await facilityAs(f.as.lead, p.slug)).systems.find((x) => x.id === s.id)!;
    expect(before.redundancy).toMatchObject({ now: "N+1", available: 2 });

    const res = await put(p.slug, { availableFromLevel: 5 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toEqual({ availableFromLevel: 5 });
    expect(res.headers["cache-control"]).toContain("no-store");
    const after = await facilityAs(f.as.lead, p.slug);
    expect(after.availableFromLevel).toBe(5);
    expect(after.systems.find((x) => x.id === s.id)!.redundancy).toMatchObject({ available: 0, carriesLoad: false });
    // The public page reads the same setting.
    expect((await facilityAs(await newClient(f.t), p.slug)).availableFromLevel).toBe(5);

    const rows = await auditRows(p.id);
    expect(rows).toHaveLength(1);
    expect(JSON.parse(String(rows[0].detail))).toEqual({ availableFromLevel: { from: 4, to: 5 } });

    // The same value again changes nothing and is not audited again.
    expect((await put(p.slug, { availableFromLevel: 5 })).status).toBe(200);
    expect(await auditRows(p.id)).toHaveLength(1);

    expect((await put(p.slug, { availableFromLevel: 4 })).status).toBe(200);
    expect((await facilityAs(f.as.lead, p.slug)).systems.find((x) => x.id === s.id)!.redundancy).toMatchObject({ now: "N+1", available: 2 });
    expect(await auditRows(p.id)).toHaveLength(2);
  });

  it("refuses what is not a level from L3 to L5, naming the field, and writes nothing", async () => {
    const p = await makeProject(f.t);
    const bad: unknown[] = [
      {},
      { availableFromLevel: 2 },
      { availableFromLevel: 6 },
      { availableFromLevel: 4.5 },
      { availableFromLevel: "4" },
      { availableFromLevel: null },
      { availableFromLevel: 1e308 },
      { availableFromLevel: 4, notes: "and another field" },
      [4],
    ];
    for (const body of bad) {
      const res = await put(p.slug, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.code).toBe("validation");
    }
    const named = await put(p.slug, { availableFromLevel: 2 });
    expect(named.body.error.fields.availableFromLevel).toMatch(/L3 or later/);
    expect(await levelOf(p.id)).toBe(4);
    expect(await auditRows(p.id)).toHaveLength(0);
  });

  it("a project that does not exist is 404; marketing and investors may not change it (403), visitors must sign in (401)", async () => {
    expect((await put("no-such-build", { availableFromLevel: 5 })).status).toBe(404);
    const p = await makeProject(f.t);
    expect((await put(p.slug, { availableFromLevel: 5 }, f.as.marketing)).status).toBe(403);
    expect((await put(p.slug, { availableFromLevel: 5 }, f.as.investor)).status).toBe(403);
    expect((await put(p.slug, { availableFromLevel: 5 }, await newClient(f.t))).status).toBe(401);
    expect(await levelOf(p.id)).toBe(4);
  });
});
