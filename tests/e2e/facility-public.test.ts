import { gzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { EnquiryRow } from "../../src/shared/schemas/enquiries.ts";
import type { FacilityAnswer } from "../../src/shared/schemas/facility.ts";
import { DEMO, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

let t: TestApp;
const browsers = browserPool();
beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
});
afterAll(async () => {
  await browsers.closeAll();
  await t.db("rate_limit_hits").where("key", "like", "enquiry-%").delete();
  await t?.close();
});

/** "2027-05-14" → "14 May 2027", as the page writes dates. */
function longDate(day: string): string {
  const [y, m, d] = day.split("-").map(Number) as [number, number, number];
  return new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(new Date(Date.UTC(y, m - 1, d)));
}

const grouped = (n: number) => new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1 }).format(n);

/** What a visitor is told by the API: the page must say the same. */
async function publicFacility(): Promise<FacilityAnswer> {
  const visitor = await newClient(t);
  return (await visitor.agent.get(`/api/projects/${SLUG}/facility`).expect(200)).body as FacilityAnswer;
}

describe("a prospect on the public facility page", () => {
  it("at 375 px sees each block's racks, kW, density and ready date and each system's labels, and asks about a block with it filled in", async () => {
    const facility = await publicFacility();
    expect(facility.blocks.length).toBeGreaterThan(0);
    expect(facility.systems.length).toBeGreaterThan(0);

    for (const width of [1280, 375]) {
      const page = await (await browsers.launch(width)).context.newPage();
      const errors = watchErrors(page);
      const scripts: Array<{ url: string; gzip: number; text: string }> = [];
      page.on("response", async (res) => {
        if (res.request().resourceType() !== "script") return;
        const body = await res.body();
        scripts.push({ url: res.url(), gzip: gzipSync(body).length, text: body.toString("utf8") });
      });
      await page.goto(`${t.baseUrl}/projects/${SLUG}/facility`);
      await page.getByRole("heading", { level: 1, name: "Capacity and readiness" }).waitFor();
      if (width === 1280) {
        // The page draws no chart: recharts stays out, and a first visit stays within the public budget.
        await page.waitForLoadState("networkidle");
        expect(scripts.some((x) => /recharts|LineChart/.test(x.url) || x.text.includes("recharts-surface"))).toBe(false);
        expect(scripts.reduce((sum, x) => sum + x.gzip, 0)).toBeLessThanOrEqual(150 * 1024);
      }
      for (const b of facility.blocks) {
        const card = page.locator(`[data-testid="block-card"][data-block-id="${b.id}"]`);
        const text = (await card.textContent()) ?? "";
        expect(text).toContain(b.name);
        expect(text).toContain(`Racks${grouped(b.racks)}`);
        expect(text).toContain(`IT load${grouped(b.itKw)}kW`);
        expect(text).toContain(`Up to${grouped(b.maxKwPerRack)}kW/rack`);
        const ready = (await card.getByTestId("block-ready").textContent()) ?? "";
        if (b.readyForService) expect(ready).toMatch(/^Ready for service/);
        else if (b.forecastReadyDate) expect(ready).toContain(`forecast ${longDate(b.forecastReadyDate)}`);
        if (!b.readyForService && b.baselineReadyDate && b.forecastReadyDate && b.baselineReadyDate !== b.forecastReadyDate) expect(ready).toContain(`planned ${longDate(b.baselineReadyDate)}`);
      }
      for (const s of facility.systems) {
        const card = page.locator(`[data-testid="system-card"][data-system-id="${s.id}"]`);
        expect(await card.getByTestId("redundancy-words").textContent()).toContain(`design ${s.redundancy.design} · now ${s.redundancy.now}`);
        expect(await card.getByTestId("unit-shape").count()).toBe(s.units.length);
      }
      await page.getByTestId("indicative-caution").waitFor();
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, width === 375 ? "facility-public-375" : "facility-public");
      expect(errors).toEqual([]);
      if (width === 1280) await page.close();
      else {
        // The prospect asks about the first block: the form comes with it filled in.
        const b = facility.blocks[0]!;
        const email = `prospect-${Date.now().toString(36)}@example.org`;
        await page.getByRole("link", { name: `Ask about this block: ${b.name}` }).click();
        await page.waitForURL(new RegExp(`/projects/${SLUG}/enquire\\?block=${b.id}$`));
        await page.getByTestId("enquiry-about").waitFor();
        expect(await page.getByTestId("enquiry-about").textContent()).toContain(`Asking about ${b.name}`);
        expect(await page.getByLabel("Racks", { exact: true }).inputValue()).toBe(String(b.racks));
        expect(await page.getByLabel("kW per rack", { exact: true }).inputValue()).toBe(String(b.maxKwPerRack));
        await page.getByLabel("Date needed").fill("2027-09-01");
        await page.getByLabel("Your name").fill("Rosalind Achterberg");
        await page.getByLabel("E-mail address").fill(email);
        await page.getByLabel("Anything else (optional)").fill("Two rows, side by side if possible.");
        await screenshot(page, "facility-enquiry-375");
        await page.getByRole("button", { name: "Send the enquiry" }).click();
        await page.getByTestId("enquiry-done").waitFor();
        expect(errors).toEqual([]);

        // Marketing sees the block named at the head of the message, with its racks and density.
        const marketing = await signIn(t, DEMO.marketing);
        const list = (await marketing.agent.get(`/api/enquiries?projectSlug=${SLUG}`).expect(200)).body as EnquiryRow[];
        const stored = list.find((e) => e.email === email);
        expect(stored).toMatchObject({ kind: "capacity", racks: b.racks, kwPerRack: b.maxKwPerRack, neededBy: "2027-09-01" });
        expect(stored?.message).toBe(`About ${b.name} (${b.racks} racks, up to ${b.maxKwPerRack} kW per rack).\n\nTwo rows, side by side if possible.`);
      }
    }
  });
});

describe("the investor room", () => {
  it("shows the capacity ramp, baseline against forecast, with readiness by block and redundancy by system", async () => {
    const page = await (await browsers.launch(1280)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.investor, /\/investors$/);
    await page.goto(`${t.baseUrl}/investors/projects/${SLUG}`);
    const racks = page.getByTestId("ramp-racks");
    await racks.locator("svg.recharts-surface").waitFor();
    // Two step lines in each chart: the baseline (dashed) and the forecast (solid).
    for (const chart of [racks, page.getByTestId("ramp-kw")]) {
      const lines = chart.locator("path.recharts-line-curve");
      await expect.poll(() => lines.count()).toBe(2);
      expect(await lines.nth(0).getAttribute("stroke-dasharray")).toBe("6 4");
      expect(await lines.nth(1).getAttribute("stroke-dasharray")).toBeNull();
    }
    const investor = await signIn(t, DEMO.investor);
    const seen = (await investor.agent.get(`/api/projects/${SLUG}/facility`).expect(200)).body as FacilityAnswer;
    const last = seen.ramp[seen.ramp.length - 1]!;
    expect(await racks.textContent()).toContain(`${grouped(last.racksForecast)} racks on the forecast, ${grouped(last.racksBaseline)} on the baseline`);
    const readiness = page.getByTestId("readiness-by-block");
    for (const b of seen.blocks) expect(await readiness.textContent()).toContain(b.name);
    expect(await page.getByTestId("redundancy-by-system").getByTestId("system-units").count()).toBe(seen.systems.length);
    await page.getByTestId("capacity-ramp").scrollIntoViewIfNeeded();
    await screenshot(page, "facility-investor-ramp");
    expect(errors).toEqual([]);
  });
});
