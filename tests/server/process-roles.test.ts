import { spawn, type ChildProcess } from "node:child_process";
import { rmSync } from "node:fs";
import { connect } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { pino } from "pino";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { ConfigError, loadConfig, WORKER_TASKS } from "../../server/config.ts";
import { createDb, dropDatabase, ensureDatabase } from "../../server/db/knex.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { testMediaDirFor } from "../../server/media/media.storage.ts";
import { createServices } from "../../server/services.ts";
import { createWorkers } from "../../server/workers.ts";
import { createUser, freePort, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, postInput, type Client } from "./posts-fixtures.ts";

/*
 * PLUMBLINE_ROLE through real processes (`node --import tsx server/index.ts`). They run
 * against a database of their own, so a worker's clock-driven work (digest runs, scheduled
 * publication) touches only this file's rows, never the shared test database.
 */

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const SECRET = "test-secret-not-for-production-0123456789";

let databaseUrl: string;
let t: TestApp;
let lead: Client;
const children: ChildProcess[] = [];

beforeAll(async () => {
  const u = new URL(inject("databaseUrl"));
  u.pathname = `${u.pathname}_roles`;
  databaseUrl = u.toString();
  await ensureDatabase(databaseUrl);
  const db = createDb(databaseUrl, { max: 2 });
  try {
    await migrateLatest(db);
  } finally {
    await db.destroy();
  }
  t = await startTestApp({}, { databaseUrl });
  const u2 = await createUser(t, "lead");
  lead = await signIn(t, u2.email, u2.password);
}, 120_000);

afterAll(async () => {
  for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill("SIGKILL");
  await t?.close();
  if (databaseUrl) {
    await dropDatabase(databaseUrl);
    rmSync(testMediaDirFor(new URL(databaseUrl).pathname.slice(1)), { recursive: true, force: true });
  }
});

interface Running {
  child: ChildProcess;
  port: number;
  /** pino's JSON lines so far. */
  log: Array<{ msg: string; role?: string; tasks?: string[] }>;
  stderr: () => string;
  exited: Promise<number | null>;
}

/** server/index.ts in a role of its own, over this file's database, mail to the test sink. */
async function startPlumbline(role: "web" | "worker" | "all" | null, env: Record<string, string> = {}): Promise<Running> {
  const port = await freePort();
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: "test",
      DATABASE_URL: databaseUrl,
      SMTP_URL: `smtp://127.0.0.1:${t.sink.port}`,
      SESSION_SECRET: SECRET,
      PUBLIC_URL: t.config.PUBLIC_URL,
      LOG_LEVEL: "info",
      MEDIA_DIR: t.config.MEDIA_DIR,
      SERVE_CLIENT: "false",
      HOST: "127.0.0.1",
      PORT: String(port),
      PLUMBLINE_ROLE: role ?? "",
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  children.push(child);
  const log: Running["log"] = [];
  let rest = "";
  child.stdout!.on("data", (chunk: Buffer) => {
    const lines = (rest + chunk.toString("utf8")).split("\n");
    rest = lines.pop() ?? "";
    for (const line of lines) if (line.startsWith("{")) log.push(JSON.parse(line) as Running["log"][number]);
  });
  let stderr = "";
  child.stderr!.on("data", (chunk: Buffer) => (stderr += chunk.toString("utf8")));
  const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));
  return { child, port, log, stderr: () => stderr, exited };
}

async function until<T>(what: string, probe: () => Promise<T | null | false>, timeoutMs = 40_000): Promise<T> {
  const started = Date.now();
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() - started > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** "refused" when nothing listens on the port, "open" when something accepts. */
function tryConnect(port: number): Promise<"open" | "refused"> {
  return new Promise((resolve, reject) => {
    const socket = connect(port, "127.0.0.1");
    socket.once("connect", () => {
      socket.destroy();
      resolve("open");
    });
    socket.once("error", (err: NodeJS.ErrnoException) => (err.code === "ECONNREFUSED" ? resolve("refused") : reject(err)));
  });
}

const health = async (port: number) => {
  try {
    const res = await fetch(`http://127.0.0.1:${port}/api/health`);
    return res.status === 200 ? ((await res.json()) as unknown) : null;
  } catch {
    return null;
  }
};

const statusOf = async (id: number) => (await t.db("posts").where({ id }).first("status")).status as string;

/** A scheduled update whose time came a minute ago: only a scheduled-publication pass publishes it now. */
async function duePost(): Promise<number> {
  const p = await createProject(t);
  const cover = await createPhoto(t, p.id);
  const res = await lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", lead.csrf).send(postInput(cover.id));
  expect(res.status).toBe(201);
  const id = res.body.id as number;
  await lead.agent.post(`/api/posts/${id}/schedule`).set("X-CSRF-Token", lead.csrf).send({ at: "2031-01-05T10:00:00+00:00" }).expect(200);
  // The API refuses a time in the past, so the clock is moved on for this row instead.
  await t.db("posts").where({ id }).update({ scheduled_for: new Date(Date.now() - 60_000) });
  expect(await statusOf(id)).toBe("scheduled");
  return id;
}

async function stop(p: Running): Promise<number | null> {
  p.child.kill("SIGTERM");
  return p.exited;
}

describe("PLUMBLINE_ROLE=worker", () => {
  it("does the background work (publishes a due update) and answers no HTTP on PORT", async () => {
    const id = await duePost();
    const worker = await startPlumbline("worker");
    await until("the worker to publish the due update", async () => (await statusOf(id)) === "published");
    expect(worker.child.exitCode).toBeNull();
    expect(await tryConnect(worker.port)).toBe("refused");
    expect(worker.log.find((l) => l.msg === "background work started")?.tasks).toEqual([...WORKER_TASKS]);
    expect(worker.log.some((l) => l.msg === "Plumbline listening")).toBe(false);
    expect(await stop(worker)).toBe(0);
  }, 60_000);
});

describe("PLUMBLINE_ROLE=web", () => {
  it("serves HTTP and publishes nothing on its own: a due update is still scheduled after the process has run and stopped", async () => {
    const id = await duePost();
    const web = await startPlumbline("web");
    expect(await until("the web process to answer", () => health(web.port))).toEqual({ ok: true, db: "up" });
    // A started ticker makes its first pass at once and shutdown waits for it, so after a clean exit a
    // web process that ran scheduled publication would have published the update.
    expect(await stop(web)).toBe(0);
    expect(await statusOf(id)).toBe("scheduled");
    expect(web.log.some((l) => l.msg === "background work started")).toBe(false);
    expect(web.log.find((l) => l.msg === "Plumbline listening")?.role).toBe("web");
    // The same row, with a worker: it was due all along.
    const worker = await startPlumbline("worker", { PLUMBLINE_WORKERS: "publishing" });
    await until("a worker to publish the update", async () => (await statusOf(id)) === "published");
    expect(await stop(worker)).toBe(0);
  }, 60_000);
});

describe("PLUMBLINE_ROLE unset (all, as npm start runs it)", () => {
  it("serves HTTP and publishes a due update", async () => {
    const id = await duePost();
    const all = await startPlumbline(null);
    expect(await until("the process to answer", () => health(all.port))).toEqual({ ok: true, db: "up" });
    await until("the process to publish the due update", async () => (await statusOf(id)) === "published");
    expect(all.log.find((l) => l.msg === "Plumbline listening")?.role).toBe("all");
    expect(await stop(all)).toBe(0);
  }, 60_000);
});

describe("PLUMBLINE_ROLE and PLUMBLINE_WORKERS are checked at start-up", () => {
  it("a role that does not exist stops the process with exit 78 and the readable list", async () => {
    const p = await startPlumbline("web", { PLUMBLINE_ROLE: "both" });
    expect(await p.exited).toBe(78);
    expect(p.stderr()).toContain("PLUMBLINE_ROLE must be all, web or worker");
  }, 30_000);

  it("names every bad variable, and reads all and every kind of work by default", () => {
    const base = { DATABASE_URL: "mysql://u:p@127.0.0.1:3306/x", SESSION_SECRET: SECRET };
    expect(loadConfig(base)).toMatchObject({ PLUMBLINE_ROLE: "all", PLUMBLINE_WORKERS: [...WORKER_TASKS] });
    expect(loadConfig({ ...base, PLUMBLINE_WORKERS: " publishing , sweeps,publishing" }).PLUMBLINE_WORKERS).toEqual(["publishing", "sweeps"]);
    let err: unknown;
    try {
      loadConfig({ ...base, PLUMBLINE_ROLE: "workers", PLUMBLINE_WORKERS: "digests" });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ConfigError);
    expect((err as ConfigError).problems).toEqual([
      "PLUMBLINE_ROLE must be all, web or worker",
      `PLUMBLINE_WORKERS must be a comma-separated list of ${WORKER_TASKS.join(", ")}`,
    ]);
  });
});

describe("the workers object", () => {
  const build = (env: Record<string, string>) => {
    const config = loadConfig({ DATABASE_URL: databaseUrl, SESSION_SECRET: SECRET, LOG_LEVEL: "silent", MEDIA_DIR: t.config.MEDIA_DIR, ...env });
    const deps = { db: t.db, config, logger: pino({ level: "silent" }), mailer: t.mailer };
    return createWorkers(createServices(deps), deps);
  };

  it("building it starts nothing; start runs only the work PLUMBLINE_WORKERS names, stop stops it", async () => {
    const workers = build({ PLUMBLINE_WORKERS: "sweeps,publishing" });
    expect(workers.started).toEqual([]);
    await workers.start();
    try {
      expect(workers.started).toEqual(["publishing", "sweeps"]);
    } finally {
      await workers.stop();
    }
    expect(workers.started).toEqual([]);
  });

  it("leaves digest sending to other processes when DIGEST_WORKERS=0", async () => {
    const workers = build({ PLUMBLINE_WORKERS: "digest-runs,digest-sending", DIGEST_WORKERS: "0" });
    await workers.start();
    try {
      expect(workers.started).toEqual(["digest-runs"]);
    } finally {
      await workers.stop();
    }
  });
});
