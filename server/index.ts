/**
 * The entry point: config → logger → db → mail → services, then the roles that
 * PLUMBLINE_ROLE names: `web` (the HTTP app, listening on PORT), `worker` (the background
 * work, no listener at all) or `all` (both, the default). Signals stop what was started.
 */
import type { AddressInfo } from "node:net";
import { createServer, type Server } from "node:http";
import { createHttpApp } from "./app.ts";
import { ConfigError, loadConfig, type Config } from "./config.ts";
import { createLogger, logFormat } from "./core/logger.ts";
import { createDb } from "./db/knex.ts";
import { createMailer } from "./mail/mail.service.ts";
import { startMailSink, type MailSink } from "./mail/mail.sink.ts";
import { DEMO_USERS } from "./seed/demo-users.ts";
import { createServices } from "./services.ts";
import { createWorkers, type Workers } from "./workers.ts";

let config: Config;
try {
  config = loadConfig();
} catch (err) {
  if (err instanceof ConfigError) {
    process.stderr.write(`${err.message}\n`);
    process.exit(78); // EX_CONFIG
  }
  throw err;
}

const logger = createLogger(config.LOG_LEVEL, logFormat({ setting: config.LOG_FORMAT, nodeEnv: config.NODE_ENV, isTTY: Boolean(process.stdout.isTTY) }));
process.on("unhandledRejection", (reason) => logger.error({ err: reason }, "unhandled promise rejection"));
process.on("uncaughtException", (err) => {
  logger.fatal({ err }, "uncaught exception; stopping");
  process.exit(1);
});

const runsWeb = config.PLUMBLINE_ROLE !== "worker";
const runsWorkers = config.PLUMBLINE_ROLE !== "web";
const db = createDb(config.DATABASE_URL, {}, logger);
// The local sink is a listener, so only a web process starts it; a worker-only process sends to the sink at SMTP_SINK_HOST:SMTP_SINK_PORT.
let sink: MailSink | null = null;
if (config.mailMode === "local" && runsWeb) {
  sink = await startMailSink({ db, logger, host: config.SMTP_SINK_HOST, port: config.SMTP_SINK_PORT, refuseRecipients: config.sinkRefusePattern });
}
const mailer = createMailer({
  smtpUrl: config.SMTP_URL ?? (sink ? `smtp://${sink.host}:${sink.port}` : `smtp://${config.SMTP_SINK_HOST}:${config.SMTP_SINK_PORT}`),
  from: config.MAIL_FROM,
  mode: config.mailMode,
  logger,
});
const services = createServices({ db, config, logger, mailer });
let workers: Workers | null = null;
if (runsWorkers) {
  workers = createWorkers(services, { db, config, logger, mailer });
  await workers.start();
  logger.info({ role: config.PLUMBLINE_ROLE, tasks: workers.started }, "background work started");
}
const server = runsWeb ? listen() : null;

function listen(): Server {
  const http = createServer(createHttpApp(services, { db, config, logger }));
  http.listen(config.PORT, config.HOST, () => {
    const { port } = http.address() as AddressInfo;
    logger.info({ port, role: config.PLUMBLINE_ROLE }, "Plumbline listening");
    if (process.argv.includes("--banner")) printBanner(port);
  });
  return http;
}

function printBanner(port: number) {
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

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, "stopping: no new connections, finishing requests");
  const force = setTimeout(() => process.exit(1), 10_000);
  force.unref();
  if (server) {
    await new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
    });
  }
  await workers?.stop();
  services.close();
  mailer.close();
  await sink?.close();
  await db.destroy();
  logger.info("stopped");
  process.exit(0);
}
process.on("SIGTERM", () => void shutdown("SIGTERM"));
process.on("SIGINT", () => void shutdown("SIGINT"));
