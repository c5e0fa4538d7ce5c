import { pino, type Logger } from "pino";
import pretty from "pino-pretty";

export type { Logger };

export type LogFormat = "json" | "pretty";

/**
 * JSON lines are for machines (a log collector, a pipe, production); a person at a terminal
 * reads one line per request. `LOG_FORMAT` overrides the guess either way.
 */
export function logFormat(o: { setting: "auto" | LogFormat; nodeEnv: string; isTTY: boolean }): LogFormat {
  if (o.setting !== "auto") return o.setting;
  return o.isTTY && o.nodeEnv !== "production" ? "pretty" : "json";
}

/** One line per request ("GET /api/projects/aldermere-phase-2 200 12 ms"); other lines keep their message. */
export function prettyMessage(log: Record<string, unknown>, messageKey: string): string {
  const req = log.req as { method?: string; url?: string } | undefined;
  const res = log.res as { statusCode?: number } | undefined;
  const message = String(log[messageKey] ?? "");
  if (!req?.method || !res) return message;
  const took = typeof log.responseTime === "number" ? ` ${Math.round(log.responseTime)} ms` : "";
  return `${req.method} ${req.url ?? ""} ${res.statusCode ?? ""}${took}${message && message !== "request completed" ? ` · ${message}` : ""}`;
}

export function createLogger(level: string, format: LogFormat = "json"): Logger {
  const options = {
    level,
    base: { app: "plumbline" },
    redact: {
      paths: ["req.headers.cookie", "req.headers.authorization", "req.headers['x-csrf-token']", "*.password"],
      remove: true,
    },
  };
  if (format === "json") return pino(options);
  // In this thread (not pino's transport worker), so a line is on screen before the process exits.
  return pino(options, pretty({ colorize: true, sync: true, translateTime: "SYS:HH:MM:ss", ignore: "pid,hostname,app,req,res,responseTime", messageFormat: prettyMessage }));
}
