import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { testMediaDirFor } from "../../server/media/media.storage.ts";
import { startTestApp, type TestApp } from "../helpers/app.ts";
import { scheduledRun } from "../helpers/digests.ts";
import { createPhoto, createProject, postInput, signInAll } from "./posts-fixtures.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const SUBSCRIBERS = 150;

let t: TestApp;
const children: ChildProcess[] = [];
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  for (const c of children) if (c.exitCode === null) c.kill("SIGKILL");
  await t.close();
});

/**
 * A real digest sender: `PLUMBLINE_ROLE=worker PLUMBLINE_WORKERS=digest-sending node --import tsx server/index.ts`
 * against the test database and sink (only sending: the shared test database's other work is its tests' own).
 */
function startWorker(): ChildProcess {
  const databaseUrl = t.config.DATABASE_URL;
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: "test",
      PLUMBLINE_ROLE: "worker",
      PLUMBLINE_WORKERS: "digest-sending",
      DATABASE_URL: databaseUrl,
      SMTP_URL: `smtp://127.0.0.1:${t.sink.port}`,
      SESSION_SECRET: "test-secret-not-for-production-0123456789",
      PUBLIC_URL: t.config.PUBLIC_URL,
      LOG_LEVEL: "silent",
      MEDIA_DIR: testMediaDirFor(new URL(databaseUrl).pathname.slice(1)),
      DIGEST_SEND_RATE_PER_SECOND: "60",
      DIGEST_LEASE_SECONDS: "3",
    },
    stdio: ["ignore", "ignore", "pipe"],
  });
  children.push(child);
  return child;
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

describe("a worker killed mid-run", () => {
  it("loses nothing and sends nothing twice once restarted (SIGKILL, counted per recipient in the sink)", async () => {
    const as = await signInAll(t);
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const post = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id));
    await as.lead.agent.post(`/api/posts/${post.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    const tag = randomBytes(3).toString("hex");
    const emails = Array.from({ length: SUBSCRIBERS }, (_, i) => `kill-${tag}-${i}@example.org`);
    await t.db("subscribers").insert(emails.map((email, i) => ({ project_id: p.id, email, email_hash: hashAddress(email), name: `Reader ${i}`, interest: "prospect", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() })));
    const run = await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * 86_400_000));
    expect(run.created).toBe(true);
    const runId = run.id;
    const sentCount = async () => Number((await t.db("digest_deliveries").where({ run_id: runId, status: "sent" }).count({ n: "*" }).first())?.n);

    const first = startWorker();
    await until("a third of the run sent", async () => (await sentCount()) >= SUBSCRIBERS / 3);
    first.kill("SIGKILL");
    await new Promise((r) => first.once("exit", r));
    const atKill = await sentCount();
    expect(atKill).toBeLessThan(SUBSCRIBERS);

    const second = startWorker();
    const done = await until("the run to finish", async () => {
      const r = await t.db("digest_runs").where({ id: runId }).first("status");
      return r.status === "done" ? r : null;
    });
    second.kill("SIGTERM");
    expect(done.status).toBe("done");

    const perRecipient = await t.db("mail_recipients as r")
      .join("mail_messages as m", "m.id", "r.message_id")
      .where("r.address", "like", `kill-${tag}-%`)
      .groupBy("r.address")
      .select("r.address")
      .count({ n: "*" });
    expect(perRecipient).toHaveLength(SUBSCRIBERS);
    expect(perRecipient.filter((r) => Number(r.n) !== 1)).toEqual([]);
    expect(await sentCount()).toBe(SUBSCRIBERS);
    const summary = await as.lead.agent.get(`/api/digests/runs/${runId}`).expect(200);
    expect(summary.body.counts).toMatchObject({ total: SUBSCRIBERS, sent: SUBSCRIBERS, queued: 0, failed: 0 });
  }, 90_000);
});
