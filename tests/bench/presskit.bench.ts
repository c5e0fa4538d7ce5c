/**
 * Press kit benchmark (issue #15 item 4, docs/decisions/062-press-kits.md): a staff kit of 500
 * photos at 2400 px, streamed as one zip, against one of 50, each in a fresh child process so
 * that its peak resident memory is the kit's own. A plain script, not a test:
 *   npm run bench -- presskit          (or: npx tsx tests/bench/presskit.bench.ts [--keep])
 * Prints seconds, bytes and peak RSS of each; the target is a peak that does not grow with the
 * count (the archive holds one file at a time and waits while its reader is slow).
 *
 * The photos are grainy 2400 × 1600 JPEGs made with sharp (tests/helpers/images.ts) (24 distinct pictures, each stored
 * once and shared by many library rows, as content-addressed derivatives are) in the bench's
 * own media folder and database, both dropped at the end.
 */
import { spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { availableParallelism, cpus } from "node:os";
import { Writable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { fileURLToPath } from "node:url";
import { createDb, ensureDatabase } from "../../server/db/knex.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { createLocalDiskStorage } from "../../server/media/media.storage.ts";
import { makePatternedImage } from "../helpers/images.ts";
import { benchApp, benchDatabase, runThenDrop, type BenchDatabase } from "./bench-database.ts";

const THIS_FILE = fileURLToPath(import.meta.url);
const COUNTS = [50, 500] as const;
const DISTINCT = 24;
const WIDTH = 2400;
const HEIGHT = 1600;
const SLUG = "bench-press-kit";

const out = (s: string) => process.stdout.write(`${s}\n`);

/** The bench project and 500 cleared, ready photos, each with a stored 2400 px JPEG derivative. */
async function seed(bench: BenchDatabase): Promise<number[]> {
  await ensureDatabase(bench.databaseUrl);
  const db = createDb(bench.databaseUrl, { max: 4 });
  try {
    await migrateLatest(db);
    const storage = createLocalDiskStorage(bench.mediaDir);
    const keys: string[] = [];
    for (let i = 0; i < DISTINCT; i += 1) {
      // Grain and texture make the encoder work, as a real site photo does (about 0.8 MB at 2400 px).
      const bytes = await makePatternedImage({ width: WIDTH, height: HEIGHT, noise: 6, texture: 8, seed: 20261205 + i, format: "jpeg", quality: 82 });
      const key = `variants/${randomBytes(8).toString("hex")}-${WIDTH}w.jpg`;
      await storage.put(key, bytes);
      keys.push(key);
    }
    const [projectId] = await db("projects").insert({ slug: SLUG, name: "Aldermere Campus, Phase 2 (bench)", operator_name: "Kestrel Colocation", time_zone: "Europe/London", currency: "GBP" });
    const ids: number[] = [];
    const max = COUNTS[COUNTS.length - 1]!;
    for (let i = 0; i < max; i += 1) {
      const [id] = await db("media_items").insert({
        project_id: projectId,
        sha256: randomBytes(32).toString("hex"),
        status: "ready",
        original_key: `originals/${randomBytes(8).toString("hex")}.jpg`,
        original_name: `bench-${i}.jpg`,
        mime: "image/jpeg",
        bytes: 1,
        width: WIDTH,
        height: HEIGHT,
        taken_at: `2026-${String((i % 12) + 1).padStart(2, "0")}-10T09:00:00`,
        taken_on: `2026-${String((i % 12) + 1).padStart(2, "0")}-10`,
        caption: `Hall 2A, bay ${i + 1}: cable tray and containment`,
        alt_text: `Cable tray along bay ${i + 1} of Hall 2A`,
        credit: "Kestrel Colocation",
        sensitivity: "cleared",
      });
      await db("media_variants").insert({ media_id: id, width: WIDTH, height: HEIGHT, format: "jpeg", storage_key: keys[i % DISTINCT], bytes: 1 });
      ids.push(Number(id));
    }
    return ids;
  } finally {
    await db.destroy();
  }
}

interface Measured {
  count: number;
  seconds: number;
  bytes: number;
  entries: number;
  /** Peak resident set of the whole process (start-up and module loading included). */
  peakRssMb: number;
  /** Resident set just before the kit, and the most it reached while the zip streamed (sampled at every chunk). */
  beforeRssMb: number;
  streamingPeakRssMb: number;
}

/** Child mode: one kit of the first `count` photos, streamed to a sink that reads as fast as it can. */
async function runChild(bench: BenchDatabase, count: number, ids: number[]): Promise<void> {
  const app = benchApp(bench);
  try {
    const mb = () => process.memoryUsage().rss / 1024 / 1024;
    const beforeRssMb = mb();
    let streamingPeakRssMb = beforeRssMb;
    const started = process.hrtime.bigint();
    const kit = await app.plumbline.pressKits.staffKit(SLUG, { mediaIds: ids.slice(0, count), size: "2400" }, { user: null, ip: null });
    let bytes = 0;
    await pipeline(
      kit.open(),
      new Writable({
        write(chunk: Buffer, _enc, done) {
          bytes += chunk.length;
          streamingPeakRssMb = Math.max(streamingPeakRssMb, mb());
          done();
        },
      }),
    );
    const seconds = Number(process.hrtime.bigint() - started) / 1e9;
    const measured: Measured = { count, seconds, bytes, entries: count + 2, peakRssMb: process.resourceUsage().maxRSS / 1024, beforeRssMb, streamingPeakRssMb };
    out(`RESULT ${JSON.stringify(measured)}`);
  } finally {
    await app.stop();
  }
}

const args = process.argv.slice(2);
if (args[0] === "--child") {
  const bench = JSON.parse(args[1]!) as BenchDatabase;
  await runChild(bench, Number(args[2]), JSON.parse(args[3]!) as number[]);
  process.exit(0);
}

const bench = benchDatabase();
await runThenDrop(bench, { keep: args.includes("--keep"), out }, async () => {
  out(`press kit: ${availableParallelism()} cores (${cpus()[0]?.model ?? "unknown CPU"}), Node ${process.version}`);
  const ids = await seed(bench);
  out(`  ${ids.length} cleared photos with ${WIDTH} px JPEG derivatives in ${bench.name}`);
  const results: Measured[] = [];
  for (const count of COUNTS) {
    const child = spawnSync(process.execPath, [...process.execArgv, THIS_FILE, "--child", JSON.stringify(bench), String(count), JSON.stringify(ids)], { encoding: "utf8", maxBuffer: 16 * 1024 * 1024 });
    const line = child.stdout.split("\n").find((l) => l.startsWith("RESULT "));
    if (child.status !== 0 || !line) throw new Error(`the ${count}-photo kit failed:\n${child.stderr}`);
    const m = JSON.parse(line.slice("RESULT ".length)) as Measured;
    results.push(m);
    out(`  ${String(m.count).padStart(3)} photos at ${WIDTH} px: ${m.seconds.toFixed(2)} s, ${(m.bytes / 1024 / 1024).toFixed(1)} MB zip (${m.entries} entries), peak RSS ${m.peakRssMb.toFixed(0)} MB (${m.beforeRssMb.toFixed(0)} MB before the kit, at most ${m.streamingPeakRssMb.toFixed(0)} MB while it streamed)`);
  }
  const [small, large] = results as [Measured, Measured];
  const growth = Math.max(large.peakRssMb - small.peakRssMb, large.streamingPeakRssMb - small.streamingPeakRssMb);
  // Flat: ten times the photos may cost a few MB of bookkeeping (ids, names, manifest rows), not their bytes.
  const flat = growth <= 25;
  out(`  peak RSS ${small.peakRssMb.toFixed(0)} MB for ${small.count} and ${large.peakRssMb.toFixed(0)} MB for ${large.count} photos: ${growth >= 0 ? "+" : ""}${growth.toFixed(0)} MB for ${((large.bytes / small.bytes) || 0).toFixed(1)}× the bytes — ${flat ? "flat (target met)" : "GROWS with the count (target missed)"}`);
});
