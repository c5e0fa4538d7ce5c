/**
 * Benchmark of digest sending: 10,000 confirmed subscribers, one weekly run through the
 * digest workers into a local SMTP sink, against raw nodemailer sending 10,000 ready-made
 * messages to the same sink. A plain script, not a test:
 *   npx tsx tests/bench/digests.bench.ts
 * Needs DATABASE_URL (npm run bench provides it); the bench database is its own
 * (`plumbline_bench_digests_<random>`), created and migrated here and dropped at the end.
 * Target: digest run time ≤ 2 × raw nodemailer time; duplicates 0.
 */
import { randomBytes } from "node:crypto";
import nodemailer, { type TransportOptions } from "nodemailer";
import { pino } from "pino";
import { createPlumbline } from "../helpers/plumbline.ts";
import { loadConfig } from "../../server/config.ts";
import { createDb, dropDatabase, ensureDatabase } from "../../server/db/knex.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { createMailer } from "../../server/mail/mail.service.ts";
import { startMailSink } from "../../server/mail/mail.sink.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";

const SUBSCRIBERS = 10_000;
const CONCURRENCY = 8;
const out = (s: string) => process.stdout.write(`${s}\n`);

const base = process.env.DATABASE_URL;
if (!base) {
  process.stderr.write("DATABASE_URL is not set (npm run bench provides it)\n");
  process.exit(1);
}
const url = new URL(base);
url.pathname = `/plumbline_bench_digests_${randomBytes(4).toString("hex")}`;
const databaseUrl = url.toString();

await ensureDatabase(databaseUrl);
const db = createDb(databaseUrl);
const logger = pino({ level: "silent" });
let failed = false;
try {
  await migrateLatest(db);
  const [projectId] = await db("projects").insert({ slug: "bench-campus", name: "Aldermere Campus, Phase 2 (bench)", operator_name: "Kestrel Colocation", postal_address: "1 Example Way, Aldermere (invented)", time_zone: "Europe/London", currency: "GBP" });
  await db("posts").insert({
    project_id: projectId,
    slug: "chillers-set",
    title: "All five chillers are on their plinths",
    summary: "The plant yard's chillers are set and piped; commissioning starts next.",
    body: "{}",
    html: "<p>Set and piped.</p>",
    plain_text: "Set and piped.",
    audience: "public",
    status: "published",
    author_name: "Bench",
    published_at: new Date(),
  });
  const rows = Array.from({ length: SUBSCRIBERS }, (_, i) => {
    const email = `reader-${i}@bench.example`;
    return { project_id: projectId, email, email_hash: hashAddress(email), name: `Reader ${i}`, interest: "prospect", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() };
  });
  for (let i = 0; i < rows.length; i += 1000) await db("subscribers").insert(rows.slice(i, i + 1000));
  out(`digests: ${SUBSCRIBERS.toLocaleString("en-GB")} confirmed subscribers in ${url.pathname.slice(1)}`);

  const sink = await startMailSink({ db, logger, host: "127.0.0.1", port: 0 });
  const config = loadConfig({ NODE_ENV: "production", SESSION_SECRET: "bench-secret-not-for-production-0123", DATABASE_URL: databaseUrl, PUBLIC_URL: "https://progress.kestrel.example", LOG_LEVEL: "silent", SERVE_CLIENT: "false" });
  const mailer = createMailer({ smtpUrl: `smtp://127.0.0.1:${sink.port}`, from: config.MAIL_FROM, mode: "local", logger });
  const app = createPlumbline({ db, config, logger, mailer });

  // 1. One weekly run: planning (one render), then the workers' claim, send and record.
  const t0 = performance.now();
  // The run the scheduler starts once this week has ended (staff cannot ask for a future `at`).
  const { id: runId, created } = await app.digests.createRun({ projectId: Number(projectId), frequency: "weekly", at: new Date(Date.now() + 7 * 86_400_000), timeZone: "Europe/London" });
  if (created) await app.digests.planRun(runId);
  const run = { id: runId };
  await app.digestJobs.drain();
  const digestMs = performance.now() - t0;
  const summary = await app.digests.summary(run.id);
  const renders = Number((await db("digest_contents").where({ run_id: run.id }).count({ n: "*" }).first())?.n);
  const sentIds = await db("mail_messages").max({ id: "id" }).first();

  // 2. Raw nodemailer: the same pooled transport settings, 10,000 ready-made messages.
  const content = await db("digest_contents").where({ run_id: run.id }).first("subject", "html", "text");
  const transport = nodemailer.createTransport({ url: `smtp://127.0.0.1:${sink.port}`, ignoreTLS: true, pool: true, maxConnections: 4 } as TransportOptions);
  const queue = Array.from({ length: SUBSCRIBERS }, (_, i) => i);
  const t1 = performance.now();
  await Promise.all(
    Array.from({ length: CONCURRENCY }, async () => {
      for (let i = queue.shift(); i !== undefined; i = queue.shift()) {
        await transport.sendMail({ from: config.MAIL_FROM, to: `raw-${i}@bench.example`, subject: content.subject, html: content.html, text: content.text });
      }
    }),
  );
  const rawMs = performance.now() - t1;
  transport.close();

  const dupes = await db("mail_recipients as r")
    .join("mail_messages as m", "m.id", "r.message_id")
    .where("m.id", "<=", Number(sentIds?.id ?? 0))
    .groupBy("r.address")
    .havingRaw("COUNT(*) > 1")
    .select("r.address");
  const reached = Number((await db("mail_recipients as r").join("mail_messages as m", "m.id", "r.message_id").where("m.id", "<=", Number(sentIds?.id ?? 0)).countDistinct({ n: "r.address" }).first())?.n);

  out(`  digest run:      ${(digestMs / 1000).toFixed(2)} s (${summary.counts.sent} sent, ${summary.counts.failed} failed, ${renders} render${renders === 1 ? "" : "s"})`);
  out(`  raw nodemailer:  ${(rawMs / 1000).toFixed(2)} s (${SUBSCRIBERS} ready-made messages)`);
  out(`  ratio:           ${(digestMs / rawMs).toFixed(2)} (target ≤ 2)`);
  out(`  duplicates:      ${dupes.length} (must be 0); recipients reached ${reached}`);
  if (dupes.length > 0 || summary.counts.sent !== SUBSCRIBERS || reached !== SUBSCRIBERS) failed = true;

  await app.close();
  mailer.close();
  await sink.close();
} finally {
  await db.destroy();
  await dropDatabase(databaseUrl);
}
if (failed) process.exit(1);
