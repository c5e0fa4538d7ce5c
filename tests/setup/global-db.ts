import { randomBytes } from "node:crypto";
import { rmSync } from "node:fs";
import type { TestProject } from "vitest/node";
import { createDb, dropDatabase, ensureDatabase } from "../../server/db/knex.ts";
import { migrateLatest } from "../../server/db/migrations.ts";
import { seedDemo } from "../../server/seed/demo.seed.ts";
import { testMediaDirFor } from "../../server/media/media.storage.ts";

declare module "vitest" {
  export interface ProvidedContext {
    databaseUrl: string;
  }
}

/**
 * One throw-away database per test project: created, migrated and seeded with the demo
 * users before the project's files run, dropped afterwards. `scripts/test.sh` provides
 * DATABASE_URL for the private MariaDB (or the one the caller named).
 */
export default async function setup(project: TestProject) {
  const base = process.env.DATABASE_URL;
  if (!base) throw new Error("DATABASE_URL is not set: run the suite with `npm test`, which starts MariaDB");
  const u = new URL(base);
  u.pathname = `/plumbline_test_${project.name}_${randomBytes(4).toString("hex")}`;
  const url = u.toString();
  await ensureDatabase(url);
  const db = createDb(url, { max: 2 });
  try {
    await migrateLatest(db);
    await seedDemo(db, { password: process.env.DEMO_PASSWORD || "plumbline-demo" });
  } finally {
    await db.destroy();
  }
  project.provide("databaseUrl", url);
  return async () => {
    await dropDatabase(url);
    // The demo seed and every test app of this database share one media folder under the OS temp dir.
    rmSync(testMediaDirFor(new URL(url).pathname.slice(1)), { recursive: true, force: true });
  };
}
