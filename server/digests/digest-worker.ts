/**
 * A digest worker on its own: `node --import tsx server/digests/digest-worker.ts`. It plans
 * queued runs and sends deliveries from the shared queue in MariaDB (DATABASE_URL) through
 * SMTP_URL, or the local sink's port (SMTP_SINK_HOST/SMTP_SINK_PORT) when no relay is set.
 * Run as many as the provider's rate allows; a killed one loses nothing.
 */
import { createApp } from "../app.ts";
import { ConfigError, loadConfig } from "../config.ts";
import { createLogger } from "../core/logger.ts";
import { createDb } from "../db/knex.ts";
import { createMailer } from "../mail/mail.service.ts";

let config;
try {
  config = loadConfig();
} catch (err) {
  if (err instanceof ConfigError) {
    process.stderr.write(`${err.message}\n`);
    process.exit(78);
  }
  throw err;
}
const logger = createLogger(config.LOG_LEVEL);
const db = createDb(config.DATABASE_URL);
const mailer = createMailer({
  smtpUrl: config.SMTP_URL ?? `smtp://${config.SMTP_SINK_HOST}:${config.SMTP_SINK_PORT}`,
  from: config.MAIL_FROM,
  mode: config.mailMode,
  logger,
});
const plumbline = createApp({ db, config: { ...config, SERVE_CLIENT: false }, logger, mailer });
plumbline.digestJobs.start();
logger.info("digest worker started");

async function shutdown(signal: string) {
  logger.info({ signal }, "digest worker stopping");
  await plumbline.digestJobs.stop();
  plumbline.close();
  mailer.close();
  await db.destroy();
  process.exit(0);
}
process.on("SIGTERM", () => void shutdown("SIGTERM"));
process.on("SIGINT", () => void shutdown("SIGINT"));
