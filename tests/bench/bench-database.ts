import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { pino } from "pino";
import { loadConfig } from "../../server/config.ts";
import { createDb, dropDatabase } from "../../server/db/knex.ts";
import { createMailer } from "../../server/mail/mail.service.ts";
import { createPlumbline } from "../helpers/plumbline.ts";

/** A benchmark's own database (`plumbline_bench_<random>` beside DATABASE_URL's) and media folder. */
export interface BenchDatabase {
  databaseUrl: string;
  name: string;
  mediaDir: string;
}

/** Names the database and makes the media folder; stops the process when DATABASE_URL is not set. */
export function benchDatabase(): BenchDatabase {
  const base = process.env.DATABASE_URL;
  if (!base) {
    process.stderr.write("DATABASE_URL is not set (npm run bench provides it)\n");
    process.exit(1);
  }
  const url = new URL(base);
  url.pathname = `/plumbline_bench_${randomBytes(4).toString("hex")}`;
  return { databaseUrl: url.toString(), name: url.pathname.slice(1), mediaDir: mkdtempSync(path.join(tmpdir(), "plumbline-bench-media-")) };
}

/** Runs the benchmark, then drops its database and media folder (or says where they were kept), and exits. */
export async function runThenDrop(bench: BenchDatabase, opts: { keep: boolean; out: (s: string) => void }, main: () => Promise<void>): Promise<never> {
  try {
    await main();
  } finally {
    if (!opts.keep) {
      await dropDatabase(bench.databaseUrl);
      rmSync(bench.mediaDir, { recursive: true, force: true });
    } else {
      opts.out(`  kept ${bench.name} and ${bench.mediaDir}`);
    }
  }
  process.exit(0);
}

/**
 * The whole app over the bench database, nothing started: production settings unless `env`
 * says otherwise, silent logs, mail to a closed port. `stop()` closes what it opened.
 */
export function benchApp(bench: BenchDatabase, env: Record<string, string> = {}) {
  const config = loadConfig({
    NODE_ENV: "production",
    SESSION_SECRET: "bench-secret-not-for-production-0123456789",
    LOG_LEVEL: "silent",
    PUBLIC_URL: "http://plumbline.bench",
    SMTP_URL: "smtp://127.0.0.1:9",
    ...env,
    DATABASE_URL: bench.databaseUrl,
    MEDIA_DIR: bench.mediaDir,
  });
  const logger = pino({ level: "silent" });
  const db = createDb(bench.databaseUrl);
  const mailer = createMailer({ smtpUrl: "smtp://127.0.0.1:9", from: config.MAIL_FROM, mode: "smtp", logger });
  const plumbline = createPlumbline({ db, config, logger, mailer });
  return {
    config,
    db,
    plumbline,
    async stop() {
      await plumbline.close();
      mailer.close();
      // Let background sweeps started by the app finish their current query before the pool closes.
      await new Promise((r) => setTimeout(r, 500));
      await db.destroy();
    },
  };
}
