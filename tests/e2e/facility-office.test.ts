import AxeBuilder from "@axe-core/playwright";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { FacilityAnswer, SystemAnswer, UnitAnswer, UnitStage } from "../../src/shared/schemas/facility.ts";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import type { Project } from "../../src/shared/schemas/projects.ts";
import { stageRank } from "../../src/shared/domain/facility-record.ts";
import { previewStage, type StagePreview } from "../../src/features/facility/preview.ts";
import { DEMO, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

let t: TestApp;
const browsers = browserPool();
let lead: Awaited<ReturnType<typeof signIn>>;
let fans: SystemAnswer;
let fan: UnitAnswer;
let target: UnitStage;
let expected: StagePreview;

async function read<T>(path: string, as = lead): Promise<T> {
  return (await as.agent.get(path).expect(200)).body as T;
}

/**
 * The air-movement system the walk commissions a fan of: the demo's public supply fans, or,
 * when the demo has none, a public system of our own made here through the API.
 */
async function supplyFans(facility: FacilityAnswer): Promise<SystemAnswer> {
  const seeded = facility.systems.find((s) => s.kind === "air_movement" && s.audience === "public" && s.units.some((u) => !u.available));
  if (seeded) return seeded;
  const block = facility.blocks.find((b) => b.audience === "public");
  const created = await lead.agent
    .post(`/api/projects/${SLUG}/facility/systems`)
    .set("X-CSRF-Token", lead.csrf)
    .send({ name: "Browser test supply fans", kind: "air_movement", audience: "public", serves: block ? [block.id] : [], neededPerSystem: 2, design: { airflowM3s: 12, deltaTK: 12 } })
    .expect(201);
  const id = (created.body as SystemAnswer).id;
  for (const [label, stage] of [["Test fan 1", `L${facility.availableFromLevel}`], ["Test fan 2", "installed"]] as const) {
    await lead.agent.post(`/api/facility/systems/${id}/units`).set("X-CSRF-Token", lead.csrf).send({ label, stage }).expect(201);
  }
  const again = await read<FacilityAnswer>(`/api/projects/${SLUG}/facility`);
  return again.systems.find((s) => s.id === id)!;
}

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  lead = await signIn(t, DEMO.lead);
  const facility = await read<FacilityAnswer>(`/api/projects/${SLUG}/facility`);
  fans = await supplyFans(facility);
  // The fan furthest along that does not yet carry load: the one a commissioning engineer signs off next.
  fan = fans.units.filter((u) => !u.available).sort((a, b) => stageRank(b.stage) - stageRank(a.stage))[0]!;
  const now = await read<FacilityAnswer>(`/api/projects/${SLUG}/facility`);
  target = `L${now.availableFromLevel}` as UnitStage;
  const milestones = await read<Milestone[]>(`/api/projects/${SLUG}/milestones`);
  const project = await read<Project>(`/api/projects/${SLUG}`);
  // What the page must show before saving, worked out by the same pure function over what the lead can see.
  expected = previewStage(now, milestones, { weekendDays: project.settings.weekendDays, holidays: project.settings.holidays }, fan.id, target)!;
});
afterAll(async () => {
  await browsers.closeAll();
  await t?.close();
});

const axeViolations = async (page: Page) => (await new AxeBuilder({ page }).analyze()).violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
const sidewaysScroll = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

describe("the facility in the site office", () => {
  it("the lead sees blocks, systems with their units as shapes, and site features at 1280 px", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.getByRole("link", { name: "Facility", exact: true }).click();
    await page.waitForURL(/\/office\/facility$/);
    await page.getByRole("table", { name: "Plant systems" }).waitFor();
    const row = page.locator(`tr[data-system-id="${fans.id}"]`);
    expect(await row.getByTestId(`redundancy-${fans.id}`).textContent()).toContain(`now ${fans.redundancy.now}`);
    // Each unit is drawn as a shape named with its stage; for the lead it opens the unit.
    expect(await row.getByRole("button", { name: new RegExp(`^Edit ${fan.label}: `) }).count()).toBe(1);
    expect(await page.getByRole("table", { name: "Capacity blocks" }).locator("tbody tr").count()).toBeGreaterThan(0);
    await page.getByTestId("facility-caution").waitFor();
    expect(await sidewaysScroll(page)).toBeLessThanOrEqual(0);
    await page.mouse.move(0, 0);
    await screenshot(page, "facility-office");
    expect(await axeViolations(page)).toEqual([]);
    expect(errors).toEqual([]);
    await page.close();
  });

  it("marketing reads the same page with no edit controls", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.marketing, /\/office$/);
    await page.goto(`${t.baseUrl}/office/facility`);
    await page.getByRole("table", { name: "Plant systems" }).waitFor();
    await page.getByText("Read-only for your role").waitFor();
    expect(await page.locator(`tr[data-system-id="${fans.id}"]`).getByRole("img", { name: new RegExp(`^${fan.label}: `) }).count()).toBe(1);
    expect(await page.getByRole("button", { name: /^(New block|New system|Edit|\+ Unit|\+ Add)/ }).count()).toBe(0);
    expect(await page.getByRole("link", { name: "Start a plant walk" }).count()).toBe(0);
    expect(errors).toEqual([]);
    await page.close();
  });

  it(`the lead commissions a fan to the project's level in two taps at 360 px, seeing the new label before saving`, async () => {
    expect(expected.after.now).not.toBe(expected.before.now);
    const page = await (await browsers.launch(360, 740)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.goto(`${t.baseUrl}/office/facility/walk?project=${SLUG}`);
    await page.getByLabel("Walk through").selectOption(String(fans.id));
    const form = page.getByRole("form", { name: `Stage of ${fan.label}` });
    // Step through the system's units to the fan (the walk keeps the system's order).
    for (let i = 0; i < fans.units.findIndex((u) => u.id === fan.id); i += 1) await page.getByRole("button", { name: "Skip →" }).click();
    await form.waitFor();

    // Tap one: the stage. The effect shows before anything is saved.
    await form.getByRole("button", { name: new RegExp(`^${target}, `) }).click();
    const label = form.getByTestId("preview-label");
    await label.waitFor();
    expect(await label.textContent()).toContain(`now ${expected.before.now}→becomes${expected.after.now} · design ${expected.after.design}`);
    for (const b of expected.blocks) {
      expect(await form.locator(`[data-testid="preview-block"][data-block-id="${b.id}"]`).textContent()).toContain(b.after.ready ? "becomes●Ready for service" : "becomes○Not ready");
    }
    const save = form.getByRole("button", { name: `Save ${target} and next` });
    expect((await save.boundingBox())?.height ?? 0).toBeGreaterThanOrEqual(44);
    expect(await sidewaysScroll(page)).toBeLessThanOrEqual(0);
    await page.mouse.move(0, 0);
    await screenshot(page, "facility-walk-phone");
    expect(await axeViolations(page)).toEqual([]);

    // Tap two: save. The walk moves on to the next unit.
    await save.click();
    await page.getByText(`${fan.label} now ${target}`).waitFor();
    await expect.poll(() => form.count()).toBe(0);
    expect(errors).toEqual([]);
    await page.close();

    // The unit's history records the move, by the lead, dated.
    const events = await read<Array<{ field: string; from: string; to: string; by: string | null }>>(`/api/facility/units/${fan.id}/events`);
    expect(events[0]).toMatchObject({ field: "stage", from: fan.stage, to: target });
  });

  it("a visitor then sees the air movement's new label on the public facility page", async () => {
    const visitor = await newClient(t);
    const answer = (await visitor.agent.get(`/api/projects/${SLUG}/facility`).expect(200)).body as FacilityAnswer;
    expect(answer.systems.find((s) => s.id === fans.id)?.redundancy.now).toBe(expected.after.now);

    const page = await (await browsers.launch(360, 740)).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/projects/${SLUG}/facility`);
    const card = page.locator(`[data-testid="system-card"][data-system-id="${fans.id}"]`);
    await card.waitFor();
    expect(await card.getByTestId("redundancy-words").textContent()).toContain(`now ${expected.after.now}`);
    expect(errors).toEqual([]);
    await page.close();
  });
});
