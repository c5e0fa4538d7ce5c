import { gzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { MediaItem, MediaListResponse } from "../../src/shared/schemas/media.ts";
import { DEMO, newClient, signIn } from "../helpers/app.ts";
import { formatDate } from "../../src/lib/format.ts";
import { openAs, type Browser, screenshot, watchErrors, useBrowserApp } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

const { app, browsers } = useBrowserApp();

const browserFor = (width = 1280): Promise<Browser> => browsers.launch(width);

const signedInPage = (b: Browser, email: string): Promise<Page> => openAs(b.context, app().baseUrl, email);

const dayOf = (takenAt: string | null) => takenAt?.slice(0, 10) ?? "";

/** "2026-03-10" → "10 March 2026", as the page writes capture dates. */
function longDate(day: string): string {
  const [y, m, d] = day.split("-").map(Number) as [number, number, number];
  return new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(new Date(Date.UTC(y, m - 1, d)));
}

/** Two cleared demo photos of one area taken on different days (earlier first), and one more photo. */
async function storyPhotos(): Promise<{ area: string; before: MediaItem; after: MediaItem; single: MediaItem }> {
  const lead = await signIn(app(), DEMO.lead);
  const items = ((await lead.agent.get(`/api/media?project=${SLUG}&status=ready&sensitivity=cleared&pageSize=100`).expect(200)).body as MediaListResponse).items.filter(
    (i) => i.altText?.trim() && i.takenAt,
  );
  for (const area of new Set(items.flatMap((i) => i.tags.areas))) {
    const here = items.filter((i) => i.tags.areas.includes(area)).sort((a, b) => dayOf(a.takenAt).localeCompare(dayOf(b.takenAt)));
    const before = here[0];
    const after = here[here.length - 1];
    if (before && after && dayOf(before.takenAt) !== dayOf(after.takenAt)) {
      const single = items.find((i) => i.id !== before.id && i.id !== after.id);
      if (single) return { area, before, after, single };
    }
  }
  throw new Error("the demo library has no two cleared photos of one area taken on different days");
}

describe("a photo story with a then-and-now pair", () => {
  let storySlug = "";
  let photos: Awaited<ReturnType<typeof storyPhotos>>;

  it("marketing builds it in the site office, puts the pair first with “Move up” (the alternative to dragging), and submits it", async () => {
    photos = await storyPhotos();
    const page = await signedInPage(await browserFor(), DEMO.marketing);
    const errors = watchErrors(page);
    await page.getByRole("link", { name: "Photo stories" }).click();
    await page.getByRole("link", { name: "New photo story" }).click();
    await page.getByRole("heading", { name: "New photo story", level: 1 }).waitFor();
    const title = `${photos.area} then and now ${Date.now().toString(36)}`;
    await page.getByLabel("Title", { exact: true }).fill(title);
    await page.getByLabel("Introduction").fill(`How ${photos.area} changed between two site walks.`);

    // A single photo first, then the pair; the pair is then moved to the top.
    await page.getByRole("button", { name: "+ Photo" }).click();
    await page.getByTestId("story-item").nth(0).getByRole("button", { name: "Choose photo…" }).click();
    await page.getByRole("dialog").locator(`[data-testid="photo-choice"][data-media-id="${photos.single.id}"]`).click();
    await page.getByRole("button", { name: "+ Then and now" }).click();
    const pair = page.getByTestId("story-item").nth(1);
    await pair.getByLabel("Area both photos show").fill(photos.area);
    await pair.getByRole("button", { name: "Choose photo…" }).first().click();
    await page.getByRole("dialog").locator(`[data-testid="photo-choice"][data-media-id="${photos.before.id}"]`).click();
    await pair.getByRole("button", { name: "Choose photo…" }).click();
    await page.getByRole("dialog").locator(`[data-testid="photo-choice"][data-media-id="${photos.after.id}"]`).click();
    await pair.getByText(`Taken ${formatDate(dayOf(photos.before.takenAt))}`).waitFor();
    await pair.getByLabel("Caption").fill("From bare ground to plant in place.");
    await page.getByRole("button", { name: "Move item 2 up" }).click();
    expect(await page.getByTestId("story-item").nth(0).getAttribute("data-kind")).toBe("pair");

    await page.getByRole("button", { name: "Save draft" }).click();
    await page.waitForURL(/\/office\/stories\/\d+/);
    const id = Number(/\/office\/stories\/(\d+)/.exec(page.url())![1]);
    await page.getByText("All changes saved").waitFor();
    await screenshot(page, "story-editor");
    await page.getByRole("button", { name: "Submit for review" }).click();
    await page.locator('[data-status="in_review"]').first().waitFor();

    const marketing = await signIn(app(), DEMO.marketing);
    const saved = (await marketing.agent.get(`/api/stories/${id}`).expect(200)).body as { slug: string; status: string; items: Array<{ kind: string; beforeMediaId?: number; afterMediaId?: number; mediaId?: number }> };
    expect(saved.status).toBe("in_review");
    expect(saved.items.map((i) => i.kind)).toEqual(["pair", "photo"]);
    expect(saved.items[0]).toMatchObject({ beforeMediaId: photos.before.id, afterMediaId: photos.after.id });
    storySlug = saved.slug;

    const lead = await signIn(app(), DEMO.lead);
    await lead.agent.post(`/api/stories/${id}/approve`).set("X-CSRF-Token", lead.csrf).send({}).expect(200);
    await lead.agent.post(`/api/stories/${id}/publish`).set("X-CSRF-Token", lead.csrf).send({}).expect(200);
    expect(errors).toEqual([]);
  });

  it("a visitor sees the comparison slider with both capture dates, moves it with the keyboard, and opens the other photo in the lightbox", async () => {
    expect(storySlug).not.toBe("");
    for (const width of [1280, 360]) {
      const page = await (await browserFor(width)).context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${app().baseUrl}/projects/${SLUG}/stories/${storySlug}`);
      const slider = page.getByRole("slider");
      await slider.waitFor();
      const frame = page.getByTestId("compare-slider");
      expect(await frame.textContent()).toContain(`Then · ${longDate(dayOf(photos.before.takenAt))}`);
      expect(await frame.textContent()).toContain(`Now · ${longDate(dayOf(photos.after.takenAt))}`);
      expect(await slider.getAttribute("aria-valuenow")).toBe("50");
      await slider.focus();
      await page.keyboard.press("ArrowLeft");
      await page.keyboard.press("ArrowLeft");
      expect(await slider.getAttribute("aria-valuenow")).toBe("40");
      expect(await page.getByTestId("compare-before").evaluate((el) => (el as HTMLElement).style.clipPath)).toBe("inset(0px 60% 0px 0px)");
      await page.keyboard.press("End");
      expect(await slider.getAttribute("aria-valuenow")).toBe("100");
      await page.keyboard.press("Home");
      expect(await slider.getAttribute("aria-valuenow")).toBe("0");
      await page.keyboard.press("PageUp");
      expect(await slider.getAttribute("aria-valuenow")).toBe("20");

      // A drag across the frame moves the divider to where the pointer is.
      const box = (await frame.boundingBox())!;
      await page.mouse.move(box.x + box.width * 0.3, box.y + box.height / 2);
      await page.mouse.down();
      await page.mouse.move(box.x + box.width * 0.75, box.y + box.height / 2, { steps: 5 });
      await page.mouse.up();
      expect(Number(await slider.getAttribute("aria-valuenow"))).toBeGreaterThanOrEqual(73);
      expect(Number(await slider.getAttribute("aria-valuenow"))).toBeLessThanOrEqual(77);

      await page.getByTestId("story-photo").click();
      const lightbox = page.getByRole("dialog");
      await lightbox.waitFor();
      expect(await lightbox.getAttribute("aria-label")).toMatch(/1 of 1/);
      await screenshot(page, width === 360 ? "story-lightbox-360" : "story-lightbox");
      await page.keyboard.press("Escape");
      await lightbox.waitFor({ state: "detached" });
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, width === 360 ? "story-public-360" : "story-public");
      expect(errors).toEqual([]);
    }
  });
});

describe("the public project home", () => {
  it("shows the progress in words, the next three milestones, the latest updates and the ways to follow, at desktop and phone width", async () => {
    for (const width of [1280, 360]) {
      const page = await (await browserFor(width)).context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${app().baseUrl}/projects/${SLUG}`);
      await page.getByRole("heading", { level: 1, name: "Aldermere Campus, Phase 2" }).waitFor();
      await page.getByTestId("public-progress").waitFor();
      // The words about the milestones come with the page; percent complete and the forecast
      // arrive with the health figures a moment later.
      await expect.poll(() => page.getByTestId("progress-words").textContent()).toMatch(/\d+%\s*of the work is complete/);
      await expect.poll(() => page.getByTestId("progress-words").textContent()).toMatch(/forecast for [A-Z][a-z]+ \d{4}/);
      await expect.poll(() => page.getByTestId("next-milestone").count()).toBe(3);
      for (const link of ["Get updates by e-mail", "Ask about capacity or a site visit", "See the timeline: when each part will be ready →", "Photographs from the site"]) {
        await page.getByRole("link", { name: link }).waitFor();
      }
      expect(await page.getByRole("link", { name: "Get updates by e-mail" }).getAttribute("href")).toBe(`/projects/${SLUG}/subscribe`);
      expect(await page.getByRole("link", { name: "Ask about capacity or a site visit" }).getAttribute("href")).toBe(`/projects/${SLUG}/enquire`);
      await page.getByRole("heading", { name: "Latest updates" }).waitFor();
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, width === 360 ? "site-project-home-360" : "site-project-home");
      expect(errors).toEqual([]);
    }
  });

  it("loads light: no editor code, and at most 150 KB of JavaScript (gzip) for a visitor's first page", async () => {
    const page = await (await browserFor()).context.newPage();
    const scripts: Array<{ url: string; gzip: number; text: string }> = [];
    page.on("response", async (res) => {
      if (res.request().resourceType() !== "script") return;
      const body = await res.body();
      scripts.push({ url: res.url(), gzip: gzipSync(body).length, text: body.toString("utf8") });
    });
    await page.goto(`${app().baseUrl}/projects/${SLUG}`);
    await page.getByTestId("public-progress").waitFor();
    await page.waitForLoadState("networkidle");
    const total = scripts.reduce((s, x) => s + x.gzip, 0);
    // Target of the issue: the public pages' initial JavaScript, gzip, at most 150 KB.
    expect(total).toBeLessThanOrEqual(150 * 1024);
    expect(scripts.some((s) => /ProseMirror|tiptap/i.test(s.text))).toBe(false);
    expect(scripts.some((s) => /react-hook-form|useFormContext/.test(s.text))).toBe(false);
  });
});

describe("the public gallery", () => {
  it("shows cleared photos by month, filters them, and steps through them in the lightbox", async () => {
    const visitor = await newClient(app());
    const api = await visitor.agent.get(`/api/projects/${SLUG}/gallery`);
    expect(api.status).toBe(200);
    const page = await (await browserFor()).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${app().baseUrl}/projects/${SLUG}/gallery`);
    await page.getByRole("heading", { level: 1, name: "Photographs from the site" }).waitFor();
    const tiles = page.getByTestId("gallery-photo");
    await tiles.first().waitFor();
    const count = await tiles.count();
    expect(count).toBeGreaterThan(0);
    await tiles.first().click();
    const lightbox = page.getByRole("dialog");
    await lightbox.waitFor();
    expect(await lightbox.getAttribute("aria-label")).toBe(`Site photograph 1 of ${count}`);
    if (count > 1) {
      await page.keyboard.press("ArrowRight");
      expect(await lightbox.getAttribute("aria-label")).toBe(`Site photograph 2 of ${count}`);
    }
    await screenshot(page, "site-gallery-lightbox");
    await page.keyboard.press("Escape");
    await lightbox.waitFor({ state: "detached" });
    // The filter's own box (the site plan above it names its areas too).
    const areaBox = page.getByRole("combobox", { name: "Area" });
    const areas = await areaBox.locator("option").allTextContents();
    if (areas.length > 1) {
      await areaBox.selectOption({ label: areas[1]! });
      await page.waitForURL(/area=/);
      await tiles.first().waitFor();
      expect(await tiles.count()).toBeLessThanOrEqual(count);
    }
    await screenshot(page, "site-gallery");
    expect(errors).toEqual([]);
  });
});
