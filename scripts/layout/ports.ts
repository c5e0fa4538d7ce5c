/**
 * Ports for servers the tests and the layout start themselves, chosen below the kernel's range
 * for outgoing connections. A port asked of the kernel (`listen(0)`) comes from that range, and
 * between the check and the server's own listen — or while a killed node or process is down,
 * before it starts again on the same port — an outgoing connection (a health check, a pool, a
 * test's request) can take it, and the start fails with EADDRINUSE. Below the range only another
 * listener can, and each port is checked by listening on it first.
 */
import { readFileSync } from "node:fs";
import net from "node:net";

/** Linux's range for outgoing connections' local ports; IANA's dynamic range elsewhere (RFC 6335 §6). */
export function outgoingPortRange(): [number, number] {
  try {
    const [lo, hi] = readFileSync("/proc/sys/net/ipv4/ip_local_port_range", "utf8").trim().split(/\s+/).map(Number);
    if (lo && hi && lo <= hi) return [lo, hi];
  } catch {
    // Not Linux: fall through.
  }
  return [49152, 65535];
}

const LOWEST = 10_000;

function listenOn(port: number): Promise<net.Server | null> {
  return new Promise((resolve) => {
    const s = net.createServer();
    s.once("error", () => resolve(null));
    s.listen({ port, host: "127.0.0.1", exclusive: true }, () => resolve(s));
  });
}

/** `count` different loopback ports nothing listens on, all held at once while chosen. */
export async function freePorts(count: number): Promise<number[]> {
  const [outgoingLow] = outgoingPortRange();
  const held: net.Server[] = [];
  const ports: number[] = [];
  try {
    for (let tries = 0; held.length < count && tries < count * 100 && outgoingLow - LOWEST > 1_000; tries += 1) {
      const port = LOWEST + Math.floor(Math.random() * (outgoingLow - LOWEST));
      if (ports.includes(port)) continue;
      const s = await listenOn(port);
      if (s) {
        held.push(s);
        ports.push(port);
      }
    }
    // A machine whose outgoing range starts low: ask the kernel for the rest.
    while (held.length < count) {
      const s = (await listenOn(0)) as net.Server;
      held.push(s);
      ports.push((s.address() as net.AddressInfo).port);
    }
    return ports;
  } finally {
    await Promise.all(held.map((s) => new Promise((resolve) => s.close(resolve))));
  }
}
