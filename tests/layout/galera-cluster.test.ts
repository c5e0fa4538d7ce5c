// The replicated database and the load balancer of the several-machine layout (decision 067):
// Debian's mariadb-server with galera-4 as three nodes on loopback, and Debian's HAProxy run with
// the repository's deploy/haproxy.cfg in front of them and of two small web processes.
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Knex } from "knex";
import mysql from "mysql2/promise";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, ensureDatabase } from "../../server/db/knex.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { startGaleraCluster, waitFor, type GaleraCluster } from "../../scripts/layout/galera.ts";
import { freePorts } from "../../scripts/layout/ports.ts";
import { startHaproxy, type Haproxy } from "../../scripts/layout/haproxy.ts";

const DATABASE = "plumbline_layout_galera";

// A stand-in web process: answers /api/health as the app does, and names itself.
const WEB_PROCESS = `
const http = require("node:http");
const [port, name] = process.argv.slice(1);
http.createServer((req, res) => {
  res.setHeader("content-type", "application/json");
  res.end(JSON.stringify(req.url === "/api/health" ? { status: "ok" } : { name }));
}).listen(Number(port), "127.0.0.1", () => process.send && process.send("listening"));
`;

function startWebProcess(port: number, name: string): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ["-e", WEB_PROCESS, String(port), name], { stdio: ["ignore", "ignore", "inherit", "ipc"] });
    child.once("message", () => resolve(child));
    child.once("error", reject);
  });
}

/** The port of the node a fresh connection through HAProxy reaches. */
async function portThroughLb(url: string): Promise<number> {
  const conn = await mysql.createConnection({ uri: url, connectTimeout: 3000 });
  try {
    const [rows] = await conn.query("SELECT @@port AS port");
    return Number((rows as Array<{ port: number }>)[0]?.port);
  } finally {
    await conn.end().catch(() => undefined);
  }
}

let dir = "";
let cluster: GaleraCluster;
let haproxy: Haproxy;
let db: Knex;
let url = "";
let webs: ChildProcess[] = [];
let startSeconds = 0;

beforeAll(async () => {
  dir = mkdtempSync(path.join(os.tmpdir(), "plumbline-galera-"));
  const t0 = Date.now();
  cluster = await startGaleraCluster({ dir: path.join(dir, "galera"), size: 3 });
  startSeconds = (Date.now() - t0) / 1000;
  console.log(`galera: three nodes Synced in ${startSeconds.toFixed(1)} s`);
  const webPorts = await freePorts(2);
  webs = await Promise.all(webPorts.map((port, i) => startWebProcess(port, `web${i + 1}`)));
  haproxy = await startHaproxy({
    dir: path.join(dir, "haproxy"),
    webServers: webPorts.map((port) => `127.0.0.1:${port}`),
    dbServers: cluster.nodes.map((n) => `127.0.0.1:${n.port}`),
  });
  await haproxy.waitUp("db", 3, 20_000);
  await haproxy.waitUp("web", 2, 20_000);
  url = cluster.appUrl(DATABASE, haproxy.dbPort);
  await ensureDatabase(url);
  db = createDb(url, { max: 4 });
});

afterAll(async () => {
  await db?.destroy();
  for (const web of webs) web.kill("SIGKILL");
  await haproxy?.stop();
  await cluster?.stop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe("a three-node Galera cluster behind HAProxy (deploy/haproxy.cfg)", () => {
  it("starts three nodes that each see a Synced cluster of three, with interleaved auto-increments", async () => {
    const states = await Promise.all(cluster.nodes.map((n) => n.status()));
    expect(states).toEqual(cluster.nodes.map(() => ({ clusterSize: 3, localState: "Synced", ready: true })));
    // Source: MariaDB Galera Cluster documentation, wsrep_auto_increment_control (on by default): each
    // node's auto_increment_increment is the cluster size and its offset its own, so two nodes never
    // hand out the same id. "Synced" and wsrep_ready: the wsrep status variables of the same documentation.
    const steps = await Promise.all(cluster.nodes.map((n) => cluster.rootQuery<{ inc: number; off: number }>(n.index, "SELECT @@auto_increment_increment AS inc, @@auto_increment_offset AS off")));
    expect(steps.map((r) => Number(r[0]?.inc))).toEqual([3, 3, 3]);
    expect(new Set(steps.map((r) => Number(r[0]?.off))).size).toBe(3);
  });

  it("runs the repository's migrations through HAProxy, and every table has a primary key", async () => {
    await migrateLatest(db);
    // Galera replicates a row by its key: a table without one is refused writes (or replicated
    // by scanning), so none may be without.
    const rows = (await db.raw(
      `SELECT t.TABLE_NAME AS name FROM information_schema.TABLES t
         LEFT JOIN information_schema.TABLE_CONSTRAINTS c
           ON c.TABLE_SCHEMA = t.TABLE_SCHEMA AND c.TABLE_NAME = t.TABLE_NAME AND c.CONSTRAINT_TYPE = 'PRIMARY KEY'
        WHERE t.TABLE_SCHEMA = ? AND t.TABLE_TYPE = 'BASE TABLE' AND c.CONSTRAINT_NAME IS NULL
        ORDER BY t.TABLE_NAME`,
      [DATABASE],
    )) as [Array<{ name: string }>, unknown];
    const tables = (await db.raw("SELECT COUNT(*) AS n FROM information_schema.TABLES WHERE TABLE_SCHEMA = ?", [DATABASE])) as [Array<{ n: number }>, unknown];
    console.log(`galera: ${tables[0][0]?.n} tables migrated through HAProxy`);
    expect(Number(tables[0][0]?.n)).toBeGreaterThan(20);
    expect(rows[0].map((r) => r.name), "tables without a primary key").toEqual([]);
  });

  it("copies a row written through HAProxy to all three nodes", async () => {
    await db.raw("CREATE TABLE IF NOT EXISTS layout_probe (id INT AUTO_INCREMENT PRIMARY KEY, note VARCHAR(40) NOT NULL)");
    const [result] = (await db.raw("INSERT INTO layout_probe (note) VALUES ('written through HAProxy')")) as [{ insertId: number }, unknown];
    for (const node of cluster.nodes) {
      // Galera certifies on commit and applies on the other nodes just after: poll, briefly.
      const row = await waitFor(`the row on node ${node.index + 1}`, async () => {
        try {
          const rows = await cluster.rootQuery<{ note: string }>(node.index, `SELECT note FROM \`${DATABASE}\`.layout_probe WHERE id = ?`, [result.insertId]);
          return rows[0];
        } catch (err) {
          // A read on a node that is applying the replicated CREATE TABLE (a DDL run in total order)
          // can be rolled back by that applier ("brute force" abort) and answer ER_LOCK_DEADLOCK,
          // 1213; Galera's answer to its client is to try again. Source: MariaDB Server's own
          // mysql-test suite, galera/t/galera_bf_abort.test (a local transaction aborted by a
          // replicated one gets "ERROR 40001: Deadlock found when trying to get lock"). Seen once here
          // in a fresh-clone run (5 December).
          if ((err as { errno?: number }).errno === 1213) return undefined;
          throw err;
        }
      }, 5_000, 50);
      expect(row.note).toBe("written through HAProxy");
    }
  });

  it("gives no connections to a node that is up but not Synced (HAProxy's check asks Galera's state)", async () => {
    const db3 = async () => (await haproxy.servers()).find((s) => s.backend === "db" && s.server === "db3");
    expect((await db3())?.status).toBe("UP");
    // A desynced node still accepts sign-ins, so a sign-in check would keep it in.
    await cluster.rootQuery(2, "SET GLOBAL wsrep_desync = ON");
    expect((await cluster.nodes[2]!.status()).localState).toBe("Donor/Desynced");
    await waitFor("HAProxy to take db3 out", async () => ((await db3())?.status.startsWith("DOWN") ? true : undefined), 10_000, 100);
    await cluster.rootQuery(2, "SET GLOBAL wsrep_desync = OFF");
    await cluster.waitSynced(3, 10_000);
    await haproxy.waitUp("db", 3, 10_000);
  });

  it("moves new connections to the next node when the writer stops, the app's pool recovers by itself, and the writer stays put when the node returns", async () => {
    const [first, second] = cluster.nodes;
    if (!first || !second) throw new Error("three nodes expected");
    expect(await portThroughLb(url)).toBe(first.port);
    // The pool holds connections to the first node, as a running app would.
    await Promise.all(Array.from({ length: 4 }, () => db.raw("SELECT SLEEP(0.05)")));

    const stoppedAt = Date.now();
    await first.stop();
    let failures = 0;
    const port = await waitFor("a query through the app's pool to succeed again", async () => {
      try {
        const [rows] = (await db.raw("SELECT @@port AS port")) as [Array<{ port: number }>, unknown];
        return Number(rows[0]?.port);
      } catch {
        failures += 1;
        return undefined;
      }
    }, 30_000, 100);
    const recovered = (Date.now() - stoppedAt) / 1000;
    console.log(`galera: writer stopped; the pool answered again from the next node after ${recovered.toFixed(1)} s (${failures} failed attempts)`);
    expect(port).toBe(second.port);
    expect(await portThroughLb(url)).toBe(second.port);
    const [written] = (await db.raw("INSERT INTO layout_probe (note) VALUES ('written while node 1 was down')")) as [{ insertId: number }, unknown];

    const restartedAt = Date.now();
    await first.start();
    await cluster.waitSynced(3, 60_000);
    console.log(`galera: node 1 rejoined (IST) and Synced in ${((Date.now() - restartedAt) / 1000).toFixed(1)} s`);
    // The write made while it was away came with it.
    const rows = await cluster.rootQuery<{ note: string }>(0, `SELECT note FROM \`${DATABASE}\`.layout_probe WHERE id = ?`, [written.insertId]);
    expect(rows[0]?.note).toBe("written while node 1 was down");
    // HAProxy sees it again, yet the writer stays where it failed over to: one writer only.
    await haproxy.waitUp("db", 3, 20_000);
    const ports = await Promise.all(Array.from({ length: 5 }, () => portThroughLb(url)));
    expect(new Set(ports)).toEqual(new Set([second.port]));
    const dbServers = (await haproxy.servers()).filter((s) => s.backend === "db" && s.server.startsWith("db"));
    expect(dbServers.map((s) => [s.server, s.status, s.active])).toEqual([["db1", "UP", false], ["db2", "UP", true], ["db3", "UP", false]]);
  });

  it("lets a killed node rejoin by a full state transfer", async () => {
    const third = cluster.nodes[2];
    if (!third) throw new Error("three nodes expected");
    await third.kill();
    await cluster.waitSynced(2, 30_000);
    const [written] = (await db.raw("INSERT INTO layout_probe (note) VALUES ('written while node 3 was dead')")) as [{ insertId: number }, unknown];
    const restartedAt = Date.now();
    await third.start();
    await cluster.waitSynced(3, 60_000);
    console.log(`galera: killed node 3 rejoined and Synced in ${((Date.now() - restartedAt) / 1000).toFixed(1)} s`);
    const rows = await cluster.rootQuery<{ note: string }>(2, `SELECT note FROM \`${DATABASE}\`.layout_probe WHERE id = ?`, [written.insertId]);
    expect(rows[0]?.note).toBe("written while node 3 was dead");
  });
});

describe("HAProxy's web side (deploy/haproxy.cfg)", () => {
  async function whoAnswers(n: number): Promise<string[]> {
    const names: string[] = [];
    for (let i = 0; i < n; i += 1) {
      const res = await fetch(`http://127.0.0.1:${haproxy.webPort}/api/whoami`);
      expect(res.status).toBe(200);
      names.push(((await res.json()) as { name: string }).name);
    }
    return names;
  }

  it("takes turns between the two web processes, and takes a killed one out within 5 s", async () => {
    const names = await whoAnswers(20);
    expect(names.filter((n) => n === "web1")).toHaveLength(10);
    expect(names.filter((n) => n === "web2")).toHaveLength(10);

    const victim = webs[0];
    if (!victim) throw new Error("two web processes expected");
    const killedAt = Date.now();
    victim.kill("SIGKILL");
    await waitFor("HAProxy to mark web1 down", async () => {
      const web1 = (await haproxy.servers()).find((s) => s.backend === "web" && s.server === "web1");
      return web1 && !web1.status.startsWith("UP") ? true : undefined;
    }, 10_000, 50);
    const seconds = (Date.now() - killedAt) / 1000;
    console.log(`haproxy: killed web1 out of rotation after ${seconds.toFixed(2)} s`);
    expect(seconds).toBeLessThan(5);
    expect(new Set(await whoAnswers(10))).toEqual(new Set(["web2"]));
  });
});
