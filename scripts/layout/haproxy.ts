// HAProxy (Debian's package) run with the repository's deploy/haproxy.cfg, as a deployment runs
// it: the file is not rewritten, only the environment variables it names are filled in
// (decision 067).
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { mkdirSync, rmSync } from "node:fs";
import net from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { killGroup, trackChild, waitFor } from "./galera.ts";
import { freePorts } from "./ports.ts";

export const HAPROXY_CONFIG = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../deploy/haproxy.cfg");

export interface HaproxyServer {
  /** `web` or `db` (the backends deploy/haproxy.cfg names). */
  backend: string;
  /** `web1`, `web2`, `db1`, … in the order given. */
  server: string;
  /** HAProxy's own word: UP, DOWN, `UP 1/2` while rising, MAINT, … */
  status: string;
  /** New connections go to this server now: UP and, in the database backend, the one writer. */
  active: boolean;
  /** Requests (HTTP) or connections (TCP) this server has been given since HAProxy started. */
  requests: number;
}

export interface Haproxy {
  webPort: number;
  dbPort: number;
  statsSocket: string;
  /** The haproxy process (for CPU accounting in `npm run scale -- --bench`). */
  pid: number;
  stop(): Promise<void>;
  servers(): Promise<HaproxyServer[]>;
  /** Runs one command on the stats socket (`show stat`, `show table db_writer`, …). */
  command(cmd: string): Promise<string>;
  /** Resolves when at least `count` servers of `backend` are fully UP (checks passed). */
  waitUp(backend: string, count: number, timeoutMs?: number): Promise<void>;
  /** HAProxy's last log lines (stderr), for a failing test's message. */
  log(): string[];
}

export interface StartHaproxyOptions {
  dir: string;
  /** host:port of each web process (two in the layout; the file names PLUMBLINE_WEB1 and 2). */
  webServers: string[];
  /** host:port of each database node; the first is the writer, the others its backups. */
  dbServers: string[];
  webPort?: number;
  dbPort?: number;
}

// deploy/haproxy.cfg names two web processes and three database nodes; fewer given are parked here
// and put in maintenance once HAProxy runs (a one-process benchmark, a two-node cluster).
const PARKED = "127.0.0.1:9";
const WEB_SLOTS = 2;
const DB_SLOTS = 3;

export async function startHaproxy(opts: StartHaproxyOptions): Promise<Haproxy> {
  if (opts.webServers.length > WEB_SLOTS) throw new Error(`deploy/haproxy.cfg has ${WEB_SLOTS} web servers; ${opts.webServers.length} given`);
  if (opts.dbServers.length > DB_SLOTS) throw new Error(`deploy/haproxy.cfg has ${DB_SLOTS} database servers; ${opts.dbServers.length} given`);
  mkdirSync(opts.dir, { recursive: true });
  const [webPort = 0, dbPort = 0] = await freePorts(2);
  const ports = { web: opts.webPort ?? webPort, db: opts.dbPort ?? dbPort };
  const statsSocket = path.join(opts.dir, "haproxy.sock");
  rmSync(statsSocket, { force: true });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    PLUMBLINE_LB_WEB: `127.0.0.1:${ports.web}`,
    PLUMBLINE_LB_DB: `127.0.0.1:${ports.db}`,
    PLUMBLINE_LB_STATS: statsSocket,
  };
  const parked: string[] = [];
  for (let i = 0; i < WEB_SLOTS; i += 1) {
    env[`PLUMBLINE_WEB${i + 1}`] = opts.webServers[i] ?? PARKED;
    if (!opts.webServers[i]) parked.push(`web/web${i + 1}`);
  }
  for (let i = 0; i < DB_SLOTS; i += 1) {
    env[`PLUMBLINE_DB${i + 1}`] = opts.dbServers[i] ?? PARKED;
    if (!opts.dbServers[i]) parked.push(`db/db${i + 1}`);
  }

  const check = spawnSync("haproxy", ["-c", "-q", "-f", HAPROXY_CONFIG], { env, encoding: "utf8" });
  if (check.status !== 0) throw new Error(`haproxy -c refused ${HAPROXY_CONFIG}:\n${check.stdout}${check.stderr}`);

  const log: string[] = [];
  // -db: stay in the foreground, so this process owns it (and its exit kills it).
  const child: ChildProcess = spawn("haproxy", ["-db", "-f", HAPROXY_CONFIG], { env, stdio: ["ignore", "pipe", "pipe"], detached: true });
  trackChild(child);
  for (const stream of [child.stdout, child.stderr]) {
    stream?.setEncoding("utf8");
    stream?.on("data", (chunk: string) => {
      log.push(...chunk.split("\n").filter(Boolean));
      if (log.length > 200) log.splice(0, log.length - 200);
    });
  }
  const alive = (): boolean => child.exitCode === null && child.signalCode === null;

  async function command(cmd: string): Promise<string> {
    return new Promise((resolve, reject) => {
      const socket = net.createConnection(statsSocket);
      let out = "";
      socket.setEncoding("utf8");
      socket.on("data", (chunk: string) => (out += chunk));
      socket.on("end", () => resolve(out));
      socket.on("error", reject);
      socket.write(`${cmd}\n`);
    });
  }

  async function servers(): Promise<HaproxyServer[]> {
    const [stat, table] = await Promise.all([command("show stat"), command("show table db")]);
    const lines = stat.split("\n").filter(Boolean);
    const header = (lines.shift() ?? "").replace(/^# /, "").split(",");
    const rows = lines.map((line) => {
      const cells = line.split(",");
      return Object.fromEntries(header.map((name, i) => [name, cells[i] ?? ""]));
    // type 2: servers (0 and 1 are the frontend and backend totals, which share the names).
    }).filter((r) => (r.pxname === "web" || r.pxname === "db") && r.type === "2");
    // The stick table's one entry names the node that now takes the database connections.
    const stuck = /server_key=(\S+)/.exec(table)?.[1];
    const up = (r: Record<string, string>): boolean => (r.status ?? "").startsWith("UP");
    const dbRows = rows.filter((r) => r.pxname === "db");
    const writer = dbRows.find((r) => r.svname === stuck && up(r))
      ?? dbRows.find((r) => r.bck === "0" && up(r))
      ?? dbRows.find((r) => up(r));
    return rows.map((r) => ({
      backend: r.pxname ?? "",
      server: r.svname ?? "",
      status: r.status ?? "",
      active: r.pxname === "db" ? r === writer : up(r),
      requests: Number(r.req_tot || r.stot || 0),
    }));
  }

  async function stop(): Promise<void> {
    if (!alive()) return;
    const gone = new Promise<void>((resolve) => child.once("exit", () => resolve()));
    child.kill("SIGTERM");
    const timer = setTimeout(() => killGroup(child), 5_000);
    await gone;
    clearTimeout(timer);
  }

  try {
    await waitFor("HAProxy to listen", async () => {
      if (!alive()) throw new Error(`haproxy exited (${child.exitCode ?? child.signalCode}):\n${log.join("\n")}`);
      const listening = await Promise.all([ports.web, ports.db].map((port) => new Promise<boolean>((resolve) => {
        const s = net.createConnection({ host: "127.0.0.1", port }, () => { s.destroy(); resolve(true); });
        s.on("error", () => resolve(false));
      })));
      return listening.every(Boolean) && (await command("show info").then(() => true, () => false)) ? true : undefined;
    }, 10_000, 50);
    for (const name of parked) await command(`set server ${name} state maint`);
  } catch (err) {
    await stop();
    throw err;
  }

  return {
    webPort: ports.web,
    dbPort: ports.db,
    statsSocket,
    pid: child.pid!,
    stop,
    servers,
    command,
    async waitUp(backend, count, timeoutMs = 20_000) {
      await waitFor(`${count} servers UP in HAProxy's ${backend} backend`, async () => {
        const up = (await servers()).filter((s) => s.backend === backend && s.status === "UP").length;
        return up >= count ? true : undefined;
      }, timeoutMs, 100);
    },
    log: () => log.slice(),
  };
}
