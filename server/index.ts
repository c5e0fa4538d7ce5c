import type { AddressInfo } from "node:net";
import { createServer } from "node:http";
import { createApp } from "./app.ts";
import { ConfigError, loadConfig } from "./config.ts";
import { createLogger } from "./core/logger.ts";
import { createDb } from "./db/knex.ts";
import { createMailer } from "./mail/mail.service.ts";
import { startMailSink, type MailSink } from "./mail/mail.sink.ts";
import { DEMO_USERS } from "./seed/demo-users.ts";

let config;
try {
  config = loadConfig();
} catch (err) {
  if (err instanceof ConfigError) {
    process.stderr.write(`${err.message}\n`);
    process.exit(78); // EX_CONFIG
  }
  throw err;
}

const logger = createLogger(config.LOG_LEVEL);
process.on("unhandledRejection", (reason) => logger.error({ err: reason }, "unhandled promise rejection"));
process.on("uncaughtException", (err) => {
  logger.fatal({ err }, "uncaught exception; stopping");
  process.exit(1);
});

const db = createDb(config.DATABASE_URL);
let sink: MailSink | null = null;
if (config.mailMode === "local") {
  sink = await startMailSink({ db, logger, host: config.SMTP_SINK_HOST, port: config.SMTP_SINK_PORT, refuseRecipients: config.sinkRefusePattern });
}
const mailer = createMailer({
  smtpUrl: config.SMTP_URL ?? `smtp://${sink!.host}:${sink!.port}`,
  from: config.MAIL_FROM,
  mode: config.mailMode,
  logger,
});
const plumbline = createApp({ db, config, logger, mailer });
const server = createServer(plumbline.app);
// Sweeps what a crash left (temporary files, jobs whose lease ran out), then processes photos.
await plumbline.mediaJobs.start();
// Scheduled posts: every process may tick; the claim is safe across processes.
plumbline.publishing.start();
// Digests: every process may create due runs (one per period); sending is a shared queue.
plumbline.digestSchedule.start();
if (config.DIGEST_WORKERS > 0) plumbline.digestJobs.start();
server.listen(config.PORT, config.HOST, () => {
  const { port } = server.address() as AddressInfo;
  logger.info({ port }, "Plumbline listening");
  if (process.argv.includes("--banner")) {
    const url = config.PUBLIC_URL.includes(`:${config.PORT}`) ? config.PUBLIC_URL.replace(`:${config.PORT}`, `:${port}`) : config.PUBLIC_URL;
    const lines = [
      "",
      `  Plumbline is up: ${url}`,
      `  Demo project:    ${url}/projects/aldermere-phase-2`,
      `  Site office:     ${url}/office    Investor room: ${url}/investors`,
      `  Mail:            ${config.mailMode === "local" ? `local sink on ${sink!.host}:${sink!.port} (read it in the site office's Outbox)` : "SMTP_URL relay"}`,
      "",
      "  Demo sign-ins (password for each):",
      ...DEMO_USERS.map((u) => `    ${u.role.padEnd(10)} ${u.email.padEnd(30)} ${config.DEMO_PASSWORD}`),
      "",
      "  Ctrl-C stops Plumbline and its private MariaDB; the data stays in DATA_DIR.",
      "",
    ];
    process.stdout.write(lines.join("\n") + "\n");
  }
});

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, "stopping: no new connections, finishing requests");
  const force = setTimeout(() => process.exit(1), 10_000);
  force.unref();
  await new Promise<void>((resolve) => {
    server.close(() => resolve());
    server.closeIdleConnections();
  });
  await plumbline.mediaJobs.stop();
  await plumbline.publishing.stop();
  await plumbline.digestJobs.stop();
  plumbline.close();
  mailer.close();
  await sink?.close();
  await db.destroy();
  logger.info("stopped");
  process.exit(0);
}
process.on("SIGTERM", () => void shutdown("SIGTERM"));
process.on("SIGINT", () => void shutdown("SIGINT"));
