import { describe, expect, it } from "vitest";
import { loadConfig } from "../../server/config.ts";
import { createLogger, logFormat, prettyMessage } from "../../server/core/logger.ts";

describe("the log format", () => {
  it("is readable lines on a terminal outside production", () => {
    expect(logFormat({ setting: "auto", nodeEnv: "development", isTTY: true })).toBe("pretty");
    expect(logFormat({ setting: "auto", nodeEnv: "test", isTTY: true })).toBe("pretty");
  });

  it("is JSON lines when the output is not a terminal (a pipe, a collector) or in production", () => {
    expect(logFormat({ setting: "auto", nodeEnv: "development", isTTY: false })).toBe("json");
    expect(logFormat({ setting: "auto", nodeEnv: "production", isTTY: true })).toBe("json");
  });

  it("LOG_FORMAT decides over the guess either way", () => {
    expect(logFormat({ setting: "json", nodeEnv: "development", isTTY: true })).toBe("json");
    expect(logFormat({ setting: "pretty", nodeEnv: "production", isTTY: false })).toBe("pretty");
  });

  it("LOG_FORMAT is read from the environment, auto by default, and a wrong value is refused", () => {
    const base = { DATABASE_URL: "mysql://u:p@127.0.0.1:3306/x", SESSION_SECRET: "test-secret-not-for-production-0123456789" };
    expect(loadConfig(base).LOG_FORMAT).toBe("auto");
    expect(loadConfig({ ...base, LOG_FORMAT: "json" }).LOG_FORMAT).toBe("json");
    expect(() => loadConfig({ ...base, LOG_FORMAT: "xml" })).toThrow(/LOG_FORMAT/);
  });

  it("both formats make a working logger with the same level", () => {
    for (const format of ["json", "pretty"] as const) {
      const logger = createLogger("warn", format);
      expect(logger.level).toBe("warn");
      expect(logger.isLevelEnabled("info")).toBe(false);
    }
  });

  it("on a terminal a request is one readable line; other lines keep their message", () => {
    expect(prettyMessage({ msg: "request completed", req: { method: "GET", url: "/api/projects/aldermere-phase-2" }, res: { statusCode: 200 }, responseTime: 12.4 }, "msg")).toBe("GET /api/projects/aldermere-phase-2 200 12 ms");
    expect(prettyMessage({ msg: "request errored", req: { method: "POST", url: "/api/posts" }, res: { statusCode: 500 }, responseTime: 3 }, "msg")).toBe("POST /api/posts 500 3 ms · request errored");
    expect(prettyMessage({ msg: "Plumbline listening", port: 3000 }, "msg")).toBe("Plumbline listening");
  });
});
