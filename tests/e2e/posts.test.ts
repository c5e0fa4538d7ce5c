import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { MediaItem, MediaListResponse } from "../../src/shared/schemas/media.ts";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, openAs, type Browser, screenshot, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

let t: TestApp;
const browsers = browserPool();
/** Photos whose review state this file changes, with the state to put back afterwards. */
const restoreSensitivity: Array<{ id: number; sensitivity: MediaItem["sensitivity"]; altText: string | null }> = [];
/** The title of the update this file writes and publishes. */
let ourTitle = "";

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
});
afterAll(async () => {
  if (t && restoreSensitivity.length) {
    const lead = await signIn(t, DEMO.lead);
    // The update published here shows a photo this file cleared: withdraw it before the photo goes
    // back to its review state, so no published page is left showing a photo visitors may not load.
    const ours = (await t.db("posts").where({ title: ourTitle, status: "published" }).pluck("id")) as number[];
    for (const id of ours) await lead.agent.post(`/api/posts/${id}/withdraw`).set("X-CSRF-Token", lead.csrf).send({}).expect(200);
    for (const r of restoreSensitivity) await lead.agent.patch(`/api/media/${r.id}`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: r.sensitivity, altText: r.altText ?? "" });
  }
  await browsers.closeAll();
  await t?.close();
});

const browserFor = (width = 1280): Promise<Browser> => browsers.launch(width);

const signedInPage = (b: Browser, email: string): Promise<Page> => openAs(b.context, t.baseUrl, email);

/** The demo library as the API lists it: ready photos with AVIF and WebP derivatives. */
async function demoPhotos(): Promise<MediaItem[]> {
  const lead = await signIn(t, DEMO.lead);
  const res = await lead.agent.get(`/api/media?project=${SLUG}&status=ready&pageSize=100`).expect(200);
  const items = (res.body as MediaListResponse).items;
  return items.filter((i) => i.variants.some((v) => v.format === "avif") && i.variants.some((v) => v.format === "webp"));
}

async function publicMilestone(): Promise<Milestone> {
  const lead = await signIn(t, DEMO.lead);
  const list = (await lead.agent.get(`/api/projects/${SLUG}/milestones?audience=public`).expect(200)).body as Milestone[];
  const open = list.find((m) => m.actualFinish === null) ?? list[0];
  if (!open) throw new Error("the demo programme has no public milestone");
  return open;
}

/** Chooses a photo in the library picker, paging on until it shows. */
async function chooseInPicker(page: Page, mediaId: number) {
  const dialog = page.getByRole("dialog");
  const choice = dialog.locator(`[data-testid="photo-choice"][data-media-id="${mediaId}"]`);
  for (let i = 0; i < 10 && !(await choice.isVisible()); i++) {
    await dialog.locator('[data-testid="photo-choice"]').first().waitFor();
    if (await choice.isVisible()) break;
    await dialog.getByRole("button", { name: "Next →" }).click();
  }
  await choice.click();
  await dialog.waitFor({ state: "detached" });
}

/** The errors, less the browser's own line for an answer the test expects (a refusal the page shows). */
function errorsExcept(errors: string[], expectedStatus: number): string[] {
  return errors.filter((e) => !e.includes(`Failed to load resource: the server responded with a status of ${expectedStatus}`));
}

describe("an update from the editor to the public page", () => {
  let postId = 0;
  let title = "";
  let photoA: MediaItem;
  let photoB: MediaItem;
  let milestone: Milestone;

  it("marketing writes an update with two inline photos and a milestone block, and submits it for review", async () => {
    const photos = await demoPhotos();
    const a = photos.find((p) => p.sensitivity === "cleared" && p.altText?.trim());
    // The second photo is one a lead has not cleared yet, so publishing has something to refuse.
    let b = photos.find((p) => p.id !== a?.id && p.sensitivity === "unreviewed");
    if (!b) {
      b = photos.find((p) => p.id !== a?.id && p.sensitivity === "cleared");
      if (b) {
        const lead = await signIn(t, DEMO.lead);
        await lead.agent.patch(`/api/media/${b.id}`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "unreviewed" }).expect(200);
      }
    }
    expect(a, "a cleared demo photo with alt text").toBeDefined();
    expect(b, "a second demo photo").toBeDefined();
    photoA = a!;
    photoB = b!;
    restoreSensitivity.push({ id: photoB.id, sensitivity: photoB.sensitivity, altText: photoB.altText });
    milestone = await publicMilestone();
    title = `Chiller row progress ${Date.now().toString(36)}`;
    ourTitle = title;

    const page = await signedInPage(await browserFor(), DEMO.marketing);
    const errors = watchErrors(page);
    await page.getByRole("link", { name: "Updates", exact: true }).click();
    await page.getByRole("heading", { name: "Updates", level: 1 }).waitFor();
    await page.getByRole("link", { name: "New update" }).click();
    // The editor is its own chunk: wait for it before typing.
    await page.getByRole("heading", { name: "New update", level: 1 }).waitFor();
    await page.getByLabel("Title", { exact: true }).fill(title);
    await page.getByLabel("Summary").fill("Two chillers set this week; the rest follow the crane.");

    const body = page.getByRole("textbox", { name: "Body of the update" });
    await body.click();
    await page.keyboard.type("The chiller row is taking shape in the plant yard.");
    await page.keyboard.press("Enter");
    await page.getByRole("button", { name: "Insert a photo from the library" }).click();
    await chooseInPicker(page, photoA.id);
    await body.press("ControlOrMeta+End");
    await page.keyboard.type("Where the programme stands:");
    await page.getByRole("button", { name: "Insert a milestone block" }).click();
    await page.getByRole("dialog").getByTestId("milestone-choice").filter({ hasText: milestone.name }).first().click();
    await body.press("ControlOrMeta+End");
    await page.keyboard.type("And the yard from the gatehouse.");
    await page.getByRole("button", { name: "Insert a photo from the library" }).click();
    await chooseInPicker(page, photoB.id);

    await expect.poll(() => page.getByTestId("editor-image").count()).toBe(2);
    await page.getByTestId("editor-image").first().getByLabel("Caption").fill("Chillers on their plinths.");
    const block = page.getByTestId("editor-milestone");
    await expect.poll(() => block.textContent()).toContain(milestone.name);
    // The block shows the milestone's status by word (the shape is beside it).
    expect(await block.locator("[data-status]").getAttribute("data-status")).toBe(milestone.status);

    await page.getByRole("button", { name: "Choose a cover…" }).click();
    await chooseInPicker(page, photoA.id);
    await page.getByRole("button", { name: "Link a milestone…" }).click();
    await page.getByRole("dialog").getByTestId("milestone-choice").filter({ hasText: milestone.name }).first().click();
    await page.getByRole("button", { name: "Cooling", exact: true }).click();

    await page.getByRole("button", { name: "Save draft" }).click();
    await page.waitForURL(/\/office\/updates\/\d+/);
    postId = Number(/\/office\/updates\/(\d+)/.exec(page.url())![1]);
    await page.getByText("All changes saved").waitFor();
    await screenshot(page, "posts-editor-marketing");

    // A second save keeps a second revision; the two compare word by word, and the first can be restored.
    await body.press("ControlOrMeta+End");
    await page.keyboard.press("Enter");
    await page.keyboard.type("A sentence added later.");
    await page.getByText("Unsaved changes").waitFor();
    await page.getByRole("button", { name: "Save", exact: true }).click();
    await page.getByText("All changes saved").waitFor();
    const revisions = page.getByTestId("revisions");
    await revisions.getByText("Revision 2").waitFor();
    await revisions.getByRole("button", { name: "Compare with 1" }).click();
    const diff = page.getByTestId("revision-diff");
    await diff.waitFor();
    expect(await diff.locator("ins").allTextContents()).toEqual(expect.arrayContaining([expect.stringContaining("added later")]));
    await screenshot(page, "posts-revision-diff");
    await page.getByRole("dialog").getByRole("button", { name: /^Close/ }).click();
    await revisions.getByRole("button", { name: "Restore" }).click();
    await page.getByRole("dialog").getByRole("button", { name: "Restore it" }).click();
    await revisions.getByText("Revision 3").waitFor();
    await expect.poll(() => body.textContent()).not.toContain("added later");
    await expect.poll(() => page.getByTestId("editor-image").count()).toBe(2);

    await page.getByRole("button", { name: "Submit for review" }).click();
    await page.locator('[data-status="in_review"]').first().waitFor();
    // Marketing has no further step: the buttons for leads are not offered.
    expect(await page.getByRole("button", { name: "Publish" }).count()).toBe(0);
    expect(await page.getByRole("button", { name: "Approve" }).count()).toBe(0);

    const marketing = await signIn(t, DEMO.marketing);
    const saved = (await marketing.agent.get(`/api/posts/${postId}`).expect(200)).body as { status: string; body: { content: Array<{ type: string; attrs?: Record<string, unknown> }> }; milestoneIds: number[]; coverMediaId: number };
    expect(saved.status).toBe("in_review");
    const nodes = saved.body.content;
    expect(nodes.filter((n) => n.type === "image").map((n) => n.attrs?.mediaId)).toEqual([photoA.id, photoB.id]);
    expect(nodes.find((n) => n.type === "milestone")?.attrs?.milestoneId).toBe(milestone.id);
    expect(saved.milestoneIds).toEqual([milestone.id]);
    expect(saved.coverMediaId).toBe(photoA.id);
    expect(errors).toEqual([]);
  });

  it("the lead approves it; publishing is refused on the photo not yet cleared, which the lead clears from the refusal, and then it publishes", async () => {
    expect(postId).toBeGreaterThan(0);
    const page = await signedInPage(await browserFor(), DEMO.lead);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/updates/${postId}`);
    await page.getByRole("button", { name: "Approve" }).click();
    await page.locator('[data-status="approved"]').first().waitFor();
    await page.getByRole("button", { name: "Publish" }).click();

    const refusal = page.getByTestId("refusal-problems");
    await refusal.waitFor();
    expect(await refusal.textContent()).toContain(`photo #${photoB.id}`);
    // The photo named is highlighted where it sits in the body.
    await page.locator(`[data-testid="editor-image"][data-media-id="${photoB.id}"][data-problem]`).waitFor();
    await screenshot(page, "posts-refusal");

    await refusal.getByRole("button", { name: "Fix this photo" }).first().click();
    const dialog = page.getByRole("dialog", { name: "Fix this photo" });
    const alt = dialog.getByLabel("Alt text");
    if (!(await alt.inputValue()).trim()) {
      await alt.fill("Drawing of the plant yard seen from the gatehouse, with the chiller plinths in a row.");
      await dialog.getByRole("button", { name: "Save alt text" }).click();
      await dialog.getByText("✓ Alt text saved").or(page.getByTestId("refusal-problems")).first().waitFor();
    }
    if (await dialog.isVisible()) {
      await dialog.getByRole("button", { name: "Clear it for publication" }).click();
      await dialog.waitFor({ state: "detached" });
    }
    await page.getByRole("button", { name: "Publish" }).click();
    await page.locator('[data-status="published"]').first().waitFor();
    await page.getByRole("link", { name: "Open the published page" }).waitFor();
    // The publishing history lists each step, newest first: the writer's submission, the approval, the publication.
    const history = page.getByTestId("publishing-history");
    await history.locator('[data-action="publish"]').waitFor();
    expect(await history.locator("li").evaluateAll((items) => items.map((li) => li.getAttribute("data-action")))).toEqual(["publish", "approve", "submit"]);
    expect(await history.locator('[data-action="submit"]').textContent()).toContain("Draft → In review");
    await screenshot(page, "posts-published-lead");
    expect(errorsExcept(errors, 422)).toEqual([]);
  });

  it("a visitor opens it: responsive photos (AVIF or WebP chosen), captions, the milestone then and now, at desktop and phone width", async () => {
    for (const width of [1280, 360]) {
      const b = await browserFor(width);
      const page = await b.context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${t.baseUrl}/projects/${SLUG}/updates`);
      await page.getByRole("link", { name: title }).click();
      await page.getByRole("heading", { name: title, level: 1 }).waitFor();
      const imgs = page.locator('[data-testid="post-page"] picture img');
      expect(await imgs.count()).toBeGreaterThanOrEqual(3); // the cover and two inline photos
      for (let i = 0; i < (await imgs.count()); i++) {
        const img = imgs.nth(i);
        await img.scrollIntoViewIfNeeded();
        await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth > 0), { timeout: 10_000 }).toBe(true);
        const src = await img.evaluate((el: HTMLImageElement) => el.currentSrc);
        expect(src, `image ${i} at ${width} px`).toMatch(/\/media\/v\/[^/]+\.(avif|webp)$/);
        // The box is reserved before the bytes arrive.
        expect(Number(await img.getAttribute("width"))).toBeGreaterThan(0);
        expect(Number(await img.getAttribute("height"))).toBeGreaterThan(0);
      }
      // Inline photos load lazily; the cover, above the fold, does not.
      expect(await imgs.nth(0).getAttribute("loading")).toBe("eager");
      expect(await imgs.nth(1).getAttribute("loading")).toBe("lazy");
      await page.getByText("Chillers on their plinths.").first().waitFor();
      // The linked milestone is shown once, where the body names it, as its then-and-now bar (decision 055).
      const then = page.getByTestId("post-milestone").filter({ hasText: milestone.name });
      await then.getByTestId("then-now-words").waitFor();
      expect(await then.count()).toBe(1);
      expect(await page.locator('[data-testid="post-body"] [data-testid="post-milestone"]').count()).toBe(1);
      expect(await page.locator('[data-testid="post-body"] aside.milestone-block').count()).toBe(0);
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, width === 360 ? "posts-public-360" : "posts-public");
      expect(errors).toEqual([]);
    }
  });

  it("finds it with the public search box", async () => {
    const page = await (await browserFor()).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/projects/${SLUG}/updates`);
    await page.getByLabel("Search updates").fill("chiller");
    await page.getByRole("button", { name: "Search" }).click();
    await page.waitForURL(/q=chiller/);
    await page.getByRole("link", { name: title }).waitFor();
    expect(errors).toEqual([]);
  });
});

describe("scheduling", () => {
  it("a lead schedules their own draft at a time on the project's clock, sees the zone named, and cancels it again", async () => {
    const photos = await demoPhotos();
    const cover = photos.find((p) => p.sensitivity === "cleared" && p.altText?.trim());
    expect(cover).toBeDefined();
    const lead = await signIn(t, DEMO.lead);
    const title = `Fuel delivery window ${Date.now().toString(36)}`;
    const made = await lead.agent
      .post(`/api/projects/${SLUG}/posts`)
      .set("X-CSRF-Token", lead.csrf)
      .send({ title, summary: "When the first fuel fill is planned.", audience: "public", coverMediaId: cover!.id, body: { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "The first fill of the bulk tank." }] }] } })
      .expect(201);

    const page = await signedInPage(await browserFor(), DEMO.lead);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/updates/${made.body.id}`);
    await page.getByRole("button", { name: "Schedule…" }).click();
    const dialog = page.getByRole("dialog", { name: "Schedule publication" });
    // The demo project keeps Europe/London time: GMT in winter, BST in summer.
    expect(await dialog.getByTestId("schedule-zone").textContent()).toMatch(/^Europe\/London \((GMT|BST)\)$/);
    const tomorrow = new Date(Date.now() + 2 * 86_400_000).toISOString().slice(0, 10);
    await dialog.getByLabel("Date").fill(tomorrow);
    await dialog.getByLabel(/^Time/).fill("07:30");
    await screenshot(page, "posts-schedule");
    await dialog.getByRole("button", { name: "Schedule" }).click();
    await page.locator('[data-status="scheduled"]').first().waitFor();
    await page.getByText(/goes out .*07:30 (GMT|BST)/).first().waitFor();
    await page.getByRole("button", { name: "Cancel the schedule" }).click();
    await page.locator('[data-status="approved"]').first().waitFor();
    expect(errors).toEqual([]);
  });
});

describe("content for investors", () => {
  it("an investor post is listed and readable for the investor, marked as such, and absent for a visitor", async () => {
    const photos = await demoPhotos();
    const cover = photos.find((p) => p.sensitivity === "cleared" && p.altText?.trim());
    expect(cover).toBeDefined();
    const lead = await signIn(t, DEMO.lead);
    const title = `Generator load bank test, for investors ${Date.now().toString(36)}`;
    const made = await lead.agent
      .post(`/api/projects/${SLUG}/posts`)
      .set("X-CSRF-Token", lead.csrf)
      .send({ title, summary: "Results of the load bank test.", audience: "investor", coverMediaId: cover!.id, body: { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "The three sets ran at full load for four hours." }] }] } })
      .expect(201);
    await lead.agent.post(`/api/posts/${made.body.id}/publish`).set("X-CSRF-Token", lead.csrf).send({}).expect(200);

    const investor = await signedInPage(await browserFor(), DEMO.investor);
    const errors = watchErrors(investor);
    await investor.goto(`${t.baseUrl}/projects/${SLUG}/updates`);
    const card = investor.getByTestId("post-card").filter({ hasText: title });
    await card.waitFor();
    // Marked by word and shape, not colour alone.
    expect(await card.locator('[data-audience="investor"]').textContent()).toContain("For investors");
    expect(await card.locator('svg[data-shape="investor"]').count()).toBe(1);
    await screenshot(investor, "posts-investor-list");
    await card.getByRole("link", { name: title }).click();
    await investor.getByRole("heading", { name: title, level: 1 }).waitFor();
    expect(errors).toEqual([]);

    const visitor = await (await browserFor()).context.newPage();
    const visitorErrors = watchErrors(visitor);
    await visitor.goto(`${t.baseUrl}/projects/${SLUG}/updates`);
    await visitor.getByRole("heading", { level: 1 }).waitFor();
    await visitor.getByTestId("post-card").first().waitFor();
    expect(await visitor.getByText(title).count()).toBe(0);
    await visitor.goto(`${t.baseUrl}/projects/${SLUG}/updates/${made.body.slug}`);
    await visitor.getByText("No such update").waitFor();
    expect(await visitor.getByText(title).count()).toBe(0);
    expect(errorsExcept(visitorErrors, 404)).toEqual([]);
  });
});
