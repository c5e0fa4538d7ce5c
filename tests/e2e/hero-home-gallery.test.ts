import { describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import type { Home } from "../../src/shared/schemas/project-hero.ts";
import type { PostDetail, PostSummary } from "../../src/shared/schemas/posts.ts";
import { DEMO, newClient, signIn } from "../helpers/app.ts";
import { screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

/** The hero photograph and the home page, the gallery's thumbnails, the then-and-now bar (decision 055). */
const SLUG = "aldermere-phase-2";
const { app, browsers } = useBrowserApp();

/** "2027-04-16" → "16 April 2027", as the home page writes the next ready-for-service date. */
function longDate(day: string): string {
  const [y, m, d] = day.split("-").map(Number) as [number, number, number];
  return new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(new Date(Date.UTC(y, m - 1, d)));
}

describe("the home page with one build", () => {
  it("at 375 and 1280 px shows the chosen hero cropped at its focal point, the one figure and the next ready-for-service date", async () => {
    const lead = await signIn(app(), DEMO.lead);
    const photos = (await lead.agent.get(`/api/media?project=${SLUG}&sensitivity=cleared&status=ready&pageSize=100`).expect(200)).body.items as MediaItem[];
    const choice = photos.find((p) => p.altText?.trim() && !p.flaggedForReview)!;
    expect(choice).toBeDefined();
    const hero = (await lead.agent.get(`/api/projects/${SLUG}/hero`).expect(200)).body as { version: number };
    await lead.agent.put(`/api/projects/${SLUG}/hero`).set("X-CSRF-Token", lead.csrf).send({ mediaId: choice.id, focus: { x: 0.2, y: 0.7 }, version: hero.version }).expect(200);
    const visitor = await newClient(app());
    const home = (await visitor.agent.get("/api/home").expect(200)).body as Home;
    expect(home.builds).toHaveLength(1);
    const build = home.builds[0]!;
    expect(build.pictureIs).toBe("hero");
    const health = (await visitor.agent.get(`/api/projects/${SLUG}/health`).expect(200)).body as { percentComplete: number };

    for (const width of [375, 1280]) {
      const page = await (await browsers.launch(width, width === 375 ? 812 : 900)).context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${app().baseUrl}/`);
      await page.getByTestId("home-build").waitFor();
      const img = page.getByTestId("hero-image").locator("img");
      expect(await img.evaluate((el) => (el as HTMLImageElement).style.objectPosition)).toBe("20% 70%");
      await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth > 0), { timeout: 10_000 }).toBe(true);
      expect(await img.evaluate((el: HTMLImageElement) => el.closest("picture")?.getAttribute("data-media-id"))).toBe(String(choice.id));
      expect(await page.getByTestId("home-figure").textContent()).toContain(`${Math.round(health.percentComplete)}%`);
      const next = (await page.getByTestId("home-next-ready").textContent()) ?? "";
      expect(build.nextReady).not.toBeNull();
      expect(next).toContain(build.nextReady!.blockName);
      expect(next).toContain(longDate(build.nextReady!.date));
      // Hero, figure and date are all on the first screen.
      const dateBox = (await page.getByTestId("home-next-ready").boundingBox())!;
      expect(dateBox.y + dateBox.height).toBeLessThanOrEqual(width === 375 ? 812 : 900);
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, `home-hero-${width}`);
      expect(errors).toEqual([]);
    }

    // The project page opens with the same hero.
    const page = await (await browsers.launch(1280)).context.newPage();
    await page.goto(`${app().baseUrl}/projects/${SLUG}`);
    await page.getByTestId("project-hero").waitFor();
    expect(await page.getByTestId("project-hero").locator("picture").getAttribute("data-media-id")).toBe(String(choice.id));
    await screenshot(page, "project-hero-1280");
  });
});

describe("the gallery", () => {
  it("at 1280 px fills the width; every thumbnail shows caption and date, and the whole photo (the illustration mark is inside the visible box)", async () => {
    const page = await (await browsers.launch(1280)).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${app().baseUrl}/projects/${SLUG}/gallery`);
    const thumbs = page.getByTestId("gallery-thumb");
    await thumbs.first().waitFor();
    const grid = (await page.getByTestId("gallery-grid").first().boundingBox())!;
    // The page's column at 1280 px is 1280 less its 16 px margins; the grid takes all of it.
    expect(grid.width).toBeGreaterThanOrEqual(1200);
    const perRow = await page.getByTestId("gallery-grid").first().evaluate((ul) => getComputedStyle(ul).gridTemplateColumns.split(" ").length);
    expect(perRow).toBeGreaterThanOrEqual(5);
    const count = await thumbs.count();
    expect(count).toBeGreaterThan(0);
    for (let i = 0; i < count; i++) {
      const thumb = thumbs.nth(i);
      await thumb.scrollIntoViewIfNeeded();
      expect(((await thumb.getByTestId("gallery-date").textContent()) ?? "").trim()).not.toBe("");
      expect(((await thumb.getByTestId("gallery-caption").textContent()) ?? "").trim()).not.toBe("");
      const img = thumb.locator("img");
      await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth > 0), { timeout: 10_000 }).toBe(true);
      // Nothing is cropped: the drawn box has the photo's own ratio, and lies inside its frame.
      const shown = await img.evaluate((el: HTMLImageElement) => {
        const r = el.getBoundingClientRect();
        const frame = el.closest("button")!.getBoundingClientRect();
        return { ratio: r.width / r.height, natural: el.naturalWidth / el.naturalHeight, inside: r.left >= frame.left - 0.5 && r.right <= frame.right + 0.5 && r.top >= frame.top - 0.5 && r.bottom <= frame.bottom + 0.5 };
      });
      expect(Math.abs(shown.ratio - shown.natural) / shown.natural).toBeLessThan(0.02);
      expect(shown.inside).toBe(true);
    }
    await screenshot(page, "gallery-1280");
    expect(errors).toEqual([]);
  });
});

describe("a post's linked milestones", () => {
  it("are each shown once, with a then-and-now bar and its words", async () => {
    const visitor = await newClient(app());
    const body = (await visitor.agent.get(`/api/projects/${SLUG}/posts?status=published`).expect(200)).body as PostSummary[] | { items: PostSummary[] };
    const list = Array.isArray(body) ? body : body.items;
    let post: PostDetail | null = null;
    for (const p of list) {
      const detail = (await visitor.agent.get(`/api/projects/${SLUG}/posts/${p.slug}`).expect(200)).body as PostDetail;
      if (detail.milestones.length > 0) {
        post = detail;
        break;
      }
    }
    expect(post).not.toBeNull();
    for (const width of [375, 1280]) {
      const page = await (await browsers.launch(width)).context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${app().baseUrl}/projects/${SLUG}/updates/${post!.slug}`);
      await page.getByRole("heading", { name: post!.title, level: 1 }).waitFor();
      await page.getByTestId("post-milestone").first().waitFor();
      const shown = await page.getByTestId("post-milestone").evaluateAll((els) => els.map((e) => e.getAttribute("data-milestone-id")));
      expect(shown.sort()).toEqual(post!.milestones.map((m) => String(m.id)).sort());
      for (const m of post!.milestones) {
        const row = page.locator(`[data-testid="post-milestone"][data-milestone-id="${m.id}"]`);
        expect(await row.count()).toBe(1);
        expect(((await row.getByTestId("then-now-words").textContent()) ?? "").length).toBeGreaterThan(10);
        if (m.now && (m.then?.forecastFinish || m.now.forecastFinish || m.now.actualFinish)) expect(await row.getByTestId("then-now-bar").count()).toBe(1);
      }
      expect(await page.locator('[data-testid="post-body"] aside.milestone-block').count()).toBe(0);
      await screenshot(page, `post-then-now-${width}`);
      expect(errors).toEqual([]);
    }
  });
});
