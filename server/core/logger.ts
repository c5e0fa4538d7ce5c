import { pino, type Logger } from "pino";

export type { Logger };

export function createLogger(level: string): Logger {
  return pino({
    level,
    base: { app: "plumbline" },
    redact: {
      paths: ["req.headers.cookie", "req.headers.authorization", "req.headers['x-csrf-token']", "*.password"],
      remove: true,
    },
  });
}
