/**
 * Phone page benchmark: the public pages as a phone on a slow line loads them, in Debian's
 * Chromium (playwright-core), from the real app serving the built client over the demo data.
 *
 *   npx tsx tests/bench/pages.bench.ts [--runs 3] [--keep]
 *
 * Profile: 375 × 812 px at device pixel ratio 3, touch; throttled through the DevTools protocol
 * to 1.6 Mbit/s down, 750 kbit/s up, 150 ms round trip (Network.emulateNetworkConditions) and
 * a 4× slower CPU (Emulation.setCPUThrottlingRate). Each load is cold (a new browser context,
 * nothing cached); the figures are the medians of --runs loads. For each page it prints the
 * largest contentful paint, the cumulative layout shift, and the bytes on the wire: in all, of
 * images and of JavaScript. Targets (issue 14): LCP ≤ 2.0 s, CLS ≤ 0.05, the post page's images
 * ≤ 350 KB, JavaScript ≤ 150 KB compressed. A benchmark, not a test: it never fails on a missed
 * target.
 *
 * Needs DATABASE_URL (npm run bench provides it) and a built client in dist/ (npm run bench
 * builds it when stale). The bench database (`plumbline_bench_<random>`) and its media folder
 * are its own, seeded with the demo and dropped at the end (unless --keep).
 */
import { createServer } from "node:http";
import type { AddressInfo } from "node:net";
import { chromium, type Browser } from "playwright-core";
import { createDb, ensureDatabase } from "../../server/db/knex.ts";
import { benchApp, benchDatabase, runThenDrop } from "./bench-database.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { DEMO_PROJECT_SLUG, seedDemo } from "../../server/seed/demo.seed.ts";

const args = process.argv.slice(2);
const RUNS = (() => {
  const i = args.indexOf("--runs");
  return i >= 0 ? Number(args[i + 1]) : 3;
})();
const KEEP = args.includes("--keep");
const out = (s: string) => process.stdout.write(`${s}\n`);

/** The phone and the line (issue 14, item 6). */
const PROFILE = {
  viewport: { width: 375, height: 812 },
  deviceScaleFactor: 3,
  downKbit: 1_600,
  upKbit: 750,
  latencyMs: 150,
  cpuSlowdown: 4,
};
const TARGETS = { lcpMs: 2_000, cls: 0.05, postImageBytes: 350 * 1024, jsBytes: 150 * 1024 };

const bench = benchDatabase();
const { databaseUrl, mediaDir } = bench;

interface Load {
  lcpMs: number;
  cls: number;
  totalBytes: number;
  imageBytes: number;
  jsBytes: number;
}

/** Runs in the page before its own scripts: keeps the largest contentful paint and the layout shifts. */
const OBSERVE = `
  window.__lcp = 0; window.__cls = 0;
  new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__lcp = e.startTime; }).observe({ type: "largest-contentful-paint", buffered: true });
  new PerformanceObserver((list) => { for (const e of list.getEntries()) if (!e.hadRecentInput) window.__cls += e.value; }).observe({ type: "layout-shift", buffered: true });
`;

async function loadOnce(browser: Browser, address: string): Promise<Load> {
  const context = await browser.newContext({ viewport: PROFILE.viewport, deviceScaleFactor: PROFILE.deviceScaleFactor, isMobile: true, hasTouch: true });
  try {
    const page = await context.newPage();
    await page.addInitScript(OBSERVE);
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", {
      offline: false,
      latency: PROFILE.latencyMs,
      downloadThroughput: (PROFILE.downKbit * 1000) / 8,
      uploadThroughput: (PROFILE.upKbit * 1000) / 8,
    });
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: PROFILE.cpuSlowdown });
    const types = new Map<string, string>();
    const bytes = { total: 0, image: 0, js: 0 };
    cdp.on("Network.responseReceived", (e: { requestId: string; type: string }) => types.set(e.requestId, e.type));
    cdp.on("Network.loadingFinished", (e: { requestId: string; encodedDataLength: number }) => {
      // Bytes on the wire, headers included: what the line carried.
      bytes.total += e.encodedDataLength;
      const type = types.get(e.requestId);
      if (type === "Image") bytes.image += e.encodedDataLength;
      if (type === "Script") bytes.js += e.encodedDataLength;
    });
    await page.goto(address, { waitUntil: "networkidle", timeout: 120_000 });
    // The paint entries are queued to the observers after the frame: read them once that frame is done.
    const { lcp, cls } = await page.evaluate(
      () =>
        new Promise<{ lcp: number; cls: number }>((resolve) =>
          requestAnimationFrame(() => setTimeout(() => resolve({ lcp: (window as unknown as { __lcp: number }).__lcp, cls: (window as unknown as { __cls: number }).__cls }), 0)),
        ),
    );
    return { lcpMs: lcp, cls, totalBytes: bytes.total, imageBytes: bytes.image, jsBytes: bytes.js };
  } finally {
    await context.close();
  }
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const kb = (n: number) => `${(n / 1024).toFixed(0)} KB`;

async function main(): Promise<void> {
  out(`pages: seeding the demo into ${bench.name} …`);
  await ensureDatabase(databaseUrl);
  const seedDb = createDb(databaseUrl, { max: 2 });
  process.env.MEDIA_DIR = mediaDir;
  const t0 = Date.now();
  try {
    await migrateLatest(seedDb);
    await seedDemo(seedDb, { password: "bench-password-not-for-use" });
  } finally {
    await seedDb.destroy();
  }
  out(`  seeded in ${((Date.now() - t0) / 1000).toFixed(1)} s`);

  // PUBLIC_URL is the listening address in spirit: the pages and their photos are fetched from it by path.
  const { db, plumbline, stop } = benchApp(bench, { PUBLIC_URL: "http://127.0.0.1", COOKIE_SECURE: "false" });
  const server = createServer(plumbline.app);
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  // The published public update with the most photos (the demo's richest post page).
  const post = (await db("posts as p")
    .join("post_media as pm", "pm.post_id", "p.id")
    .join("projects as pr", "pr.id", "p.project_id")
    .where({ "pr.slug": DEMO_PROJECT_SLUG, "p.status": "published", "p.audience": "public" })
    .groupBy("p.id", "p.slug")
    .orderByRaw("count(*) desc, p.id")
    .first("p.slug", db.raw("count(*) as photos"))) as { slug: string; photos: number } | undefined;
  if (!post) throw new Error("The demo has no published public update with photos");

  const pages: Array<{ name: string; path: string; isPost?: boolean }> = [
    { name: "project", path: `/projects/${DEMO_PROJECT_SLUG}` },
    { name: `post (${post.photos} photos)`, path: `/projects/${DEMO_PROJECT_SLUG}/updates/${post.slug}`, isPost: true },
    { name: "gallery", path: `/projects/${DEMO_PROJECT_SLUG}/gallery` },
    { name: "facility", path: `/projects/${DEMO_PROJECT_SLUG}/facility` },
  ];

  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  out(`  phone ${PROFILE.viewport.width} × ${PROFILE.viewport.height} at DPR ${PROFILE.deviceScaleFactor}; ${PROFILE.downKbit / 1000} Mbit/s down, ${PROFILE.upKbit} kbit/s up, ${PROFILE.latencyMs} ms round trip, CPU ${PROFILE.cpuSlowdown}× slower; median of ${RUNS} cold loads`);
  out("");
  out(`  ${"page".padEnd(20)} ${"LCP".padStart(8)} ${"CLS".padStart(7)} ${"total".padStart(9)} ${"images".padStart(9)} ${"JS".padStart(9)}`);
  const missed: string[] = [];
  try {
    for (const p of pages) {
      // One warm-up load outside the figures: the app's first answers fill its caches and pools.
      await loadOnce(browser, origin + p.path);
      const loads: Load[] = [];
      for (let i = 0; i < RUNS; i++) loads.push(await loadOnce(browser, origin + p.path));
      const m: Load = {
        lcpMs: median(loads.map((l) => l.lcpMs)),
        cls: median(loads.map((l) => l.cls)),
        totalBytes: median(loads.map((l) => l.totalBytes)),
        imageBytes: median(loads.map((l) => l.imageBytes)),
        jsBytes: median(loads.map((l) => l.jsBytes)),
      };
      out(`  ${p.name.padEnd(20)} ${`${(m.lcpMs / 1000).toFixed(2)} s`.padStart(8)} ${m.cls.toFixed(3).padStart(7)} ${kb(m.totalBytes).padStart(9)} ${kb(m.imageBytes).padStart(9)} ${kb(m.jsBytes).padStart(9)}`);
      if (m.lcpMs > TARGETS.lcpMs) missed.push(`${p.name}: LCP ${(m.lcpMs / 1000).toFixed(2)} s > 2.0 s`);
      if (m.cls > TARGETS.cls) missed.push(`${p.name}: CLS ${m.cls.toFixed(3)} > 0.05`);
      if (m.jsBytes > TARGETS.jsBytes) missed.push(`${p.name}: JavaScript ${kb(m.jsBytes)} > 150 KB`);
      if (p.isPost && m.imageBytes > TARGETS.postImageBytes) missed.push(`${p.name}: images ${kb(m.imageBytes)} > 350 KB`);
    }
  } finally {
    await browser.close();
  }
  out("");
  out(`  targets: LCP ≤ 2.0 s, CLS ≤ 0.05, post images ≤ 350 KB, JavaScript ≤ 150 KB on the wire`);
  out(missed.length ? `  not met: ${missed.join("; ")}` : "  every target met");

  await new Promise<void>((r) => server.close(() => r()));
  await stop();
}

await runThenDrop(bench, { keep: KEEP, out }, main);
