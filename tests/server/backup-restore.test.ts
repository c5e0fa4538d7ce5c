import { execFile } from "node:child_process";
import { randomBytes } from "node:crypto";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDb, dropDatabase, ensureDatabase, type Db } from "../../server/db/knex.ts";
import { migrateLatest } from "../../server/db/migrations.ts";

/*
 * scripts/backup.sh and scripts/restore.sh (decision 068), run as an operator runs them, against
 * a small database of this file's own on the run's private MariaDB: migrated with the repository's
 * migrations, a few rows with utf8mb4 text and binary bytes, dumped, restored into a second new
 * database and compared table by table.
 */

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const suffix = randomBytes(4).toString("hex");
const SOURCE = `plumbline_bk_${suffix}`;
const RESTORED = `plumbline_bk_${suffix}_r`;
const NEVER = `plumbline_bk_${suffix}_x`;

// Text from every plane the column must keep: accents, CJK, an emoji outside the BMP.
const NAME = "Åsa Ødegård — façade crew 🏗️ 完成";
// Every byte value once, NUL and 0xFF included: what --hex-blob must carry unchanged.
const RAW = Buffer.from(Array.from({ length: 256 }, (_, i) => i));

const urlFor = (database: string) => {
  const u = new URL(inject("databaseUrl"));
  u.pathname = `/${database}`;
  return u.toString();
};

let work: string;
let clientTmp: string;
/** Stand-ins for mariadb and mariadb-dump, first on PATH: each logs its arguments, then runs the real tool. */
let shims: string;
let dump: string;
let admin: Db;

interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

function run(script: string, args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    execFile("bash", [path.join(ROOT, "scripts", script), ...args], {
      cwd: work,
      // The option file with the password is made under TMPDIR: this file checks it is gone after.
      env: { ...process.env, DATABASE_URL: urlFor(SOURCE), TMPDIR: clientTmp, PATH: `${shims}:${process.env.PATH}` },
      timeout: 60_000,
    }, (error, stdout, stderr) => {
      resolve({ code: error ? (typeof error.code === "number" ? error.code : 1) : 0, stdout, stderr });
    });
  });
}

/** Table names, row counts and CHECKSUM TABLE of one database. */
async function snapshot(database: string) {
  const [tables] = (await admin.raw("SELECT TABLE_NAME AS name, TABLE_TYPE AS type FROM information_schema.TABLES WHERE TABLE_SCHEMA = ? ORDER BY TABLE_NAME", [database])) as [Array<{ name: string; type: string }>];
  const rows: Record<string, number> = {};
  const checksums: Record<string, string> = {};
  for (const { name } of tables) {
    const [[count]] = (await admin.raw("SELECT COUNT(*) AS n FROM ??.??", [database, name])) as [[{ n: number }]];
    rows[name] = Number(count.n);
    const [[sum]] = (await admin.raw("CHECKSUM TABLE ??.??", [database, name])) as [[{ Checksum: number | string | null }]];
    checksums[name] = String(sum.Checksum);
  }
  return { tables: tables.map((t) => `${t.name} (${t.type})`), rows, checksums };
}

async function databaseExists(name: string): Promise<boolean> {
  const [found] = (await admin.raw("SELECT SCHEMA_NAME FROM information_schema.SCHEMATA WHERE SCHEMA_NAME = ?", [name])) as [unknown[]];
  return found.length > 0;
}

beforeAll(async () => {
  work = mkdtempSync(path.join(tmpdir(), "plumbline-backup-test-"));
  clientTmp = mkdtempSync(path.join(tmpdir(), "plumbline-backup-client-"));
  shims = path.join(work, "bin");
  mkdirSync(shims);
  for (const tool of ["mariadb", "mariadb-dump"]) {
    const real = ["/usr/bin", "/usr/local/bin", "/bin"].map((d) => path.join(d, tool)).find((f) => existsSync(f)) ?? tool;
    writeFileSync(path.join(shims, tool), `#!/bin/sh\nprintf '%s\\n' "${tool} $*" >>"${path.join(work, "argv.log")}"\nexec ${real} "$@"\n`, { mode: 0o755 });
  }
  await ensureDatabase(urlFor(SOURCE));
  // One connection with no default database reaches all three by qualified names.
  admin = createDb(urlFor(SOURCE), { max: 1 });
  await migrateLatest(admin);
  const [userId] = await admin("users").insert({ email: `crew-${suffix}@kestrel.example`, name: NAME, role: "lead", password_hash: "not-a-real-hash" });
  await admin("projects").insert({ slug: `bk-${suffix}`, name: "Aldermere Campus — Phase 2 ⚡", operator_name: "Kestrel Colocation", description: NAME });
  await admin("mail_messages").insert([
    { subject: `Weekly progress ✉️ ${NAME}`, headers: "{}", raw: RAW },
    { subject: "Empty body", headers: "{}", raw: Buffer.alloc(0) },
  ]);
  await admin("audit_events").insert({ actor_id: userId, action: "backup.test", detail: NAME });
}, 120_000);

afterAll(async () => {
  if (admin) {
    for (const name of [SOURCE, RESTORED, NEVER]) await dropDatabase(urlFor(name));
    await admin.destroy();
  }
  if (work) rmSync(work, { recursive: true, force: true });
  if (clientTmp) rmSync(clientTmp, { recursive: true, force: true });
});

describe("npm run db:backup and db:restore", () => {
  it("dumps the database gzip'd beside a sha256 file and leaves no option file behind", async () => {
    const r = await run("backup.sh", ["--out", "dumps"]);
    expect(r.stderr).not.toMatch(/✗/);
    expect(r.code).toBe(0);
    const files = readdirSync(path.join(work, "dumps")).sort();
    expect(files).toEqual([expect.stringMatching(new RegExp(`^plumbline-${SOURCE}-\\d{8}T\\d{6}Z\\.sql\\.gz$`)), expect.stringMatching(/\.sql\.gz\.sha256$/)]);
    dump = path.join(work, "dumps", files[0]!);
    expect(r.stdout.trim().split("\n").at(-1)).toBe(dump);
    expect(readFileSync(`${dump}.sha256`, "utf8")).toMatch(new RegExp(`^[0-9a-f]{64}  ${files[0]!.replace(/\./g, "\\.")}\\n$`));
    // gzip's magic number, and the password never written beside the dump.
    expect([...readFileSync(dump).subarray(0, 2)]).toEqual([0x1f, 0x8b]);
    expect(readdirSync(clientTmp)).toEqual([]);
  });

  it("restores into a new database: the same tables, row counts and CHECKSUM TABLE for each", async () => {
    const r = await run("restore.sh", [dump, "--database", RESTORED]);
    expect(r.stderr).not.toMatch(/✗/);
    expect(r.code).toBe(0);
    const before = await snapshot(SOURCE);
    const after = await snapshot(RESTORED);
    console.info(`backup round trip: ${before.tables.length} tables, ${Object.values(before.rows).reduce((a, b) => a + b, 0)} rows, every checksum equal`);
    expect(before.tables.length).toBeGreaterThan(50);
    expect(after.tables).toEqual(before.tables);
    expect(after.rows).toEqual(before.rows);
    expect(after.checksums).toEqual(before.checksums);
    // The figures above could agree on empty tables: the rows written here came back byte for byte.
    expect(before.rows.mail_messages).toBe(2);
    const users = await admin(`${RESTORED}.users`).select("name");
    expect(users.map((u: { name: string }) => u.name)).toEqual([NAME]);
    const raws = await admin(`${RESTORED}.mail_messages`).orderBy("id").select("raw");
    expect(raws.map((m: { raw: Buffer }) => m.raw.toString("hex"))).toEqual([RAW.toString("hex"), ""]);
    expect(readdirSync(clientTmp)).toEqual([]);
  });

  it("refuses a damaged dump by its checksum, and restores nothing", async () => {
    const damaged = path.join(work, "damaged.sql.gz");
    copyFileSync(dump, damaged);
    copyFileSync(`${dump}.sha256`, `${damaged}.sha256`);
    const bytes = readFileSync(damaged);
    const middle = Math.floor(bytes.length / 2);
    bytes[middle] = bytes[middle]! ^ 0xff;
    writeFileSync(damaged, bytes);
    const r = await run("restore.sh", [damaged, "--database", NEVER]);
    expect(r.code).not.toBe(0);
    expect(r.stderr).toMatch(/checksum mismatch: .*damaged\.sql\.gz is damaged or incomplete .*nothing was restored/);
    expect(await databaseExists(NEVER)).toBe(false);
  });

  it("refuses a dump without its checksum file", async () => {
    const alone = path.join(work, "alone.sql.gz");
    copyFileSync(dump, alone);
    const r = await run("restore.sh", [alone, "--database", NEVER]);
    expect(r.code).not.toBe(0);
    expect(r.stderr).toMatch(/no checksum file beside the dump/);
    expect(await databaseExists(NEVER)).toBe(false);
  });

  it("refuses to restore over a database that has tables unless --force, which replaces it whole", async () => {
    await admin(`${RESTORED}.audit_events`).insert({ action: "written.after.restore" });
    const changed = await snapshot(RESTORED);
    const refused = await run("restore.sh", [dump, "--database", RESTORED]);
    expect(refused.code).not.toBe(0);
    expect(refused.stderr).toMatch(new RegExp(`database ${RESTORED} already has ${changed.tables.length} tables: nothing was restored \\(add --force`));
    expect(await snapshot(RESTORED)).toEqual(changed);

    const forced = await run("restore.sh", [dump, "--database", RESTORED, "--force"]);
    expect(forced.code).toBe(0);
    expect((await snapshot(RESTORED)).checksums).toEqual((await snapshot(SOURCE)).checksums);
  });

  it("never puts the password on a command line (where ps shows it): the client tools read it from an option file", () => {
    // Every call of both scripts above went through the stand-ins.
    const calls = readFileSync(path.join(work, "argv.log"), "utf8").trim().split("\n");
    expect(calls).toContainEqual(expect.stringMatching(/^mariadb --defaults-file=\S+ --database=plumbline_bk_/));
    expect(calls).toContainEqual(expect.stringMatching(/^mariadb-dump --defaults-file=\S+ --single-transaction --routines --triggers --events --hex-blob /));
    for (const call of calls) expect(call).toMatch(/^mariadb(-dump)? --defaults-file=/);
    const password = decodeURIComponent(new URL(inject("databaseUrl")).password);
    expect(password.length).toBeGreaterThan(8);
    expect(calls.join("\n")).not.toContain(password);
  });
});
