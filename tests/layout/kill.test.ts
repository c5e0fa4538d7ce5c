/**
 * The test that kills things (issue #16): two web and two worker processes behind Debian's
 * HAProxy (deploy/haproxy.cfg), a three-node MariaDB Galera cluster as the single writer's
 * database, the fake S3 store (s3rver) and an SMTP sink, all on loopback. Each assertion prints
 * its figure. `npm run scale` runs the same scenarios (scripts/layout/scenarios.ts) at full size.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startLayout, type Layout } from "../../scripts/layout/layout.ts";
import { digestOnce, scheduledPostOnce, sessionAcrossProcesses, uploadsProcessedOnce, webKilledUnderLoad } from "../../scripts/layout/scenarios.ts";

const say = (line: string) => process.stdout.write(`  [layout] ${line}\n`);

let layout: Layout;
const t0 = Date.now();
beforeAll(async () => {
  layout = await startLayout({
    say,
    env: {
      // Short so the test is: a killed worker's deliveries are claimed again after 5 s, and
      // scheduled publication and retries are looked at every second or two.
      DIGEST_LEASE_SECONDS: "5",
      DIGEST_RETRY_BASE_SECONDS: "2",
      PUBLISH_CHECK_SECONDS: "1",
    },
  });
  say(`layout up in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}, 240_000);

afterAll(async () => {
  await layout?.stop();
  say(`kill test in all: ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}, 120_000);

describe("several processes behind HAProxy on a Galera cluster and S3", () => {
  it("keeps one session across both web processes (200 requests)", async () => {
    const f = await sessionAcrossProcesses(layout, 200);
    say(`session: ${f.ok}/${f.requests} answered as the signed-in lead; requests per process ${JSON.stringify(f.perProcess)}`);
    expect(f.ok).toBe(200);
    expect(Object.keys(f.perProcess)).toHaveLength(2);
    for (const n of Object.values(f.perProcess)) expect(n).toBeGreaterThanOrEqual(50);
  }, 60_000);

  it("processes each of 20 uploads exactly once and serves them from S3", async () => {
    const f = await uploadsProcessedOnce(layout, 20);
    say(`uploads: ${f.uploads} in ${f.seconds.toFixed(1)} s; processed once ${f.processedOnce}, more than once ${f.processedTwice}; per worker ${JSON.stringify(f.perWorker)}; derivatives in S3 ${f.inS3}, served from S3 ${f.servedFromS3}; log lines arriving after the row read ready ${f.linesLate}`);
    expect(f.uploads).toBe(20);
    expect(f.processedOnce).toBe(20);
    expect(f.processedTwice).toBe(0);
    expect(f.inS3).toBeGreaterThan(0);
    expect(f.servedFromS3).toBe(f.inS3);
  }, 180_000);

  it("publishes a scheduled update exactly once, visible through every web process within the 5 s cache bound", async () => {
    const f = await scheduledPostOnce(layout);
    say(`scheduled update: published events ${f.publishedEvents}; by worker ${JSON.stringify(f.publishedBy)}; visible after ${JSON.stringify(Object.fromEntries(Object.entries(f.visibleAfter).map(([k, v]) => [k, `${v.toFixed(2)} s`])))}`);
    expect(f.publishedEvents).toBe(1);
    expect(Object.values(f.publishedBy).reduce((a, b) => a + b, 0)).toBe(1);
    // Decision 010: each process keeps a visitor's copy at most 5 s; a second for the request itself.
    for (const s of Object.values(f.visibleAfter)) expect(s).toBeLessThanOrEqual(6);
  }, 60_000);

  it("routes around a web process killed under load within 5 s, and nothing fails after", async () => {
    const f = await webKilledUnderLoad(layout, { seconds: 10 });
    say(`web kill: ${f.requests} requests; failed in the 5 s window ${f.failedInWindow}, outside it ${f.failedAfterWindow}; marked down after ${f.markedDownAfter?.toFixed(2)} s; per process ${JSON.stringify(f.perProcess)}`);
    expect(f.markedDownAfter).not.toBeNull();
    expect(f.markedDownAfter!).toBeLessThanOrEqual(5);
    expect(f.failedAfterWindow).toBe(0);
    expect(f.requests).toBeGreaterThan(100);
    await layout.startWeb(0);
    await layout.haproxy.waitUp("web", 2, 20_000);
  }, 90_000);

  it("sends a digest to 2,000 readers exactly once with a worker killed and the writing node stopped mid-run", async () => {
    const f = await digestOnce(layout, { subscribers: 2_000, killWorker: true, stopWriter: true });
    say(
      `digest: ${f.subscribers} readers in ${f.seconds.toFixed(1)} s; once ${f.once}, more than once ${f.twice}, missing ${f.missing}; ` +
        `worker killed at ${f.sentAtWorkerKill} sent; writer :${f.writerBefore} stopped at ${f.sentAtWriterStop} sent, writes moved to :${f.writerAfter}, ` +
        `recovered after ${f.recoveredAfter?.toFixed(2)} s; node rejoined after ${f.rejoinedAfter?.toFixed(1)} s`,
    );
    expect(f.runStatus).toBe("done");
    expect(f.once).toBe(2_000);
    expect(f.twice).toBe(0);
    expect(f.missing).toBe(0);
    expect(f.deliveriesSent).toBe(2_000);
    expect(f.sentAtWorkerKill).toBeLessThan(2_000);
    expect(f.sentAtWriterStop).toBeLessThan(2_000);
    expect(f.writerAfter).not.toBe(f.writerBefore);
    expect(f.rejoinedAfter).not.toBeNull();
    const sizes = await Promise.all(layout.cluster.nodes.map((n) => n.status()));
    expect(sizes.map((s) => [s.clusterSize, s.localState])).toEqual([
      [3, "Synced"],
      [3, "Synced"],
      [3, "Synced"],
    ]);
  }, 300_000);
});
