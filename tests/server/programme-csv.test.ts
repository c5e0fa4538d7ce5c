import { afterAll, beforeAll, describe, expect, it } from "vitest";
import Papa from "papaparse";
import { MILESTONE_CSV_COLUMNS, type Milestone, type MilestoneEventRow } from "../../src/shared/schemas/programme.ts";
import { DEMO, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

let t: TestApp;
let lead: { agent: Agent; csrf: string };
beforeAll(async () => {
  t = await startTestApp();
  lead = await signIn(t, DEMO.lead);
});
afterAll(async () => {
  await t.close();
});

let seq = 0;
async function makeProject() {
  seq += 1;
  const slug = `prog-csv-${Date.now().toString(36)}-${seq}`;
  const [id] = await t.db("projects").insert({
    slug,
    name: `CSV test ${seq}`,
    operator_name: "Kestrel Colocation",
    time_zone: "Europe/London",
    currency: "GBP",
    tolerance_working_days: 5,
    behind_working_days: 15,
    weekend_days: "[6,7]",
    holidays: "[]",
  });
  return { id: Number(id), slug };
}

async function footprint(projectId: number) {
  const n = async (q: PromiseLike<Array<Record<string, unknown>>>) => Number((await q)[0]?.n ?? 0);
  return {
    milestones: await n(t.db("milestones").where({ project_id: projectId }).count({ n: "*" })),
    versions: await n(t.db("milestones").where({ project_id: projectId }).sum({ n: "version" })),
    phases: await n(t.db("phases").where({ project_id: projectId }).count({ n: "*" })),
    events: await n(t.db("milestone_events").where({ project_id: projectId }).count({ n: "*" })),
    dependencies: await n(t.db("milestone_dependencies as d").join("milestones as m", "m.id", "d.milestone_id").where("m.project_id", projectId).count({ n: "*" })),
  };
}

async function create(slug: string, body: Record<string, unknown>): Promise<Milestone> {
  const res = await lead.agent
    .post(`/api/projects/${slug}/milestones`)
    .set("X-CSRF-Token", lead.csrf)
    .send({ phase: "Plant", system: "power", weight: 1, baselineFinish: "2027-03-01", audience: "public", ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as Milestone;
}

const exportCsv = async (slug: string) => (await lead.agent.get(`/api/projects/${slug}/milestones.csv`).expect(200)).text;
const importCsv = (slug: string, csv: string) => lead.agent.post(`/api/projects/${slug}/milestones/import`).set("X-CSRF-Token", lead.csrf).send({ csv });
const listOf = async (slug: string) => (await lead.agent.get(`/api/projects/${slug}/milestones`).expect(200)).body as Milestone[];
const HEADER = MILESTONE_CSV_COLUMNS.join(",");

async function programme(slug: string) {
  const gens = await create(slug, { name: "Generators delivered (2 + 1 × 1,250 kVA)", plannedStart: "2027-01-04", percentComplete: 40, budget: 115_000_000, description: 'Three sets; "N+1" on the\nsecond line' });
  const fuel = await create(slug, { name: "=Fuel tank, 40,000 L", system: "fuel", weight: 2.5, audience: "investor", baselineFinish: "2026-06-01", actualFinish: "2026-06-03" });
  const comm = await create(slug, { name: "Generator commissioning", phase: "Commissioning", system: "commissioning", baselineFinish: "2027-04-01", dependsOn: [gens.id, fuel.id], audience: "internal" });
  return { gens, fuel, comm };
}

describe("GET /api/projects/:slug/milestones.csv", () => {
  it("exports every milestone as CSV with the fixed columns, quoting and formula escaping", async () => {
    const p = await makeProject();
    const { gens, fuel, comm } = await programme(p.slug);
    const res = await lead.agent.get(`/api/projects/${p.slug}/milestones.csv`).expect(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toContain(`${p.slug}-milestones.csv`);
    const parsed = Papa.parse<Record<string, string>>(res.text.trim(), { header: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual([...MILESTONE_CSV_COLUMNS]);
    expect(parsed.data.map((r) => r.id)).toEqual([String(fuel.id), String(gens.id), String(comm.id)]);
    const g = parsed.data.find((r) => r.id === String(gens.id))!;
    expect(g).toMatchObject({ percent_complete: "40", planned_start: "2027-01-04", budget: "115000000", depends_on: "", description: 'Three sets; "N+1" on the\nsecond line' });
    const f = parsed.data.find((r) => r.id === String(fuel.id))!;
    // A spreadsheet would run a cell starting with "=": it is written with an apostrophe.
    expect(f).toMatchObject({ name: "'=Fuel tank, 40,000 L", weight: "2.5", actual_finish: "2026-06-03", percent_complete: "100", audience: "investor" });
    expect(parsed.data.find((r) => r.id === String(comm.id))!.depends_on).toBe([gens.id, fuel.id].sort((a, b) => a - b).join(";"));
  });
});

describe("POST /api/projects/:slug/milestones/import", () => {
  it("round trip: importing the export changes nothing; an edited row updates, a row without id creates", async () => {
    const p = await makeProject();
    const { gens, fuel } = await programme(p.slug);
    const before = await listOf(p.slug);
    const csv = await exportCsv(p.slug);

    const same = await importCsv(p.slug, csv);
    expect(same.status, JSON.stringify(same.body)).toBe(200);
    expect(same.body).toEqual({ created: 0, updated: 0, unchanged: 3 });
    expect(await listOf(p.slug)).toEqual(before);

    const rows = Papa.parse<string[]>(csv.trim()).data;
    const g = rows.find((r) => r[0] === String(gens.id))!;
    g[6] = "65"; // percent_complete
    g[9] = "2027-03-12"; // forecast_finish
    rows.push(["", "UPS modules installed", "Plant", "Energy centre", "power", "3", "0", "", "2027-02-15", "", "", "investor", "98000000", `${fuel.id};Generators delivered (2 + 1 × 1,250 kVA)`, ""]);
    const edited = Papa.unparse(rows);
    const res = await importCsv(p.slug, edited);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toEqual({ created: 1, updated: 1, unchanged: 2 });

    const after = await listOf(p.slug);
    expect(after.find((m) => m.id === gens.id)).toMatchObject({ percentComplete: 65, forecastFinish: "2027-03-12", version: gens.version + 1 });
    const ups = after.find((m) => m.name === "UPS modules installed")!;
    expect(ups).toMatchObject({ weight: 3, baselineFinish: "2027-02-15", forecastFinish: "2027-02-15", budget: 98_000_000, audience: "investor", dependsOn: [gens.id, fuel.id].sort((a, b) => a - b) });
    expect(after.find((m) => m.id === fuel.id)!.name).toBe("=Fuel tank, 40,000 L");
    const events = (await lead.agent.get(`/api/milestones/${gens.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.slice(0, 2).map((e) => [e.field, e.from, e.to, e.note]).sort()).toEqual([
      ["forecast_finish", "2027-03-01", "2027-03-12", "Imported from a CSV file"],
      ["percent_complete", "40", "65", "Imported from a CSV file"],
    ]);

    // And the export of the result reads back the same again.
    const again = await importCsv(p.slug, await exportCsv(p.slug));
    expect(again.body).toEqual({ created: 0, updated: 0, unchanged: 4 });
  });

  it("matches a row without id by its name", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Chillers delivered" });
    const res = await importCsv(p.slug, `name,phase,system,weight,baseline_finish,audience,percent_complete\nChillers delivered,Plant,cooling,1,2027-03-01,public,30\n`);
    expect(res.body).toEqual({ created: 0, updated: 1, unchanged: 0 });
    expect((await listOf(p.slug))[0]).toMatchObject({ id: m.id, percentComplete: 30, system: "cooling" });
  });

  it("with one bad row imports nothing and reports that row's line and reason", async () => {
    const p = await makeProject();
    await programme(p.slug);
    const before = await footprint(p.id);
    const csv = [
      HEADER,
      ',New one,Plant,Plant yard,cooling,1,0,,2027-05-03,,,public,,,"A description over',
      'two lines"',
      ",Bad weight,Plant,Plant yard,cooling,0,0,,2027-05-03,,,public,,,",
      ",Good one,Plant,Plant yard,cooling,1,0,,2027-05-03,,,public,,,",
    ].join("\r\n");
    const res = await importCsv(p.slug, csv);
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe("csv_invalid");
    // The quoted description holds a newline, so the bad row begins on line 4.
    expect(res.body.error.rows).toEqual([{ line: 4, reason: expect.stringContaining("weight") }]);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("reports every bad row, each with its reason, across zod and the domain checks", async () => {
    const p = await makeProject();
    const { gens, fuel } = await programme(p.slug);
    const before = await footprint(p.id);
    const csv = [
      HEADER,
      `,Percent too high,Plant,,power,1,120,,2027-05-03,,,public,,,`,
      `,Future actual,Plant,,power,1,0,,2026-05-03,,2099-01-01,public,,,`,
      `,Unknown audience,Plant,,power,1,0,,2027-05-03,,,partners,,,`,
      `,Start after finish,Plant,,power,1,0,2027-06-01,2027-05-03,,,public,,,`,
      `,Unknown dependency,Plant,,power,1,0,,2027-05-03,,,public,,999999994,`,
      `,Unknown dependency name,Plant,,power,1,0,,2027-05-03,,,public,,No such milestone,`,
      `999999993,Unknown id,Plant,,power,1,0,,2027-05-03,,,public,,,`,
      `${gens.id},"Generators delivered (2 + 1 × 1,250 kVA)",Plant,,power,1,40,2027-01-04,2027-03-29,,,public,115000000,,`,
      `${fuel.id},Fuel tank,Plant,,fuel,2.5,100,,2026-06-01,,2026-06-03,investor,,${gens.id},`,
      `,Fine row,Plant,,power,1,0,,2027-05-03,,,public,,,`,
    ].join("\n");
    const res = await importCsv(p.slug, csv);
    expect(res.status).toBe(422);
    const reasons = Object.fromEntries((res.body.error.rows as Array<{ line: number; reason: string }>).map((r) => [r.line, r.reason]));
    expect(Object.keys(reasons).map(Number)).toEqual([2, 3, 4, 5, 6, 7, 8, 9]);
    expect(reasons[2]).toMatch(/percent_complete/);
    expect(reasons[3]).toMatch(/actual_finish 2099-01-01 is after today/);
    expect(reasons[4]).toMatch(/audience/);
    expect(reasons[5]).toMatch(/baseline_finish|planned_start/);
    expect(reasons[6]).toMatch(/depends_on .*999999994/);
    expect(reasons[7]).toMatch(/No such milestone/);
    expect(reasons[8]).toMatch(/id 999999993 is not a milestone of this project/);
    expect(reasons[9]).toMatch(/baseline_finish changes only by re-baselining/);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("refuses a dependency cycle closed by the file, naming the milestones and the lines", async () => {
    const p = await makeProject();
    const { gens, comm } = await programme(p.slug);
    const before = await footprint(p.id);
    const rows = Papa.parse<string[]>((await exportCsv(p.slug)).trim()).data;
    const g = rows.find((r) => r[0] === String(gens.id))!;
    g[13] = String(comm.id); // generators now depend on their own commissioning
    const res = await importCsv(p.slug, Papa.unparse(rows));
    expect(res.status).toBe(422);
    const [row] = res.body.error.rows;
    expect(row.line).toBe(rows.indexOf(g) + 1);
    expect(row.reason).toContain("Generators delivered (2 + 1 × 1,250 kVA) → Generator commissioning → Generators delivered (2 + 1 × 1,250 kVA)");
    expect(await footprint(p.id)).toEqual(before);
  });

  it("refuses a file without the required columns, or with unknown ones, on line 1", async () => {
    const p = await makeProject();
    const missing = await importCsv(p.slug, "name,phase\nA,B\n");
    expect(missing.status).toBe(422);
    expect(missing.body.error.rows).toEqual([{ line: 1, reason: expect.stringContaining("missing columns system, weight, baseline_finish, audience") }]);
    const unknown = await importCsv(p.slug, `${HEADER},colour\n`);
    expect(unknown.body.error.rows[0]).toMatchObject({ line: 1, reason: expect.stringContaining("unknown column colour") });
    const empty = await importCsv(p.slug, "");
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields.csv).toEqual(expect.any(String));
  });
});
