// Creates the database named by DATABASE_URL, runs the migrations and (with --seed)
// seeds the demo. With --reset it drops the database first. Prints each step.
import { createDb, dropDatabase, ensureDatabase } from "../server/db/knex.ts";
import { migrateLatest } from "../server/db/migrations.ts";
import { seedDemo } from "../server/seed/demo.seed.ts";

const args = new Set(process.argv.slice(2));
const url = process.env.DATABASE_URL;
if (!url) {
  process.stderr.write("DATABASE_URL is not set\n");
  process.exit(1);
}
if (args.has("--reset")) {
  await dropDatabase(url);
  process.stdout.write("  dropped the database\n");
}
await ensureDatabase(url);
const db = createDb(url, { max: 2 });
try {
  const applied = await migrateLatest(db);
  process.stdout.write(`  migrations: ${applied.length ? applied.join(", ") : "up to date"}\n`);
  if (args.has("--seed")) {
    const password = process.env.DEMO_PASSWORD || "plumbline-demo";
    const { created } = await seedDemo(db, { password });
    process.stdout.write(`  demo seed: ${created.length ? `added ${created.length} (${created.slice(0, 6).join(", ")}${created.length > 6 ? ", …" : ""})` : "already in place, nothing changed"}\n`);
  }
} finally {
  await db.destroy();
}
