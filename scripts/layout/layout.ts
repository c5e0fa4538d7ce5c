/**
 * The whole layout of a deployment beyond one machine, on loopback: a three-node MariaDB
 * Galera cluster, HAProxy (deploy/haproxy.cfg) in front of two `web` processes and the
 * cluster's single writer, two `worker` processes, the fake S3 store and an SMTP sink.
 * The kill test (tests/layout/) and `npm run scale` both bring it up with `startLayout`.
 */
import { mkdir, mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { pino } from "pino";
import { loadConfig } from "../../server/config.ts";
import { createDb, ensureDatabase, type Db } from "../../server/db/knex.ts";
import type { MediaStorage } from "../../server/media/media.storage.ts";
import { createMediaStorage } from "../../server/media/media.storage-choice.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { startMailSink, type MailSink } from "../../server/mail/mail.sink.ts";
import { seedAccounts } from "../../server/seed/accounts.seed.ts";
import { DEMO_USERS } from "../../server/seed/demo-users.ts";
import { seedFacility } from "../../server/seed/facility.seed.ts";
import { seedProgramme } from "../../server/seed/programme.seed.ts";
import { startFakeS3, type FakeS3 } from "./fake-s3.ts";
import { startGaleraCluster, type GaleraCluster } from "./galera.ts";
import { freePorts } from "./ports.ts";
import { startHaproxy, type Haproxy } from "./haproxy.ts";
import { startAppProcess, type AppProcess } from "./processes.ts";

export const LAYOUT_PASSWORD = "plumbline-layout-demo";
export const LAYOUT_PROJECT = "aldermere-phase-2";

export interface LayoutOptions {
  /** Where everything keeps its files (a new temporary folder when not given; removed on stop unless kept). */
  dir?: string;
  webs?: number;
  workers?: number;
  /** Settings for every app process beyond the layout's own. */
  env?: Record<string, string>;
  /** Progress lines (start-up steps and their seconds). */
  say?: (line: string) => void;
  keepFiles?: boolean;
}

export interface Layout {
  dir: string;
  /** The load balancer's address for the app, e.g. http://127.0.0.1:41234. */
  url: string;
  /** The application database through the load balancer (the single writer). */
  databaseUrl: string;
  /** A connection for the test's own checks, through the load balancer like the app's. */
  db: Db;
  cluster: GaleraCluster;
  haproxy: Haproxy;
  s3: FakeS3;
  /** The app's own view of the S3 store (the same settings), for checks. */
  s3Storage: MediaStorage & { close(): void };
  /** The SMTP sink, with its warnings and errors (JSON lines, the latest ones). */
  sink: MailSink & { log: string[] };
  webs: AppProcess[];
  workers: AppProcess[];
  /** The settings every app process runs with. */
  env: Record<string, string>;
  /** Starts (again) web process `i` on its port, or worker `i`. */
  startWeb(i: number): Promise<AppProcess>;
  startWorker(i: number): Promise<AppProcess>;
  stop(): Promise<void>;
}

export async function startLayout(opts: LayoutOptions = {}): Promise<Layout> {
  const say = opts.say ?? (() => {});
  const dir = opts.dir ?? (await mkdtemp(path.join(os.tmpdir(), "plumbline-layout-")));
  await mkdir(dir, { recursive: true });
  const timed = async <T>(what: string, step: () => Promise<T>): Promise<T> => {
    const t0 = Date.now();
    const v = await step();
    say(`${what}: ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    return v;
  };
  const cleanups: Array<() => Promise<unknown>> = [];
  const stopAll = async () => {
    for (const c of cleanups.splice(0).reverse()) await c().catch(() => {});
    if (!opts.dir && !opts.keepFiles) await rm(dir, { recursive: true, force: true });
  };
  try {
    const s3 = await timed("fake S3 store (s3rver)", () => startFakeS3({ dir: path.join(dir, "s3") }));
    cleanups.push(() => s3.close());
    const cluster = await timed("three-node Galera cluster, synced", () => startGaleraCluster({ dir: path.join(dir, "galera"), size: 3 }));
    cleanups.push(() => cluster.stop());
    const webPorts = await freePorts(opts.webs ?? 2);
    const haproxy = await timed("HAProxy (deploy/haproxy.cfg)", () =>
      startHaproxy({
        dir: path.join(dir, "haproxy"),
        webServers: webPorts.map((p) => `127.0.0.1:${p}`),
        dbServers: cluster.nodes.map((n) => `127.0.0.1:${n.port}`),
      }),
    );
    cleanups.push(() => haproxy.stop());
    const databaseUrl = cluster.appUrl("plumbline_layout", haproxy.dbPort);
    // The checks' own connection: a lost connection during a failover is expected, not news.
    const db = createDb(databaseUrl, { max: 4 }, pino({ level: "silent" }));
    cleanups.push(() => db.destroy());
    await timed("database migrated, demo accounts, programme and facility seeded through HAProxy", async () => {
      await ensureDatabase(databaseUrl);
      await migrateLatest(db);
      await seedAccounts(db, DEMO_USERS, LAYOUT_PASSWORD);
      if (!(await db("projects").where({ slug: LAYOUT_PROJECT }).first("id"))) {
        const [projectId] = await db("projects").insert({
          slug: LAYOUT_PROJECT,
          name: "Aldermere Campus, Phase 2",
          operator_name: "Kestrel Colocation",
          time_zone: "Europe/London",
          description: "The invented demo build, brought up on several processes.",
          currency: "GBP",
        });
        // The demo's programme and facility, so the public pages' API has the demo's work to do.
        const lead = (await db("users").where({ email: "lead@kestrel.example" }).first("id")) as { id: number };
        await seedProgramme(db, Number(projectId), { byUserId: Number(lead.id) });
        await seedFacility(db, Number(projectId), { byUserId: Number(lead.id) });
      }
    });
    // The sink stands in for a hosted provider; it records what it accepts in the database, as in `npm start`.
    // Its own pool, so the checks' probes never queue behind the messages it stores (eight at
    // once from the two workers), and its warnings kept for a failing scenario to print.
    const sinkDb = createDb(databaseUrl, { max: 10 }, pino({ level: "silent" }));
    cleanups.push(() => sinkDb.destroy());
    const sinkLog: string[] = [];
    const sinkLogger = pino({ level: "warn" }, { write: (line: string) => void (sinkLog.push(line.trim()) > 200 && sinkLog.splice(0, 100)) });
    const sink = Object.assign(await startMailSink({ db: sinkDb, logger: sinkLogger, host: "127.0.0.1", port: 0 }), { log: sinkLog });
    cleanups.push(() => sink.close());
    const url = `http://127.0.0.1:${haproxy.webPort}`;
    const env: Record<string, string> = {
      NODE_ENV: "production",
      DATABASE_URL: databaseUrl,
      SESSION_SECRET: "layout-secret-not-for-production-0123456789",
      PUBLIC_URL: url,
      // Plain HTTP on loopback: the cookie may not insist on HTTPS here (a real deployment terminates TLS at HAProxy).
      COOKIE_SECURE: "false",
      // HAProxy is the one hop in front (option forwardfor).
      TRUST_PROXY: "1",
      SMTP_URL: `smtp://127.0.0.1:${sink.port}`,
      MEDIA_DIR: path.join(dir, "media"),
      ...s3.env,
      SERVE_CLIENT: "false",
      SERVER_RENDER: "false",
      LOGIN_LIMIT_PER_IP: "100000",
      LOGIN_LIMIT_PER_ACCOUNT: "100000",
      DEMO_PASSWORD: LAYOUT_PASSWORD,
      ...opts.env,
    };
    const s3Storage = createMediaStorage(loadConfig(env));
    cleanups.push(async () => s3Storage.close());
    const logDir = path.join(dir, "logs");
    await mkdir(logDir, { recursive: true });
    const webs: AppProcess[] = [];
    const workers: AppProcess[] = [];
    const startWeb = async (i: number) => {
      const p = await startAppProcess({ name: `web${i + 1}`, role: "web", port: webPorts[i], env, logFile: path.join(logDir, `web${i + 1}.log`) });
      webs[i] = p;
      return p;
    };
    const startWorker = async (i: number) => {
      const p = await startAppProcess({ name: `worker${i + 1}`, role: "worker", env, logFile: path.join(logDir, `worker${i + 1}.log`) });
      workers[i] = p;
      return p;
    };
    cleanups.push(async () => {
      await Promise.all([...webs, ...workers].map((p) => p?.kill("SIGTERM")));
    });
    await timed(`${webPorts.length} web and ${opts.workers ?? 2} worker processes`, () =>
      Promise.all([...webPorts.map((_, i) => startWeb(i)), ...Array.from({ length: opts.workers ?? 2 }, (_, i) => startWorker(i))]),
    );
    await timed("HAProxy sees every web process up", () => haproxy.waitUp("web", webPorts.length, 20_000));
    return { dir, url, databaseUrl, db, cluster, haproxy, s3, s3Storage, sink, webs, workers, env, startWeb, startWorker, stop: stopAll };
  } catch (err) {
    await stopAll();
    throw err;
  }
}
