import { readdirSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { Knex } from "knex";

const dir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../migrations");

interface MigrationModule {
  up(knex: Knex): Promise<void>;
  down(knex: Knex): Promise<void>;
}

/**
 * Loads migrations through our own dynamic import, so tsx, Vitest and Node resolve the
 * TypeScript files the same way (knex's own loader would bypass them).
 */
const source: Knex.MigrationSource<string> = {
  async getMigrations() {
    return readdirSync(dir)
      .filter((f) => /^\d{14}_[a-z0-9_]+\.ts$/.test(f))
      .sort();
  },
  getMigrationName(name) {
    return name;
  },
  async getMigration(name) {
    return (await import(path.join(dir, name))) as MigrationModule;
  },
};

export async function migrateLatest(db: Knex): Promise<string[]> {
  const [, applied] = (await db.migrate.latest({ migrationSource: source })) as [number, string[]];
  return applied;
}

