import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import type { Milestone, MilestoneEventRow, MilestoneMovesRow } from "../../src/shared/schemas/programme.ts";
import { seedDemo } from "../../server/seed/demo.seed.ts";
import { DEMO, DEMO_PASSWORD, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

const SLUG = "aldermere-phase-2";
let t: TestApp;
let lead: { agent: Agent; csrf: string };
beforeAll(async () => {
  t = await startTestApp();
  lead = await signIn(t, DEMO.lead);
});
afterAll(async () => {
  await t.close();
});

const get = async (c: { agent: Agent }, path: string) => (await c.agent.get(path).expect(200)).body;
const today = () => DateTime.now().setZone("Europe/London").toISODate()!;

describe("the demo programme (Aldermere Campus Phase 2)", () => {
  it("has about 25 milestones across the phases, some complete, some slipping, a few internal", async () => {
    const all = (await get(lead, `/api/projects/${SLUG}/milestones`)) as Milestone[];
    expect(all.length).toBeGreaterThanOrEqual(22);
    expect(all.length).toBeLessThanOrEqual(30);
    expect([...new Set(all.map((m) => m.phase))]).toEqual([
      "Enabling works",
      "Frame and envelope",
      "Plant",
      "Fit-out",
      "Security and access control",
      "Commissioning",
      "Ready for service",
    ]);
    for (const area of ["Hall 2A", "HD-1", "Hall 2B", "Plant yard", "Energy centre"]) expect(all.some((m) => m.area === area)).toBe(true);
    const count = (s: Milestone["status"]) => all.filter((m) => m.status === s).length;
    expect(count("complete")).toBeGreaterThanOrEqual(5);
    expect(count("at_risk") + count("behind")).toBeGreaterThanOrEqual(2);
    expect(all.filter((m) => m.audience === "internal").length).toBeGreaterThanOrEqual(2);
    const plant = all.filter((m) => m.phase === "Plant");
    expect(plant.every((m) => m.budget !== null && m.budget > 0)).toBe(true);
    for (const word of ["Chillers", "Generators", "fuel tank", "UPS", "integrated systems test", "Hall 2A ready for service", "HD-1 ready for service", "Hall 2B ready for service"]) {
      expect(all.some((m) => m.name.toLowerCase().includes(word.toLowerCase())), word).toBe(true);
    }
    // No actual finish lies in the future.
    expect(all.every((m) => m.actualFinish === null || m.actualFinish <= today())).toBe(true);
  });

  it("answers health with sane numbers", async () => {
    const h = await get(lead, `/api/projects/${SLUG}/health`);
    expect(h.at).toBe(today());
    expect(h.percentComplete).toBeGreaterThan(20);
    expect(h.percentComplete).toBeLessThan(90);
    expect(h.plannedPercent).toBeGreaterThan(20);
    expect(h.plannedPercent).toBeLessThan(90);
    expect(h.spi).toBeGreaterThan(0.7);
    expect(h.spi).toBeLessThan(1.1);
    expect(h.earnedSchedule.es).toBeGreaterThan(0);
    expect(h.earnedSchedule.spiT).toBeGreaterThan(0.7);
    expect(h.earnedSchedule.spiT).toBeLessThan(1.1);
    const all = (await get(lead, `/api/projects/${SLUG}/milestones`)) as Milestone[];
    const { complete, onProgramme, atRisk, behind } = h.counts;
    expect(complete + onProgramme + atRisk + behind).toBe(all.length);
    expect(h.forecastCompletion >= h.baselineCompletion).toBe(true);
    expect(h.money.bac).toBe(all.reduce((s, m) => s + (m.budget ?? 0), 0));
    expect(h.money.ac).toBeGreaterThan(0);
    expect(h.money.cpi).toBeGreaterThan(0.8);
    expect(h.money.cpi).toBeLessThan(1.2);
    expect(JSON.stringify(h)).not.toContain("NaN");
  });

  it("drives Hall 2A's ready-for-service date through generator commissioning and the integrated systems test", async () => {
    const all = (await get(lead, `/api/projects/${SLUG}/milestones`)) as Milestone[];
    const hall = all.find((m) => m.name.startsWith("Hall 2A ready for service"))!;
    expect(hall.slipDays).toBe(14);
    const chain = (await get(lead, `/api/milestones/${hall.id}/drivers`)) as Array<{ name: string }>;
    const names = chain.map((l) => l.name);
    expect(names[0]).toBe(hall.name);
    const ist = names.findIndex((n) => n.includes("integrated systems test"));
    const gen = names.findIndex((n) => n.startsWith("Generator commissioning"));
    expect(ist).toBeGreaterThan(0);
    expect(gen).toBeGreaterThan(ist);
  });

  it("has baseline v1 and a re-baseline v2 with its reason, the old snapshot kept", async () => {
    const versions = await get(lead, `/api/projects/${SLUG}/baselines`);
    expect(versions.map((v: { number: number }) => v.number)).toEqual([1, 2]);
    expect(versions[1].reason.length).toBeGreaterThan(10);
    const v1 = await get(lead, `/api/projects/${SLUG}/baselines/1`);
    const v2 = await get(lead, `/api/projects/${SLUG}/baselines/2`);
    const hall2b = (v: { milestones: Array<{ name: string; baselineFinish: string }> }) => v.milestones.find((e) => e.name.startsWith("Hall 2B ready"))!.baselineFinish;
    expect(hall2b(v2) > hall2b(v1)).toBe(true);
  });

  it("has nine months of history: one milestone slipped twice, one pulled in, several completed", async () => {
    const from = DateTime.fromISO(today()).minus({ months: 9, days: 7 }).toISODate()!;
    const moves = (await get(lead, `/api/projects/${SLUG}/moves?from=${from}&to=${today()}`)) as MilestoneMovesRow[];
    const kinds = moves.flatMap((m) => m.moves.map((x) => ({ name: m.milestoneName, ...x })));
    expect(kinds.filter((k) => k.kind === "completed").length).toBeGreaterThanOrEqual(5);
    expect(kinds.some((k) => k.kind === "earlier")).toBe(true);
    expect(kinds.some((k) => k.kind === "rebaselined" && k.notes.length > 0)).toBe(true);
    const changes = (await get(lead, `/api/projects/${SLUG}/changes?from=${from}&to=${today()}`)) as MilestoneEventRow[];
    const slips = new Map<number, number>();
    for (const e of changes) if (e.field === "forecast_finish" && e.from !== null && e.to !== null && e.to > e.from) slips.set(e.milestoneId, (slips.get(e.milestoneId) ?? 0) + 1);
    expect([...slips.values()].some((n) => n >= 2)).toBe(true);
    const oldest = changes.at(-1)!.at;
    expect(Date.parse(oldest)).toBeLessThan(DateTime.now().minus({ months: 8 }).toMillis());
  });

  it("keeps its history consistent: each event starts where the previous one of that field ended, and the last ends at the stored value", async () => {
    const rows = await t.db("milestone_events as e").join("projects as p", "p.id", "e.project_id").where("p.slug", SLUG).orderBy([{ column: "e.at" }, { column: "e.id" }]).select("e.*");
    const stored = new Map((await t.db("milestones as m").join("projects as p", "p.id", "m.project_id").where("p.slug", SLUG).select("m.*")).map((m) => [Number(m.id), m]));
    const last = new Map<string, string | null>();
    for (const e of rows) {
      const key = `${e.milestone_id}:${e.field}`;
      if (last.has(key)) expect(e.from_value, key).toBe(last.get(key));
      last.set(key, e.to_value);
    }
    for (const [key, value] of last) {
      const [id, field] = key.split(":") as [string, string];
      const current = stored.get(Number(id))![field];
      expect(value, key).toBe(current === null ? null : String(current));
    }
  });

  it("draws an S-curve whose earned line never falls and meets today's health", async () => {
    const curve = await get(lead, `/api/projects/${SLUG}/curve`);
    const health = await get(lead, `/api/projects/${SLUG}/health`);
    const earned = curve.points.filter((p: { earnedPercent: number | null }) => p.earnedPercent !== null).map((p: { earnedPercent: number }) => p.earnedPercent);
    expect(earned.length).toBeGreaterThan(30);
    for (let i = 1; i < earned.length; i += 1) expect(earned[i]).toBeGreaterThanOrEqual(earned[i - 1]);
    expect(curve.points.find((p: { date: string }) => p.date === curve.at).earnedPercent).toBeCloseTo(health.percentComplete, 10);
    expect(curve.points.at(-1).plannedPercent).toBeCloseTo(100, 10);
  });

  it("gives staff, an investor and a visitor the same headline figures, over the whole programme", async () => {
    const visitor = await newClient(t);
    const investor = await signIn(t, DEMO.investor);
    const all = (await get(lead, `/api/projects/${SLUG}/milestones`)) as Milestone[];
    const internal = all.filter((m) => m.audience === "internal");
    expect(internal.length).toBeGreaterThanOrEqual(2);
    const seen = { staff: await get(lead, `/api/projects/${SLUG}/health`), investor: await get(investor, `/api/projects/${SLUG}/health`), visitor: await get(visitor, `/api/projects/${SLUG}/health`) };
    for (const who of ["investor", "visitor"] as const) {
      expect(seen[who].percentComplete, who).toBe(seen.staff.percentComplete);
      expect(seen[who].spi, who).toBe(seen.staff.spi);
      expect(seen[who].earnedSchedule.spiT, who).toBe(seen.staff.earnedSchedule.spiT);
      expect(seen[who].forecastCompletion, who).toBe(seen.staff.forecastCompletion);
      // The internal milestones count in the figures but are never named, in the lines or the driving chain.
      const text = JSON.stringify(seen[who]);
      for (const m of internal) expect(text, `${who} sees ${m.name}`).not.toContain(m.name);
      expect(seen[who].milestones.map((m: { id: number }) => m.id)).not.toContain(internal[0]!.id);
    }
    // Visitors get no money; what they list is the public milestones, without budgets.
    const list = (await get(visitor, `/api/projects/${SLUG}/milestones`)) as Milestone[];
    expect(list.every((m) => m.audience === "public" && m.budget === null)).toBe(true);
    expect(seen.visitor.money).toBeNull();
    expect(seen.visitor.milestones.length).toBe(list.length);
    // The figure is the whole programme's: recomputed here from every milestone by weight.
    const weighted = all.reduce((sum, m) => sum + m.weight * (m.actualFinish !== null ? 100 : m.percentComplete), 0) / all.reduce((sum, m) => sum + m.weight, 0);
    expect(seen.visitor.percentComplete).toBeCloseTo(weighted, 6);
  });

  it("is seeded once: seeding again changes nothing", async () => {
    const count = async () => Number((await t.db("milestones as m").join("projects as p", "p.id", "m.project_id").where("p.slug", SLUG).count({ n: "*" }))[0]!.n);
    const events = async () => Number((await t.db("milestone_events as e").join("projects as p", "p.id", "e.project_id").where("p.slug", SLUG).count({ n: "*" }))[0]!.n);
    const before = { milestones: await count(), events: await events() };
    const result = await seedDemo(t.db, { password: DEMO_PASSWORD });
    expect(result.created).toEqual([]);
    expect({ milestones: await count(), events: await events() }).toEqual(before);
  });
});
