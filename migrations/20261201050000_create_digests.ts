import type { Knex } from "knex";

const FREQUENCIES = ["immediate", "weekly", "monthly"];
const RUN_STATUSES = ["queued", "running", "done", "failed", "paused"];
const DELIVERY_STATUSES = ["queued", "sending", "sent", "failed", "skipped"];

/**
 * Digest sending as a queue in MariaDB: a run, one delivery per (run, subscriber), and the
 * rendered content shared by every subscriber with the same audience, topics and window.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("digest_runs", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.enum("frequency", FREQUENCIES).notNullable();
    // `weekly:2026-W48`, `monthly:2026-11`, `immediate:post:42`: a period is run once, whoever asks.
    t.string("run_key", 80).notNullable();
    t.dateTime("window_start", { precision: 3 }).notNullable();
    t.dateTime("window_end", { precision: 3 }).notNullable();
    t.integer("post_id").unsigned().nullable();
    t.enum("status", RUN_STATUSES).notNullable().defaultTo("queued");
    t.boolean("is_test").notNullable().defaultTo(false);
    t.integer("requested_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.integer("queued_count").unsigned().notNullable().defaultTo(0);
    t.integer("sent_count").unsigned().notNullable().defaultTo(0);
    t.integer("failed_count").unsigned().notNullable().defaultTo(0);
    t.integer("skipped_count").unsigned().notNullable().defaultTo(0);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("started_at", { precision: 3 }).nullable();
    t.dateTime("finished_at", { precision: 3 }).nullable();
    t.unique(["project_id", "run_key"]);
    t.index(["status"]);
  });

  await knex.schema.createTable("digest_contents", (t) => {
    t.increments("id").primary();
    t.integer("run_id").unsigned().notNullable().references("digest_runs.id").onDelete("CASCADE");
    // SHA-256 of audience, topics key, window and the figures the reader last saw.
    t.specificType("content_key", "CHAR(64)").notNullable();
    t.enum("audience", ["public", "investor"]).notNullable();
    t.string("topics_key", 64).notNullable();
    t.boolean("empty").notNullable();
    t.string("subject", 300).notNullable();
    t.string("preheader", 300).notNullable();
    // HTML and text with {{…}} placeholders for the personal links only.
    t.text("html", "mediumtext").notNullable();
    t.text("text", "mediumtext").notNullable();
    // The figures this content reported, so the next digest can say what changed.
    t.decimal("percent_complete", 6, 2).nullable();
    t.string("forecast_ready", 10).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["run_id", "content_key"]);
  });

  await knex.schema.createTable("digest_deliveries", (t) => {
    t.bigIncrements("id").primary();
    t.integer("run_id").unsigned().notNullable().references("digest_runs.id").onDelete("CASCADE");
    t.integer("subscriber_id").unsigned().notNullable().references("subscribers.id").onDelete("CASCADE");
    t.integer("content_id").unsigned().nullable().references("digest_contents.id").onDelete("SET NULL");
    t.specificType("content_key", "CHAR(64)").nullable();
    t.dateTime("window_start", { precision: 3 }).notNullable();
    t.enum("status", DELIVERY_STATUSES).notNullable().defaultTo("queued");
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    t.dateTime("lease_until", { precision: 3 }).nullable();
    t.dateTime("next_attempt_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    // Chosen before the first attempt and kept across retries, so a resend is recognisable.
    t.string("message_id", 255).notNullable();
    t.string("error", 500).nullable();
    t.dateTime("sent_at", { precision: 3 }).nullable();
    t.unique(["run_id", "subscriber_id"]);
    t.index(["status", "next_attempt_at"]);
    t.index(["subscriber_id", "status"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ["digest_deliveries", "digest_contents", "digest_runs"]) await knex.schema.dropTableIfExists(table);
}
