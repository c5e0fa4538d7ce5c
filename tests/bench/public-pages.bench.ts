/**
 * Public pages benchmark: the API calls a visitor's browser makes for the public project page
 * (/projects/:slug), answered by the real app over a bench database of 1,000 updates and
 * 10,000 photos, side by side with a bare Express handler that sends the same bytes from memory.
 *
 *   npx tsx tests/bench/public-pages.bench.ts [--seconds 10] [--connections 32] [--rounds 3] [--each] [--uncached] [--keep]
 *
 * Needs DATABASE_URL (npm run bench provides it); the bench database is its own
 * (`plumbline_bench_<random>`), created, migrated and seeded by this script and dropped at the
 * end (unless --keep). Runs alternate between the two (--rounds, medians reported) so that other
 * load on the machine falls on both alike. Prints requests per second of each, their ratio (target ≥ 80 %) and the
 * p99 latency of the app (target ≤ 50 ms), then the same page revalidated with If-None-Match
 * (304s, what a CDN in front asks). A benchmark, not a test: it never fails on a missed target.
 */
import { randomBytes } from "node:crypto";
import { createRequire } from "node:module";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { availableParallelism, cpus } from "node:os";
import express from "express";
import { createDb, ensureDatabase } from "../../server/db/knex.ts";
import { benchApp, benchDatabase, runThenDrop } from "./bench-database.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { plainTextOf, renderRichText } from "../../server/posts/rich-text.ts";
import { seedProgramme } from "../../server/seed/programme.seed.ts";
import type { RichTextDoc } from "../../src/shared/schemas/rich-text.ts";

const args = process.argv.slice(2);
const arg = (name: string, fallback: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : fallback;
};
const SECONDS = arg("seconds", 10);
const CONNECTIONS = arg("connections", 32);
const KEEP = args.includes("--keep");
const ROUNDS = arg("rounds", 3);
const POSTS = 1_000;
const PHOTOS = 10_000;
const SLUG = "aldermere-phase-2";

// autocannon ships no type declarations; this is the part of its API used here.
interface AutocannonResult {
  requests: { average: number; total: number };
  latency: { p50: number; p99: number; average: number };
  non2xx: number;
  errors: number;
  timeouts: number;
  statusCodeStats?: Record<string, { count: number }>;
}
type Autocannon = (opts: {
  url: string;
  connections: number;
  duration: number;
  requests: Array<{ method: "GET"; path: string; headers?: Record<string, string> }>;
}) => Promise<AutocannonResult>;
const autocannon = createRequire(import.meta.url)("autocannon") as Autocannon;

const bench = benchDatabase();
const { databaseUrl } = bench;
const out = (s: string) => process.stdout.write(`${s}\n`);

// A small deterministic generator, so every run seeds the same data.
let seed = 20261201;
const random = () => {
  seed = (seed * 1_103_515_245 + 12_345) % 2_147_483_648;
  return seed / 2_147_483_648;
};

async function seedBench(): Promise<void> {
  const db = createDb(databaseUrl, { max: 4 });
  try {
    await migrateLatest(db);
    const [projectId] = await db("projects").insert({
      slug: SLUG,
      name: "Aldermere Campus, Phase 2",
      operator_name: "Kestrel Colocation",
      time_zone: "Europe/London",
      description: "Phase 2 adds Hall 2A, the high-density suite HD-1 and Hall 2B.",
      currency: "GBP",
    });
    await seedProgramme(db, Number(projectId), { byUserId: null });

    const areas = ["Hall 2A", "HD-1", "Hall 2B", "Plant yard", "Energy centre"];
    const widths = [320, 640, 1024, 1600, 2400];
    const exts = { avif: "avif", webp: "webp", jpeg: "jpg" } as const;
    for (let start = 0; start < PHOTOS; start += 1_000) {
      const items = Array.from({ length: 1_000 }, (_, i) => ({
        project_id: projectId,
        sha256: randomBytes(32).toString("hex"),
        status: "ready",
        original_key: `originals/${randomBytes(8).toString("hex")}.jpg`,
        original_name: `site-${start + i}.jpg`,
        mime: "image/jpeg",
        bytes: 2_000_000,
        width: 2400,
        height: 1600,
        taken_at: "2026-06-01T10:00:00",
        taken_on: "2026-06-01",
        alt_text: "An illustrative drawing of site progress",
        caption: `Site walk ${start + i}`,
        sensitivity: random() < 0.9 ? "cleared" : "restricted",
        dominant_color: "#8899aa",
        is_illustration: true,
      }));
      await db("media_items").insert(items);
    }
    const mediaIds = (await db("media_items").where({ project_id: projectId, sensitivity: "cleared" }).orderBy("id").pluck("id")) as number[];
    const allIds = (await db("media_items").where({ project_id: projectId }).orderBy("id").pluck("id")) as number[];
    for (let start = 0; start < allIds.length; start += 500) {
      const rows = allIds.slice(start, start + 500).flatMap((id) => {
        const hash = randomBytes(8).toString("hex");
        return (["avif", "webp", "jpeg"] as const).flatMap((format) =>
          widths.map((w) => ({ media_id: id, width: w, height: Math.round((w * 2) / 3), format, storage_key: `variants/${hash}-${w}w.${exts[format]}`, bytes: 40_000 + w * 20 })),
        );
      });
      await db("media_variants").insert(rows);
    }
    await db("media_tags").insert(allIds.map((id, i) => ({ media_id: id, kind: "area", value: areas[i % areas.length] })));

    // One rendered body, as the posts service would store it (with an inline photo).
    const milestones = (await db("milestones").where({ project_id: projectId, audience: "public" }).select("id", "name")) as Array<{ id: number; name: string }>;
    const inline = mediaIds[0]!;
    const body: RichTextDoc = {
      type: "doc",
      content: [
        { type: "paragraph", content: [{ type: "text", text: "The chillers are set on their plinths and the chilled-water pipework is being pressure-tested. " .repeat(3) }] },
        { type: "image", attrs: { mediaId: inline } },
        { type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: "What happens next" }] },
        { type: "paragraph", content: [{ type: "text", text: "Commissioning of the cooling plant follows the HV energisation. ".repeat(4) }] },
        { type: "milestone", attrs: { milestoneId: milestones[0]!.id } },
      ],
    };
    const ctx = { pictures: new Map(), milestones: new Map([[milestones[0]!.id, { name: milestones[0]!.name, status: "on_programme" as const, baselineFinish: "2027-01-29", forecastFinish: "2027-02-12", actualFinish: null, percentComplete: 60 }]]) };
    const html = renderRichText(body, ctx);
    const plain = plainTextOf(body, ctx);
    const started = Date.UTC(2026, 2, 2);
    for (let start = 0; start < POSTS; start += 250) {
      const rows = Array.from({ length: 250 }, (_, k) => {
        const i = start + k;
        const r = random();
        const status = r < 0.85 ? "published" : r < 0.93 ? "draft" : "in_review";
        const published = status === "published" ? new Date(started + i * 6 * 3_600_000) : null;
        return {
          project_id: projectId,
          slug: `site-walk-${i}`,
          title: `Site walk ${i}: chillers, generators and Hall 2A`,
          summary: "What changed on site this week: plant delivered, progress in the halls, and the programme.",
          body: JSON.stringify(body),
          html,
          plain_text: `${plain} walk${i}`,
          audience: random() < 0.8 ? "public" : "investor",
          status,
          author_name: "Morgan Reyes",
          cover_media_id: mediaIds[i % mediaIds.length],
          published_at: published,
          created_at: published ?? new Date(started),
          updated_at: published ?? new Date(started),
        };
      });
      await db("posts").insert(rows);
    }
    const posts = (await db("posts").where({ project_id: projectId }).select("id", "cover_media_id", "audience", "status")) as Array<{ id: number; cover_media_id: number; audience: string; status: string }>;
    for (let start = 0; start < posts.length; start += 500) {
      const slice = posts.slice(start, start + 500);
      await db("post_tags").insert(slice.flatMap((p, i) => [{ post_id: p.id, kind: "area", value: areas[i % areas.length] }, { post_id: p.id, kind: "system", value: "cooling" }]));
      await db("post_media").insert(slice.flatMap((p) => [{ post_id: p.id, media_id: p.cover_media_id, role: "cover", sort_order: 0 }, { post_id: p.id, media_id: inline, role: "inline", sort_order: 0 }]));
      await db("media_usages").insert(slice.map((p) => ({ media_id: p.cover_media_id, owner_type: "post", owner_id: p.id, audience: p.audience, published: p.status === "published" })));
    }
    for (let i = 0; i < 6; i++) {
      const [storyId] = await db("stories").insert({
        project_id: projectId,
        slug: `story-${i}`,
        title: `Then and now ${i}`,
        intro: "Months of progress in pairs of photos.",
        audience: "public",
        status: "published",
        author_name: "Morgan Reyes",
        published_at: new Date(started + i * 86_400_000 * 30),
      });
      await db("story_items").insert([
        { story_id: storyId, position: 0, kind: "pair", media_id: mediaIds[i * 2]!, after_media_id: mediaIds[i * 2 + 1]!, area: "Plant yard", caption: "" },
        { story_id: storyId, position: 1, kind: "photo", media_id: mediaIds[i * 2 + 2]!, caption: "" },
      ]);
    }
  } finally {
    await db.destroy();
  }
}

const listen = (app: express.Express | ((req: never, res: never) => void)): Promise<{ server: Server; url: string }> =>
  new Promise((resolve) => {
    const server = createServer(app as never);
    server.listen(0, "127.0.0.1", () => resolve({ server, url: `http://127.0.0.1:${(server.address() as AddressInfo).port}` }));
  });

/** What the public project page asks for when a visitor opens it (src/app/pages/project-home-page.tsx and its parts). */
const PAGE_CALLS = [
  `/api/projects/${SLUG}`,
  `/api/projects/${SLUG}/health`,
  `/api/projects/${SLUG}/milestones?audience=public`,
  `/api/projects/${SLUG}/posts?status=published`,
  `/api/projects/${SLUG}/stories`,
];

async function main(): Promise<void> {
  out(`public pages: seeding ${POSTS.toLocaleString("en-GB")} updates and ${PHOTOS.toLocaleString("en-GB")} photos into ${bench.name} …`);
  await ensureDatabase(databaseUrl);
  const t0 = Date.now();
  await seedBench();
  out(`  seeded in ${((Date.now() - t0) / 1000).toFixed(1)} s`);

  // --uncached measures the app without its visitors' answer cache (which runs in production only).
  const { plumbline, stop } = benchApp(bench, { NODE_ENV: args.includes("--uncached") ? "development" : "production", SERVE_CLIENT: "false" });
  const real = await listen(plumbline.app);

  // The same bytes, from memory, by a bare Express handler: the ceiling for this machine.
  const answers = new Map<string, { type: string; body: Buffer; etag: string | null }>();
  for (const p of PAGE_CALLS) {
    const res = await fetch(real.url + p);
    if (res.status !== 200) throw new Error(`${p} answered ${res.status}`);
    answers.set(p, { type: res.headers.get("content-type") ?? "application/json", body: Buffer.from(await res.arrayBuffer()), etag: res.headers.get("etag") });
  }
  const bare = express();
  bare.disable("x-powered-by");
  bare.disable("etag");
  bare.use((req, res) => {
    const a = answers.get(req.originalUrl);
    if (!a) return void res.status(404).end();
    res.set("Content-Type", a.type).end(a.body);
  });
  const bareServer = await listen(bare);

  const bytes = [...answers.values()].reduce((s, a) => s + a.body.length, 0);
  const posts = JSON.parse(answers.get(PAGE_CALLS[3]!)!.body.toString()) as unknown[];
  out(`  page calls: ${PAGE_CALLS.length} (${(bytes / 1024).toFixed(1)} KB together; the updates list holds ${posts.length} of the latest)`);
  out(`  ${cpus()[0]?.model ?? "cpu"} × ${availableParallelism()}; ${CONNECTIONS} connections, ${SECONDS} s each; the load generator shares the machine`);

  const requests = PAGE_CALLS.map((p) => ({ method: "GET" as const, path: p }));
  const run = (target: string, reqs = requests) => autocannon({ url: target, connections: CONNECTIONS, duration: SECONDS, requests: reqs });
  // Warm both (JIT, connection pools, InnoDB buffer pool).
  await autocannon({ url: real.url, connections: 8, duration: 2, requests });
  await autocannon({ url: bareServer.url, connections: 8, duration: 2, requests });

  if (args.includes("--each")) {
    for (const r of requests) {
      const one = await autocannon({ url: real.url, connections: CONNECTIONS, duration: Math.max(3, Math.round(SECONDS / 3)), requests: [r] });
      out(`  ${r.path.padEnd(60)} ${one.requests.average.toFixed(0).padStart(6)} req/s  p99 ${one.latency.p99} ms`);
    }
  }
  // Rounds alternate between the two, so a neighbour's load on the machine falls on both alike;
  // the figures are the medians of the rounds.
  const appRuns: AutocannonResult[] = [];
  const bareRuns: AutocannonResult[] = [];
  for (let round = 0; round < ROUNDS; round++) {
    appRuns.push(await run(real.url));
    bareRuns.push(await run(bareServer.url));
  }
  const median = (runs: AutocannonResult[]) => [...runs].sort((a, b) => a.requests.average - b.requests.average)[Math.floor(runs.length / 2)]!;
  const app = median(appRuns);
  const ceiling = median(bareRuns);
  const revalidate = await run(
    real.url,
    PAGE_CALLS.map((p) => ({ method: "GET" as const, path: p, headers: answers.get(p)!.etag ? { "if-none-match": answers.get(p)!.etag! } : {} })),
  );

  const ratio = app.requests.average / ceiling.requests.average;
  const line = (name: string, r: AutocannonResult) =>
    `  ${name.padEnd(34)} ${r.requests.average.toFixed(0).padStart(7)} req/s   p50 ${String(r.latency.p50).padStart(4)} ms   p99 ${String(r.latency.p99).padStart(4)} ms   non-2xx ${r.non2xx}   errors ${r.errors + r.timeouts}`;
  out("");
  for (let round = 0; round < ROUNDS; round++) {
    out(`  round ${round + 1}: Plumbline ${appRuns[round]!.requests.average.toFixed(0)} req/s (p99 ${appRuns[round]!.latency.p99} ms), bare ${bareRuns[round]!.requests.average.toFixed(0)} req/s (p99 ${bareRuns[round]!.latency.p99} ms)`);
  }
  out(line("Plumbline (real app, full answers)", app));
  out(line("bare Express, same bytes in memory", ceiling));
  out(line("Plumbline, revalidated (304s)", revalidate));
  out("");
  out(`  ratio: ${(ratio * 100).toFixed(1)} % of the bare handler, medians of ${ROUNDS} rounds (target ≥ 80 %: ${ratio >= 0.8 ? "met" : "not met"})`);
  out(`  p99:   ${app.latency.p99} ms (target ≤ 50 ms: ${app.latency.p99 <= 50 ? "met" : "not met"})`);
  const notModified = revalidate.statusCodeStats?.["304"]?.count ?? 0;
  out(`  revalidation: ${notModified} of ${revalidate.requests.total} answered 304 (ETag); public answers carry Cache-Control for a CDN`);

  await new Promise<void>((r) => real.server.close(() => r()));
  await new Promise<void>((r) => bareServer.server.close(() => r()));
  await stop();
}

await runThenDrop(bench, { keep: KEEP, out }, main);
