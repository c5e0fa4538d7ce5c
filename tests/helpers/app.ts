import type { AddressInfo } from "node:net";
import { createServer, type Server } from "node:http";
import { inject } from "vitest";
import request from "supertest";
import type TestAgent from "supertest/lib/agent.js";
import { pino } from "pino";
import { createPlumbline, type PlumblineApp } from "./plumbline.ts";
import { loadConfig, type Config } from "../../server/config.ts";
import { createDb, type Db } from "../../server/db/knex.ts";
import { createMailer, type Mailer } from "../../server/mail/mail.service.ts";
import { startMailSink, type MailSink } from "../../server/mail/mail.sink.ts";
import { hashPassword } from "../../server/auth/passwords.ts";
import { testMediaDirFor } from "../../server/media/media.storage.ts";
import { freePorts } from "../../scripts/layout/ports.ts";
import type { Role } from "../../src/shared/schemas/common.ts";

export const DEMO_PASSWORD = process.env.DEMO_PASSWORD || "plumbline-demo";
export const DEMO = {
  admin: "admin@kestrel.example",
  lead: "lead@kestrel.example",
  marketing: "marketing@kestrel.example",
  investor: "investor@harbourfund.example",
} as const;

export interface TestApp {
  plumbline: PlumblineApp;
  db: Db;
  config: Config;
  mailer: Mailer;
  sink: MailSink;
  /** Set when started with `listen: true` (browser tests). */
  baseUrl: string | null;
  /** Runs the queued photo-processing jobs in this process until none is left; how many ran. */
  drainMediaJobs(): Promise<number>;
  close(): Promise<void>;
}

/** A port nothing listens on at the moment of asking, below the range outgoing connections take theirs from. */
export async function freePort(): Promise<number> {
  const [port] = await freePorts(1);
  return port as number;
}

/** The real app over the test project's MariaDB and a real SMTP sink on a free port. */
export async function startTestApp(env: Record<string, string> = {}, opts: { listen?: boolean; mediaWorker?: boolean; databaseUrl?: string } = {}): Promise<TestApp> {
  // Another database than the run's shared one, for tests whose own processes must touch nothing else.
  const databaseUrl = opts.databaseUrl ?? inject("databaseUrl");
  // A listening app knows its port up front, so links and absolute image URLs in e-mail reach it.
  const port = opts.listen ? await freePort() : null;
  const config = loadConfig({
    NODE_ENV: "test",
    SESSION_SECRET: "test-secret-not-for-production-0123456789",
    LOGIN_LIMIT_PER_IP: "100000",
    LOGIN_LIMIT_PER_ACCOUNT: "100000",
    // Lifted as the sign-in limits are: tests/server/press-kits.test.ts tries the real one from addresses of its own.
    PRESS_KIT_LIMIT_PER_IP: "100000",
    // TEST_LOG_LEVEL=error shows the server's own error lines when a run must be traced.
    LOG_LEVEL: process.env.TEST_LOG_LEVEL ?? "silent",
    PUBLIC_URL: port ? `http://127.0.0.1:${port}` : "http://plumbline.test",
    SMTP_SINK_PORT: "0",
    // Shared with the demo seed of this test database, never the repository's media/.
    MEDIA_DIR: testMediaDirFor(new URL(databaseUrl).pathname.slice(1)),
    // The server-s3 project runs the same tests with the stored files in a fake S3 bucket (tests/setup/global-s3.ts).
    ...(process.env.TEST_MEDIA_STORE === "s3" ? inject("mediaS3Env") : {}),
    ...env,
    DATABASE_URL: databaseUrl,
  });
  const logger = pino({ level: config.LOG_LEVEL });
  const db = createDb(databaseUrl);
  const sink = await startMailSink({ db, logger, host: "127.0.0.1", port: 0, refuseRecipients: config.sinkRefusePattern });
  const mailer = createMailer({ smtpUrl: `smtp://127.0.0.1:${sink.port}`, from: config.MAIL_FROM, mode: "local", logger });
  const plumbline = createPlumbline({ db, config, logger, mailer });
  // Server tests drain the photo jobs themselves; browser tests want the worker running.
  if (opts.mediaWorker) await plumbline.mediaJobs.start();
  let server: Server | null = null;
  let baseUrl: string | null = null;
  if (opts.listen) {
    server = createServer(plumbline.app);
    await new Promise<void>((resolve) => server!.listen(port!, "127.0.0.1", () => resolve()));
    baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  }
  return {
    plumbline,
    db,
    config,
    mailer,
    sink,
    baseUrl,
    drainMediaJobs: () => plumbline.mediaJobs.drain(),
    async close() {
      if (server) await new Promise<void>((resolve) => server!.close(() => resolve()));
      await plumbline.mediaJobs.stop();
      await plumbline.close();
      mailer.close();
      await sink.close();
      await db.destroy();
    },
  };
}

export type Agent = InstanceType<typeof TestAgent>;

/** A cookie-keeping client that has fetched its CSRF token; `csrf` goes in X-CSRF-Token. */
export async function newClient(t: TestApp): Promise<{ agent: Agent; csrf: string }> {
  const agent = request.agent(t.plumbline.app);
  const res = await agent.get("/api/auth/csrf").expect(200);
  return { agent, csrf: res.body.token as string };
}

export async function signIn(t: TestApp, email: string, password = DEMO_PASSWORD) {
  const c = await newClient(t);
  await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email, password }).expect(200);
  return c;
}

let seq = 0;
/** A fresh user of its own for tests that change or disable accounts. */
export async function createUser(t: TestApp, role: Role, password = "a-long-test-password-42") {
  seq += 1;
  const email = `${role}-${Date.now().toString(36)}-${seq}@test.example`;
  const [id] = await t.db("users").insert({ email, name: `Test ${role} ${seq}`, role, password_hash: await hashPassword(password) });
  return { id: Number(id), email, password, role };
}

/** Waits until the sink has stored a message for `to` newer than `afterId`. */
export async function waitForMail(t: TestApp, to: string, afterId = 0, timeoutMs = 5000) {
  const started = Date.now();
  for (;;) {
    const row = await t.db("mail_messages as m")
      .join("mail_recipients as r", "r.message_id", "m.id")
      .where("r.address", to.toLowerCase())
      .andWhere("m.id", ">", afterId)
      .orderBy("m.id", "desc")
      .first("m.id", "m.text", "m.html", "m.subject");
    if (row) return { id: Number(row.id), text: String(row.text), html: String(row.html), subject: String(row.subject) };
    if (Date.now() - started > timeoutMs) throw new Error(`no mail for ${to} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

export async function lastMailId(t: TestApp): Promise<number> {
  const r = await t.db("mail_messages").max({ id: "id" }).first();
  return Number(r?.id ?? 0);
}
