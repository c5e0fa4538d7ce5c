import { createDb, dropDatabase, ensureDatabase } from "./server/db/knex.ts";
import { migrateLatest } from "./server/db/migrations.ts";
import { seedDemo } from "./server/seed/demo.seed.ts";
const u = new URL(process.env.DATABASE_URL!); u.pathname = "/plumbline_scratch_seed"; const url = u.toString();
await dropDatabase(url); await ensureDatabase(url);
const db = createDb(url);
process.env.MEDIA_DIR = "/tmp/plumbline-scratch-media";
try {
  await migrateLatest(db);
  const t0 = Date.now();
  const a = await seedDemo(db, { password: "plumbline-demo" });
  console.log("first", Date.now() - t0, "ms", a.created.filter(c => /update|story/.test(c)));
  const b = await seedDemo(db, { password: "plumbline-demo" });
  console.log("second", b.created);
  console.log(await db("posts").select("id", "title", "status", "audience", "published_at", "scheduled_for", "cover_media_id"));
  console.log(await db("post_milestones").select("post_id", "milestone_id", "name", "then_status", "then_forecast_finish", "then_actual_finish", "then_percent_complete").limit(30));
  console.log(await db("stories").select("id", "slug", "status", "published_at"));
  const p = await db("posts").where({ status: "published" }).orderBy("published_at").first("html");
  console.log(p.html.slice(0, 1500));
} finally { await db.destroy(); await dropDatabase(url); }
