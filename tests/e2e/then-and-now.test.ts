import { describe, expect, it } from "vitest";
import type { StoryDetail } from "../../src/shared/schemas/stories.ts";
import type { ThenAndNowPair } from "../../src/shared/schemas/writing-help.ts";
import { DEMO, signIn } from "../helpers/app.ts";
import { openAs, screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const { app, browsers } = useBrowserApp();

describe("then-and-now pairs found for the writer (decision 063)", () => {
  it("the demo offers the pair of Hall 2A from the same spot nine weeks apart, for a public story", async () => {
    const t = app();
    const marketing = await signIn(t, DEMO.marketing);
    const pairs = (await marketing.agent.get(`/api/projects/${SLUG}/then-and-now?audience=public`).expect(200)).body.pairs as ThenAndNowPair[];
    const names = await t.db("media_items").whereIn("id", pairs.flatMap((p) => [p.then.mediaId, p.now.mediaId])).pluck("original_name");
    expect(names).toEqual(expect.arrayContaining(["hall-2a-frame.jpg", "hall-2a-cladding.jpg"]));
    const hall = pairs.find((p) => p.area === "Hall 2A")!;
    expect(hall.daysApart).toBe(63);
    expect(hall.distance).toBeLessThanOrEqual(12);
  });

  it("a marketing user adds the suggested pair to a new story with one click, and it is saved as a then-and-now item", async () => {
    const t = app();
    const b = await browsers.launch(1280);
    const page = await openAs(b.context, t.baseUrl, DEMO.marketing);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/stories/new?project=${SLUG}`);
    await page.getByRole("heading", { name: "Then and now", level: 2, exact: true }).waitFor();
    const offer = page.getByTestId("then-and-now-pair").filter({ hasText: "Hall 2A" }).first();
    await offer.waitFor();
    await expect.poll(() => offer.getByText(/Taken /).count()).toBe(2);
    const title = `Hall 2A from the site road ${Date.now().toString(36)}`;
    await page.getByLabel("Title").fill(title);
    await offer.getByRole("button", { name: "Add this pair" }).click();

    // The item is in the story, both photos in place, and the pair is no longer offered.
    const items = page.locator("section[aria-labelledby='items-h']");
    await items.getByText("Then and now: Hall 2A").first().waitFor();
    await expect.poll(() => page.getByTestId("then-and-now-pair").filter({ hasText: "Hall 2A" }).count()).toBe(0);
    await screenshot(page, "then-and-now-pair-added");

    await page.getByRole("button", { name: "Save draft" }).click();
    await page.waitForURL(/\/office\/stories\/\d+/);
    const id = Number(/\/office\/stories\/(\d+)/.exec(page.url())![1]);
    const story = (await (await signIn(t, DEMO.marketing)).agent.get(`/api/stories/${id}`).expect(200)).body as StoryDetail;
    const pair = story.items.find((i) => i.kind === "pair");
    expect(pair).toMatchObject({ kind: "pair", area: "Hall 2A" });
    const names = await t.db("media_items").whereIn("id", pair?.kind === "pair" ? [pair.beforeMediaId, pair.afterMediaId] : []).orderBy("taken_at").pluck("original_name");
    expect(names).toEqual(["hall-2a-frame.jpg", "hall-2a-cladding.jpg"]);
    expect(errors).toEqual([]);
  });

  it("the media library lists the same pairs side by side with both dates", async () => {
    const t = app();
    const b = await browsers.launch(1280);
    const page = await openAs(b.context, t.baseUrl, DEMO.lead);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/media?project=${SLUG}`);
    await page.getByText("Pairs found for you").click();
    const offer = page.getByTestId("then-and-now-pair").filter({ hasText: "Hall 2A" }).first();
    await offer.waitFor();
    await expect.poll(() => offer.getByText(/Taken /).count()).toBe(2);
    await screenshot(page, "then-and-now-library");
    expect(errors).toEqual([]);
  });
});
