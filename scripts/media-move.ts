// npm run media:move -- --to s3|local [--limit N]
//
// Copies every stored media key (originals, derivatives, documents) from the store in use to
// the other one, verifies each by SHA-256 read back from the destination, and only when every
// key verified writes DATA_DIR/media-store.env, which scripts/start.sh reads (decision 066).
// Settings come from the app's own variables (MEDIA_STORE, MEDIA_DIR, S3_*). Re-running after a
// stop continues: keys already copied and verified are skipped.
import { chmod, mkdir, rename, writeFile } from "node:fs/promises";
import path from "node:path";
import { ConfigError, loadConfig, type Config } from "../server/config.ts";
import { createLocalDiskStorage } from "../server/media/media.storage.ts";
import { createMediaStorage } from "../server/media/media.storage-choice.ts";
import { copyStore } from "../server/media/media.storage-move.ts";

const S3_KEYS = ["S3_BUCKET", "S3_ENDPOINT", "S3_REGION", "S3_ACCESS_KEY_ID", "S3_SECRET_ACCESS_KEY", "S3_FORCE_PATH_STYLE", "S3_PREFIX"] as const;

function usage(problem: string): never {
  console.error(`${problem}\nUsage: npm run media:move -- --to s3|local [--limit N]`);
  process.exit(2);
}

function parseArgs(argv: string[]): { to: "s3" | "local"; limit?: number } {
  let to: string | undefined;
  let limit: number | undefined;
  for (let i = 0; i < argv.length; i += 1) {
    const arg = argv[i];
    if (arg === "--to") to = argv[++i];
    else if (arg?.startsWith("--to=")) to = arg.slice(5);
    else if (arg === "--limit") limit = Number(argv[++i]);
    else if (arg?.startsWith("--limit=")) limit = Number(arg.slice(8));
    else usage(`Unknown argument: ${arg}`);
  }
  if (to !== "s3" && to !== "local") usage("Say where to move the media: --to s3 or --to local.");
  if (limit !== undefined && !(Number.isInteger(limit) && limit >= 0)) usage("--limit takes a whole number of keys.");
  return { to, limit };
}

/** A shell-safe single-quoted value. */
const quoted = (v: string) => `'${v.replace(/'/g, `'\\''`)}'`;

/** The settings file start.sh sources: written whole beside itself, then renamed, mode 600 (it may hold a secret key). */
async function writeStoreSetting(dataDir: string, lines: Record<string, string>): Promise<string> {
  await mkdir(dataDir, { recursive: true });
  const file = path.join(dataDir, "media-store.env");
  const tmp = `${file}.${process.pid}.tmp`;
  const body = `# Written by npm run media:move on ${new Date().toISOString()}; scripts/start.sh reads it.\n${Object.entries(lines)
    .map(([k, v]) => `${k}=${quoted(v)}`)
    .join("\n")}\n`;
  await writeFile(tmp, body, { mode: 0o600 });
  await chmod(tmp, 0o600);
  await rename(tmp, file);
  return file;
}

async function main(): Promise<number> {
  const { to, limit } = parseArgs(process.argv.slice(2));
  let config: Config;
  try {
    // Only the media settings matter here; the database and session ones are not used.
    config = loadConfig({ DATABASE_URL: "mysql://unused@127.0.0.1/unused", SESSION_SECRET: "unused-by-media-move-0000", ...process.env });
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      return 2;
    }
    throw err;
  }
  if (config.MEDIA_STORE === to) {
    console.error(`The media are already in the ${to} store (MEDIA_STORE=${to}); nothing to move.`);
    return 2;
  }
  if (to === "s3" && !config.S3_BUCKET) {
    console.error("Name the destination bucket: S3_BUCKET (and S3_ENDPOINT, S3_REGION, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY, S3_FORCE_PATH_STYLE, S3_PREFIX as needed).");
    return 2;
  }
  const from = createMediaStorage(config);
  const dest = to === "s3" ? createMediaStorage({ ...config, MEDIA_STORE: "s3" }) : { ...createLocalDiskStorage(config.MEDIA_DIR), close() {} };
  const where = (store: "s3" | "local") => (store === "s3" ? `s3://${config.S3_BUCKET}/${config.S3_PREFIX}` : path.resolve(config.MEDIA_DIR));
  console.log(`Moving media from ${where(config.MEDIA_STORE)} to ${where(to)}${limit !== undefined ? ` (at most ${limit} keys this run)` : ""}`);
  try {
    const report = await copyStore(from, dest, { limit, progress: (line) => console.log(line) });
    console.log(`${report.total} keys: ${report.copied} copied and verified, ${report.skipped} already there and verified, ${report.failed.length} failed.`);
    if (report.failed.length > 0) {
      console.error(`Nothing was switched. These keys failed (run again to retry them):\n${report.failed.map((f) => `  ${f.key}: ${f.reason}`).join("\n")}`);
      return 1;
    }
    if (report.stopped) {
      console.log(`Stopped after ${limit} keys as asked; nothing was switched. Run again to continue.`);
      return 3;
    }
    const setting: Record<string, string> = to === "s3" ? { MEDIA_STORE: "s3" } : { MEDIA_STORE: "local", MEDIA_DIR: path.resolve(config.MEDIA_DIR) };
    if (to === "s3") {
      for (const key of S3_KEYS) {
        const value = process.env[key];
        if (value !== undefined && value !== "") setting[key] = value;
      }
    }
    const file = await writeStoreSetting(path.resolve(config.DATA_DIR), setting);
    console.log(`Every key verified. ${file} now says MEDIA_STORE=${to}; restart the app (npm start reads it). The ${config.MEDIA_STORE} copy is left as it was.`);
    return 0;
  } finally {
    from.close();
    dest.close();
  }
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err instanceof Error ? (err.stack ?? err.message) : err);
    process.exit(1);
  },
);
