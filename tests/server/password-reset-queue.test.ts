import { createServer, connect, type Server, type Socket } from "node:net";
import type { AddressInfo } from "node:net";
import { Writable } from "node:stream";
import { pino } from "pino";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createMailer, type Mailer } from "../../server/mail/mail.service.ts";
import { createUser, lastMailId, newClient, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";
import { createPlumbline, type PlumblineApp } from "../helpers/plumbline.ts";

/**
 * An SMTP gate between the app and the real sink: it accepts connections and holds them
 * (no greeting, so nothing can be handed over) until released, then joins each to the sink;
 * or it drops them, as a relay that is down.
 */
async function startGate(sinkPort: number, mode: "hold" | "drop") {
  const held: Socket[] = [];
  let released = false;
  let onConnection: (() => void) | null = null;
  const join = (s: Socket) => {
    const upstream = connect(sinkPort, "127.0.0.1");
    s.pipe(upstream).pipe(s);
    upstream.on("error", () => s.destroy());
    s.on("error", () => upstream.destroy());
  };
  const server: Server = createServer((s) => {
    onConnection?.();
    if (mode === "drop") return s.destroy();
    if (released) return join(s);
    held.push(s);
    s.on("error", () => undefined);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  const connected = new Promise<void>((resolve) => (onConnection = resolve));
  return {
    port: (server.address() as AddressInfo).port,
    /** Resolves when the app's mailer has opened a connection. */
    connected,
    heldCount: () => held.length,
    release() {
      released = true;
      for (const s of held.splice(0)) join(s);
    },
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of held.splice(0)) s.destroy();
        server.close(() => resolve());
      }),
  };
}

/** A second app over the same database and sink, whose mail goes through `gatePort`; its log lines are kept. */
function appThrough(t: TestApp, gatePort: number) {
  const lines: Array<{ level: number; msg: string }> = [];
  const sinkStream = new Writable({
    write(chunk: Buffer, _enc, cb) {
      for (const line of chunk.toString("utf8").split("\n").filter(Boolean)) lines.push(JSON.parse(line) as { level: number; msg: string });
      cb();
    },
  });
  const logger = pino({ level: "error" }, sinkStream);
  const mailer: Mailer = createMailer({ smtpUrl: `smtp://127.0.0.1:${gatePort}`, from: t.config.MAIL_FROM, mode: "local", logger });
  const plumbline: PlumblineApp = createPlumbline({ db: t.db, config: t.config, logger, mailer });
  return { plumbline, mailer, lines };
}

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

describe("POST /api/auth/password-reset answers before the mail is handed over", () => {
  it("for a known address, 202 comes back while the SMTP server has not even greeted; the link arrives once it does", async () => {
    const gate = await startGate(t.sink.port, "hold");
    const app = appThrough(t, gate.port);
    try {
      const u = await createUser(t, "lead");
      const before = await lastMailId(t);
      const c = await newClient({ ...t, plumbline: app.plumbline });
      const known = await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email: u.email });
      expect(known.status).toBe(202);
      const unknown = await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email: "nobody-here@kestrel.example" });
      expect(unknown.status).toBe(202);
      expect(known.body).toEqual(unknown.body);
      // The mailer is at the gate, held: the answer above did not wait for it.
      await gate.connected;
      expect(gate.heldCount()).toBeGreaterThan(0);
      expect(await t.db("mail_recipients").where({ address: u.email }).first()).toBeUndefined();
      gate.release();
      const mail = await waitForMail(t, u.email, before);
      expect(mail.text).toMatch(/\/reset-password\/[A-Za-z0-9_-]{43}/);
    } finally {
      app.mailer.close();
      await app.plumbline.close();
      await gate.close();
    }
  });

  it("when the hand-off fails, the error is logged (not thrown at the caller, not unhandled) and the answer is the same 202", async () => {
    const gate = await startGate(t.sink.port, "drop");
    const app = appThrough(t, gate.port);
    try {
      const u = await createUser(t, "marketing");
      const c = await newClient({ ...t, plumbline: app.plumbline });
      const res = await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email: u.email });
      expect(res.status).toBe(202);
      await gate.connected;
      for (let i = 0; i < 100 && !app.lines.some((l) => l.msg === "the password reset link could not be sent"); i++) await new Promise((r) => setTimeout(r, 50));
      expect(app.lines.map((l) => l.msg)).toContain("the password reset link could not be sent");
    } finally {
      app.mailer.close();
      await app.plumbline.close();
      await gate.close();
    }
  });
});
