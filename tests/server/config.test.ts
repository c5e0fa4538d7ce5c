import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { ConfigError, loadConfig } from "../../server/config.ts";

const good = { DATABASE_URL: "mysql://u:p@127.0.0.1:3307/plumbline", SESSION_SECRET: "0123456789abcdef0123" };

describe("configuration", () => {
  it("parses a good environment with defaults", () => {
    const c = loadConfig(good);
    expect(c.PORT).toBe(3000);
    expect(c.mailMode).toBe("local");
    expect(c.PUBLIC_URL).toBe("http://localhost:3000");
    expect(Object.isFrozen(c)).toBe(true);
  });

  it("names every bad variable at once", () => {
    let err: unknown;
    try {
      loadConfig({ ...good, PORT: "eighty", SMTP_URL: "http://nope", SESSION_SECRET: "short" });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ConfigError);
    const msg = (err as Error).message;
    expect(msg).toMatch(/PORT/);
    expect(msg).toMatch(/SMTP_URL/);
    expect(msg).toMatch(/SESSION_SECRET/);
  });

  it("switches to relay mode when SMTP_URL is set", () => {
    expect(loadConfig({ ...good, SMTP_URL: "smtps://user:pw@relay.example:465" }).mailMode).toBe("smtp");
  });

  it("a bad variable stops the real server start-up with its name in the message", () => {
    const r = spawnSync(process.execPath, ["--import", "tsx", "server/index.ts"], {
      env: { PATH: process.env.PATH ?? "", ...good, PORT: "not-a-port" },
      encoding: "utf8",
      timeout: 30_000,
    });
    expect(r.status).toBe(78);
    expect(r.stderr).toMatch(/PORT/);
    expect(r.stderr).not.toMatch(/at .*\.ts:\d+/); // a readable list, not a stack trace
  });
});
