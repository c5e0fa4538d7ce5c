// `npm run scale` (scripts/scale.sh): the layout of docs/deployment.md on loopback, the kill
// test's scenarios at full size with every figure printed, and with --bench the throughput of
// one against two web processes and one against two workers.
import { readdirSync, readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { cpus } from "node:os";
import { LAYOUT_PROJECT, startLayout, type Layout } from "./layout/layout.ts";
import { digestOnce, scheduledPostOnce, sessionAcrossProcesses, uploadsProcessedOnce, webKilledUnderLoad } from "./layout/scenarios.ts";

const args = new Set(process.argv.slice(2));
const say = (line: string) => process.stdout.write(`${line}\n`);
const fixed = (n: number | null | undefined, d = 2) => (n == null ? "—" : n.toFixed(d));
let failures = 0;
const check = (ok: boolean, what: string) => {
  say(`  ${ok ? "✓" : "✗"} ${what}`);
  if (!ok) failures += 1;
};

/** CPU seconds used so far by each process of the layout, by part, from /proc (Linux). */
function cpuByPart(layout: Layout): Record<string, number> {
  const tick = 100; // USER_HZ on Linux
  const seconds = (pid: number) => {
    try {
      const fields = readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1]!.split(" ");
      return (Number(fields[11]) + Number(fields[12])) / tick;
    } catch {
      return 0;
    }
  };
  const parts: Record<string, number> = { "load generator": process.cpuUsage().user / 1e6 + process.cpuUsage().system / 1e6, haproxy: 0, "web processes": 0, "database nodes": 0 };
  for (const w of layout.webs) if (w.alive()) parts["web processes"]! += seconds(w.pid);
  parts.haproxy = seconds(layout.haproxy.pid);
  for (const pid of readdirSync("/proc").filter((d) => /^\d+$/.test(d))) {
    let cmd = "";
    try {
      cmd = readFileSync(`/proc/${pid}/cmdline`, "utf8");
    } catch {
      continue;
    }
    if (!cmd.includes(layout.dir)) continue;
    if (cmd.startsWith("mariadbd")) parts["database nodes"]! += seconds(Number(pid));
  }
  return parts;
}

/** Where the CPU went during a run: seconds per 1,000 requests by part, and how busy the machine's cores were. */
function cpuReport(before: Record<string, number>, after: Record<string, number>, requests: number, wallSeconds: number): string {
  const used = Object.fromEntries(Object.keys(after).map((k) => [k, after[k]! - (before[k] ?? 0)]));
  const total = Object.values(used).reduce((a, b) => a + b, 0);
  const per = Object.entries(used)
    .map(([k, v]) => `${k} ${fixed((v / requests) * 1000, 3)}`)
    .join(", ");
  return `CPU s per 1,000 requests: ${per}; ${fixed((total / (wallSeconds * cpus().length)) * 100, 0)} % of ${cpus().length} cores busy`;
}

// autocannon (the load generator of tests/bench/public-pages.bench.ts) ships no type declarations;
// this is the part of its API used here.
type Autocannon = (opts: {
  url: string;
  connections: number;
  duration: number;
  requests: Array<{ method: "GET"; path: string; headers?: Record<string, string> }>;
}) => Promise<{ requests: { average: number; total: number }; latency: { p99: number }; non2xx: number; errors: number; timeouts: number }>;
const autocannon = createRequire(import.meta.url)("autocannon") as Autocannon;

/** Requests per second and p99 of `concurrency` keep-alive connections cycling through `paths` for `seconds` (autocannon). */
async function load(url: string, paths: string[], seconds: number, concurrency: number, headers: Record<string, string> = {}): Promise<{ rps: number; p99: number; errors: number; requests: number; seconds: number }> {
  const r = await autocannon({ url, connections: concurrency, duration: seconds, requests: paths.map((path) => ({ method: "GET", path, headers })) });
  return { rps: r.requests.average, p99: r.latency.p99, errors: r.non2xx + r.errors + r.timeouts, requests: r.requests.total, seconds };
}

async function bench(layout: Layout): Promise<void> {
  say("\nBenchmark (this machine: the load generator, HAProxy, the app processes, the sink and three database nodes share its cores)");
  const paths = [`/api/projects/${LAYOUT_PROJECT}`, `/api/projects/${LAYOUT_PROJECT}/posts`, `/api/projects/${LAYOUT_PROJECT}/milestones`, `/api/projects/${LAYOUT_PROJECT}/health`, `/api/projects/${LAYOUT_PROJECT}/facility`, "/api/projects"];
  // Visitors (no cookie: the 5 s public copy per process answers, decision 010), then the same reads
  // with a cookie, as a signed-in reader's are: every one reaches the database.
  for (const [label, headers] of [
    ["public API, visitors (cached per process)", {}],
    ["public API, with a cookie (not cached)", { Cookie: "plumbline-bench=1" }],
  ] as const) {
    await load(layout.url, paths, 3, 16, headers); // warm-up
    const runs: Array<Awaited<ReturnType<typeof load>>> = [];
    for (const webs of [1, 2]) {
      await layout.haproxy.command(`set server web/web2 state ${webs === 1 ? "maint" : "ready"}`);
      await layout.haproxy.waitUp("web", webs, 20_000);
      const before = cpuByPart(layout);
      const r = await load(layout.url, paths, 15, 32, headers);
      runs.push(r);
      say(`  ${label}, ${webs} web process${webs === 1 ? ": " : "es:"} ${fixed(r.rps, 0)} req/s, p99 ${fixed(r.p99, 1)} ms, ${r.errors} errors of ${r.requests}`);
      say(`    ${cpuReport(before, cpuByPart(layout), r.requests, r.seconds)}`);
    }
    say(`  ratio two/one: ${fixed(runs[1]!.rps / runs[0]!.rps)}× (target ≥ 1.5×)`);
  }

  const digest = async (workers: number, readers: number) => {
    if (workers === 1) await layout.workers[1]!.kill("SIGTERM");
    else if (!layout.workers[1]!.alive()) await layout.startWorker(1);
    const f = await digestOnce(layout, { subscribers: readers });
    return { seconds: f.seconds, sent: f.deliveriesSent, perSecond: f.deliveriesSent / f.seconds };
  };
  const readers = Number(process.env.SCALE_BENCH_READERS ?? 10_000);
  if (readers <= 0) return;
  const d1 = await digest(1, readers);
  const d2 = await digest(2, readers);
  say(`  digest to ${readers} readers, one worker:  ${fixed(d1.seconds, 1)} s, ${fixed(d1.perSecond, 0)} messages/s (${d1.sent} sent)`);
  say(`  digest to ${readers} readers, two workers: ${fixed(d2.seconds, 1)} s, ${fixed(d2.perSecond, 0)} messages/s (${d2.sent} sent)`);
  say(`  ratio two/one: ${fixed(d2.perSecond / d1.perSecond)}× (target ≥ 1.6×)`);
}

/** The kill test's scenarios at full size, each figure printed. */
async function scenarios(): Promise<void> {
  say("\nOne session across the web processes");
  const s = await sessionAcrossProcesses(layout, 200);
  say(`  requests per process: ${JSON.stringify(s.perProcess)}`);
  check(s.ok === s.requests && Object.values(s.perProcess).every((n) => n > 0), `${s.ok}/${s.requests} answered with the one session, by both processes`);

  say("\nUploads through the load balancer, processed by the workers into S3");
  const u = await uploadsProcessedOnce(layout, 20);
  say(`  ${u.uploads} uploads ready in ${fixed(u.seconds, 1)} s; per worker ${JSON.stringify(u.perWorker)}`);
  check(u.processedOnce === u.uploads && u.processedTwice === 0, `processed exactly once: ${u.processedOnce}/${u.uploads}`);
  check(u.servedFromS3 === u.inS3 && u.inS3 > 0, `${u.inS3} derivatives in the S3 bucket, each served from it`);

  say("\nA scheduled update");
  const p = await scheduledPostOnce(layout);
  say(`  published by ${JSON.stringify(p.publishedBy)}; visible after ${JSON.stringify(Object.fromEntries(Object.entries(p.visibleAfter).map(([k, v]) => [k, `${fixed(v)} s`])))}`);
  check(p.publishedEvents === 1, `published exactly once (${p.publishedEvents} publication event)`);
  check(Object.values(p.visibleAfter).every((v) => v <= 6), "visible through every web process within the 5 s cache bound");

  say("\nkill -9 of a web process under load");
  const w = await webKilledUnderLoad(layout, { seconds: 20, concurrency: 8 });
  say(`  ${w.requests} requests; per process ${JSON.stringify(w.perProcess)}; marked down after ${fixed(w.markedDownAfter)} s`);
  check(w.markedDownAfter !== null && w.markedDownAfter <= 5, "HAProxy routed around it within 5 s");
  check(w.failedAfterWindow === 0, `nothing failed outside the 5 s window (${w.failedInWindow} inside it)`);
  await layout.startWeb(0);
  await layout.haproxy.waitUp("web", 2, 20_000);

  say("\nA digest to 2,000 readers: kill -9 of a worker a quarter through, the writing node stopped half way");
  const d = await digestOnce(layout, { subscribers: 2_000, killWorker: true, stopWriter: true });
  say(`  ${d.subscribers} readers in ${fixed(d.seconds, 1)} s; worker killed at ${d.sentAtWorkerKill} sent; writer :${d.writerBefore} stopped at ${d.sentAtWriterStop} sent`);
  check(d.once === d.subscribers && d.twice === 0 && d.missing === 0, `every address exactly once: ${d.once} once, ${d.twice} more than once, ${d.missing} missing`);
  check(d.writerAfter !== null && d.writerAfter !== d.writerBefore, `writes moved to :${d.writerAfter}; the app recovered by itself after ${fixed(d.recoveredAfter)} s`);
  check(d.rejoinedAfter !== null, `the stopped node rejoined after ${fixed(d.rejoinedAfter, 1)} s`);
}

const t0 = Date.now();
say("Bringing up the layout (Galera ×3, HAProxy, 2 web + 2 worker processes, fake S3, SMTP sink)");
const layout = await startLayout({ say: (l) => say(`  ${l}`), env: { DIGEST_LEASE_SECONDS: "10", DIGEST_RETRY_BASE_SECONDS: "2", PUBLISH_CHECK_SECONDS: "1" } });
const stop = async () => {
  await layout.stop();
};
process.once("SIGINT", () => void stop().then(() => process.exit(130)));
try {
  say(`  up in ${fixed((Date.now() - t0) / 1000, 1)} s: app ${layout.url}, database ${layout.databaseUrl.replace(/:[^:@/]+@/, ":…@")}`);
  if (!args.has("--bench-only")) await scenarios();
  if (args.has("--bench") || args.has("--bench-only")) await bench(layout);
  say(`\n${failures === 0 ? "All scenarios held" : `${failures} check(s) failed`} (${fixed((Date.now() - t0) / 1000, 1)} s in all).`);
  if (args.has("--keep")) {
    say(`\nThe layout stays up (app ${layout.url}; sign in as lead@kestrel.example with the password plumbline-layout-demo). Ctrl-C stops it.`);
    await new Promise(() => {});
  }
} finally {
  await stop();
}
process.exit(failures === 0 ? 0 : 1);
