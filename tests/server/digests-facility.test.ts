import { DateTime } from "luxon";
import { beforeAll, describe, expect, it } from "vitest";
import { INDICATIVE_CAUTION } from "../../src/shared/domain/facility.ts";
import { lastMailId, newClient, type TestApp } from "../helpers/app.ts";
import { digestSubscriber, digestsTo, scheduledRun } from "../helpers/digests.ts";
import { facilityWriter, makeProject } from "./facility-fixtures.ts";
import { useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole({ PUBLIC_URL: "https://progress.kestrel.example", COOKIE_SECURE: "false" });
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const DAY = 86_400_000;
const ZONE = "Europe/London"; // makeProject's zone
/** The window of the weekly run below: this ISO week on site. */
const today = () => DateTime.now().setZone(ZONE).toISODate()!;
const beforeTheWindow = () => DateTime.now().setZone(ZONE).startOf("week").minus({ days: 3 }).toISODate()!;

/** This week's weekly run, started as the scheduler will start it next Monday, and sent into the sink. */
async function thisWeeksDigests(slug: string) {
  const run = await scheduledRun(t, slug, "weekly", new Date(Date.now() + 7 * DAY));
  expect(run.created).toBe(true);
  await t.plumbline.digestJobs.drain();
  return run;
}

/** A plant system with units already at their stages before the window, as a lead records them. */
async function systemWithUnits(slug: string, body: Record<string, unknown>, units: Array<{ label: string; stage: string }>) {
  const w = facilityWriter(as.lead);
  const system = await w.system(slug, body);
  const made = [];
  for (const u of units) made.push(await w.unit(system.id, { ...u, on: beforeTheWindow() }));
  return { system, units: made };
}

/** Hall 2A served by one supply fan (N = 1), installed before the window and commissioned to L4 on `on`. */
async function hallWithOneFanCommissioned(on: string) {
  const p = await makeProject(t);
  const hall = await facilityWriter(as.lead).block(p.slug, { name: "Hall 2A", audience: "public" });
  const fans = await systemWithUnits(p.slug, { name: "Supply fans", kind: "air_movement", audience: "public", neededPerSystem: 1, serves: [hall.id] }, [{ label: "Fan 1", stage: "installed" }]);
  await facilityWriter(as.lead).stage(fans.units[0]!, { stage: "L4", on });
  return p;
}

describe("a digest reports the facility's moves in its window", () => {
  it("a unit commissioned in the window reaches the audiences that may see its system, with the new label and the caution, over SMTP", async () => {
    const p = await makeProject(t);
    const w = facilityWriter(as.lead);
    const hall = await w.block(p.slug, { name: "Hall 2A", audience: "public" });
    // Design N+1 (3 fans, 2 needed); two commissioned before the window: N.
    const fans = await systemWithUnits(p.slug, { name: "Supply fans", kind: "air_movement", audience: "public", neededPerSystem: 2, serves: [hall.id] }, [
      { label: "Fan 1", stage: "L4" },
      { label: "Fan 2", stage: "L4" },
      { label: "Fan 3", stage: "installed" },
    ]);
    // Design N+2 (4 modules, 2 needed); one available before the window: short by 1.
    const ups = await systemWithUnits(p.slug, { name: "Lenders' UPS", kind: "ups", audience: "investor", neededPerSystem: 2, serves: [hall.id] }, [
      { label: "Module A", stage: "L5" },
      { label: "Module B", stage: "L2" },
      { label: "Module C", stage: "ordered" },
      { label: "Module D", stage: "ordered" },
    ]);
    const chillers = await systemWithUnits(p.slug, { name: "Site office chillers", kind: "cooling", audience: "internal", neededPerSystem: 1, serves: [hall.id] }, [{ label: "Chiller 9", stage: "delivered" }]);
    const publicEmail = await digestSubscriber(t, p.id, "public", "facility");
    const investorEmail = await digestSubscriber(t, p.id, "investor", "facility");

    await w.stage(fans.units[2]!, { stage: "L4", on: today() });
    await w.stage(ups.units[1]!, { stage: "L4", on: today() });
    await w.stage(chillers.units[0]!, { stage: "L5", on: today() });
    const before = await lastMailId(t);
    const run = await thisWeeksDigests(p.slug);

    // Only facility moves, and the digest still goes: they are news.
    const [forPublic] = await digestsTo(t, publicEmail, before);
    expect(forPublic, "a public digest was sent").toBeDefined();
    expect(forPublic!.text).toContain("Facility changes\n- Supply fans now N+1, its design level (was N)\n- Supply fans: Fan 3 commissioned\n");
    expect(forPublic!.text).toContain(INDICATIVE_CAUTION);
    expect(forPublic!.html).toContain("<strong>Supply fans</strong> now N+1, its design level (was N)");
    expect(forPublic!.html).toContain("These figures are indicative");
    for (const hidden of ["UPS", "Module B", "Site office chillers", "Chiller 9"]) {
      expect(forPublic!.text).not.toContain(hidden);
      expect(forPublic!.html).not.toContain(hidden);
    }

    const [forInvestor] = await digestsTo(t, investorEmail, before);
    expect(forInvestor!.text).toContain("- Supply fans now N+1, its design level (was N)");
    // Not yet at design: the label says what it was and what it is designed for.
    expect(forInvestor!.text).toContain("- Lenders' UPS now N (was short by 1; design N+2)\n- Lenders' UPS: Module B commissioned\n");
    expect(forInvestor!.text).not.toContain("Chiller 9");
    expect(forInvestor!.text).not.toContain("Site office chillers");

    // The web copy behind "view in the browser" shows the same moves and the caution.
    const web = forPublic!.text.match(/https:\/\/progress\.kestrel\.example(\/api\/digests\/web\/[A-Za-z0-9_.-]+)/)![1]!;
    const page = await (await newClient(t)).agent.get(web).expect(200);
    expect(page.text).toContain("<strong>Supply fans</strong> now N+1, its design level (was N)");
    expect(page.text).toContain("These figures are indicative");
    expect(page.text).not.toContain("Module B");

    // One content per audience; both sent.
    expect(await t.db("digest_deliveries").where({ run_id: run.id, status: "sent" }).count({ n: "*" }).first()).toEqual({ n: 2 });
  });

  it("a block's forecast ready date that moved in the window is reported with its days, and a block that became ready says so, to the readers who may see the block", async () => {
    const p = await makeProject(t);
    const w = facilityWriter(as.lead);
    // The milestones were on the record before the window: their forecast moves in it.
    const [phaseId] = await t.db("phases").insert({ project_id: p.id, name: "Commissioning", sort_order: 1 });
    const milestone = async (name: string, audience: string) => {
      const [id] = await t.db("milestones").insert({ project_id: p.id, phase_id: phaseId, name, system: "cooling", weight: 1, baseline_finish: "2027-03-01", forecast_finish: "2027-03-01", audience, created_at: new Date(Date.now() - 21 * DAY) });
      return Number(id);
    };
    const hallReady = await milestone("Hall 2B integrated systems test", "public");
    const vaultReady = await milestone("Strongroom suite handed over", "investor");
    const suiteReady = await milestone("HD-1 integrated systems test", "public");
    await w.block(p.slug, { name: "Hall 2B", audience: "public", dependsOn: [hallReady] });
    // No plant serves HD-1 here: its milestone completing in the window makes it ready for service.
    await w.block(p.slug, { name: "HD-1", audience: "public", dependsOn: [suiteReady] });
    await w.block(p.slug, { name: "Strongroom suite", audience: "investor", dependsOn: [vaultReady] });
    const publicEmail = await digestSubscriber(t, p.id, "public", "forecast");
    const investorEmail = await digestSubscriber(t, p.id, "investor", "forecast");
    for (const [id, change] of [
      [hallReady, { forecastFinish: "2027-03-10" }],
      [vaultReady, { forecastFinish: "2027-02-22" }],
      [suiteReady, { actualFinish: today(), percentComplete: 100 }],
    ] as const) {
      const { version } = await t.db("milestones").where({ id }).first("version");
      const res = await as.lead.agent.patch(`/api/milestones/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: Number(version), ...change });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
    }
    const before = await lastMailId(t);
    await thisWeeksDigests(p.slug);

    const [forPublic] = await digestsTo(t, publicEmail, before);
    expect(forPublic!.text).toContain("- Hall 2B: ready for service later by 9 days (1 March 2027 → 10 March 2027)");
    // Ready: the day it became so, and no "earlier by …" line for its forecast beside it.
    const readyOn = DateTime.fromISO(today()).toFormat("d LLLL yyyy");
    expect(forPublic!.text).toContain(`- HD-1: ready for service from ${readyOn}\n`);
    expect(forPublic!.text).not.toMatch(/- HD-1: ready for service (earlier|later)/);
    expect(forPublic!.text).not.toContain("Strongroom suite");
    // Dates alone are programme dates, not engineering figures: no caution.
    expect(forPublic!.text).not.toContain(INDICATIVE_CAUTION);
    const [forInvestor] = await digestsTo(t, investorEmail, before);
    expect(forInvestor!.text).toContain("- Hall 2B: ready for service later by 9 days");
    expect(forInvestor!.text).toContain("- Strongroom suite: ready for service earlier by 7 days (1 March 2027 → 22 February 2027)");
  });

  it("says nothing of what happened on site before the window: a unit commissioned last week sends no digest this week", async () => {
    // Recorded now, but reached on site before the window began.
    const p = await hallWithOneFanCommissioned(beforeTheWindow());
    const publicEmail = await digestSubscriber(t, p.id, "public", "earlier");
    const before = await lastMailId(t);
    const run = await thisWeeksDigests(p.slug);
    expect(await digestsTo(t, publicEmail, before)).toEqual([]);
    expect(await t.db("digest_deliveries").where({ run_id: run.id }).first("status", "error")).toEqual({ status: "skipped", error: "nothing to say" });
  });

  it("asks the facility for each day's figures once per audience in a run, however many readers share the window", async () => {
    const p = await hallWithOneFanCommissioned(today());
    for (let i = 0; i < 12; i += 1) await digestSubscriber(t, p.id, i % 3 ? "public" : "investor", `shared-${i}`);
    // Topic-filtered readers have their own content but the same window: still no more questions.
    await t.db("subscribers").where({ project_id: p.id }).andWhere("email", "like", "shared-1%").update({ topics: JSON.stringify({ areas: ["Hall 2B"], systems: ["cooling"] }), topics_key: "k-cooling" });
    const asked: string[] = [];
    const figuresAt = t.plumbline.facility.figuresAt;
    t.plumbline.facility.figuresAt = (projectId, date, viewer) => {
      if (projectId === p.id) asked.push(`${viewer} ${date}`);
      return figuresAt(projectId, date, viewer);
    };
    try {
      const run = await thisWeeksDigests(p.slug);
      expect(await t.db("digest_deliveries").where({ run_id: run.id, status: "sent" }).count({ n: "*" }).first()).toEqual({ n: 12 });
    } finally {
      t.plumbline.facility.figuresAt = figuresAt;
    }
    // Two days (the eve of the window and its last day) for each of the two audiences.
    expect(asked).toHaveLength(4);
    expect(new Set(asked).size).toBe(4);
  });

  it("follows a reader's topics: a reader of power and Hall 2B hears nothing of Hall 2A's fans", async () => {
    const p = await hallWithOneFanCommissioned(today());
    const all = await digestSubscriber(t, p.id, "public", "all-topics");
    const power = await digestSubscriber(t, p.id, "public", "power-only");
    const cooling = await digestSubscriber(t, p.id, "public", "cooling-only");
    await t.db("subscribers").where({ email: power }).update({ topics: JSON.stringify({ areas: ["Hall 2B"], systems: ["power"] }), topics_key: "k-power" });
    await t.db("subscribers").where({ email: cooling }).update({ topics: JSON.stringify({ areas: [], systems: ["cooling"] }), topics_key: "k-cooling" });
    const before = await lastMailId(t);
    await thisWeeksDigests(p.slug);
    expect((await digestsTo(t, all, before))[0]!.text).toContain("- Supply fans: Fan 1");
    expect((await digestsTo(t, cooling, before))[0]!.text).toContain("- Supply fans: Fan 1");
    expect(await digestsTo(t, power, before)).toEqual([]);
  });
});
