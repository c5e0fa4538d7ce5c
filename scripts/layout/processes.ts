/**
 * Plumbline's own processes as a deployment runs them: `node --import tsx server/index.ts` with
 * PLUMBLINE_ROLE=web (listening on its own port) or worker (no listener). Used by the kill test
 * (tests/layout/) and by `npm run scale`; nothing here is imported by the app.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { createWriteStream, type WriteStream } from "node:fs";
import path from "node:path";
import { StringDecoder } from "node:string_decoder";
import { fileURLToPath } from "node:url";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");

export interface AppProcess {
  name: string;
  role: "web" | "worker";
  /** The web process's own port (null for a worker). */
  port: number | null;
  pid: number;
  child: ChildProcess;
  /** pino's JSON lines so far (parsed); lines that are not JSON are kept as `{ msg }`. */
  log: Array<Record<string, unknown> & { msg?: string }>;
  /** Whether the process is still running. */
  alive(): boolean;
  /** Sends a signal and resolves when the process has exited. */
  kill(signal?: NodeJS.Signals): Promise<void>;
}

export interface StartProcessOptions {
  name: string;
  role: "web" | "worker";
  /** The web role's port (required for web). */
  port?: number;
  /** Settings beyond the inherited environment (DATABASE_URL, SESSION_SECRET, MEDIA_STORE …). */
  env: Record<string, string>;
  /** Where the process's output is copied, line by line (a file per process). */
  logFile?: string;
  /** How long to wait for it to be ready. */
  readyTimeoutMs?: number;
}

// Every process started here, so that none outlives the process that started it (a test run that
// ends abruptly, or Ctrl-C in `npm run scale`).
const running = new Set<ChildProcess>();
let exitHooked = false;
function killAllOnExit(): void {
  if (exitHooked) return;
  exitHooked = true;
  process.on("exit", () => {
    for (const child of running) child.kill("SIGKILL");
  });
}

/** Starts one process and resolves when it is ready: a web process answers /api/health, a worker has logged its start. */
export async function startAppProcess(opts: StartProcessOptions): Promise<AppProcess> {
  if (opts.role === "web" && !opts.port) throw new Error("a web process needs a port");
  killAllOnExit();
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    cwd: ROOT,
    env: {
      ...process.env,
      LOG_LEVEL: "info",
      LOG_FORMAT: "json",
      ...opts.env,
      PLUMBLINE_ROLE: opts.role,
      HOST: "127.0.0.1",
      PORT: String(opts.port ?? 0),
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const out: WriteStream | null = opts.logFile ? createWriteStream(opts.logFile, { flags: "a" }) : null;
  const log: AppProcess["log"] = [];
  // One unfinished line per stream: a chunk of stderr arriving between two chunks of one stdout
  // line must not be glued into it (the line would no longer parse, and its message be lost).
  const lineReader = () => {
    let rest = "";
    const text = new StringDecoder("utf8"); // a character split across two chunks stays whole
    return (chunk: Buffer) => {
      out?.write(chunk);
      rest += text.write(chunk);
      const lines = rest.split("\n");
      rest = lines.pop() ?? "";
      keep(lines);
    };
  };
  const keep = (lines: string[]) => {
    for (const line of lines) {
      if (!line.trim()) continue;
      try {
        log.push(JSON.parse(line) as Record<string, unknown>);
      } catch {
        log.push({ msg: line });
      }
      // Keep memory bounded in long runs: the first lines (start-up) and the latest ones.
      if (log.length > 5_000) log.splice(200, 1_000);
    }
  };
  child.stdout!.on("data", lineReader());
  child.stderr!.on("data", lineReader());
  running.add(child);
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  void exited.then(() => running.delete(child));
  void exited.then(() => out?.end());

  const proc: AppProcess = {
    name: opts.name,
    role: opts.role,
    port: opts.port ?? null,
    pid: child.pid!,
    child,
    log,
    alive: () => child.exitCode === null && child.signalCode === null,
    async kill(signal = "SIGTERM") {
      if (!proc.alive()) return;
      child.kill(signal);
      await exited;
    },
  };

  const deadline = Date.now() + (opts.readyTimeoutMs ?? 60_000);
  for (;;) {
    if (!proc.alive()) throw new Error(`${opts.name} exited during start-up (code ${child.exitCode}):\n${log.map((l) => l.msg ?? JSON.stringify(l)).slice(-20).join("\n")}`);
    if (opts.role === "web") {
      const status = await fetch(`http://127.0.0.1:${opts.port}/api/health`, { signal: AbortSignal.timeout(2_000) }).then(
        (r) => r.status,
        () => 0,
      );
      if (status === 200) return proc;
    } else if (log.some((l) => l.msg === "background work started")) {
      return proc;
    }
    if (Date.now() > deadline) {
      await proc.kill("SIGKILL");
      throw new Error(`${opts.name} was not ready within ${opts.readyTimeoutMs ?? 60_000} ms:\n${log.map((l) => l.msg ?? JSON.stringify(l)).slice(-20).join("\n")}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}
