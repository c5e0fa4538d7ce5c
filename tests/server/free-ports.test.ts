import net from "node:net";
import { describe, expect, it } from "vitest";
import { freePorts, outgoingPortRange } from "../../scripts/layout/ports.ts";

describe("ports for the servers the tests start", () => {
  it("are different, below the range outgoing connections take theirs from, and free to listen on", async () => {
    const [low] = outgoingPortRange();
    const ports = await freePorts(12);
    expect(new Set(ports).size).toBe(12);
    for (const p of ports) {
      expect(p).toBeGreaterThanOrEqual(10_000);
      expect(p).toBeLessThan(low);
    }
    const servers = await Promise.all(ports.map((port) => new Promise<net.Server>((resolve, reject) => {
      const s = net.createServer();
      s.once("error", reject);
      s.listen(port, "127.0.0.1", () => resolve(s));
    })));
    await Promise.all(servers.map((s) => new Promise((r) => s.close(r))));
  });
});
