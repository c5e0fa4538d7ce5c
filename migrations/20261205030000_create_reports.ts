import type { Knex } from "knex";

/**
 * Monthly investor reports and personal calendar feeds. A report is drafted for a month, carries
 * the lead's commentary per section, and once issued is frozen: its figures (as the record stood at
 * the month end) and its PDF (kept as a document of the investor-record library, so per-reader
 * stamping and the view log apply). A corrected issue supersedes an earlier one and says what
 * changed. Calendar feed tokens are per user, revocable; only a hash is stored.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("reports", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    // YYYY-MM: the month reported, ending at the month end in the project's time zone.
    t.string("month", 7).notNullable();
    t.enum("state", ["draft", "issued", "superseded"]).notNullable().defaultTo("draft");
    t.enum("audience", ["investor", "internal"]).notNullable().defaultTo("investor");
    // JSON: the lead's commentary per section, each the editor's rich-text JSON.
    t.text("commentary", "mediumtext").notNullable();
    // JSON: the figures as the record stood at the month end, frozen at issue (null while a draft).
    t.text("figures", "longtext").nullable();
    // The issued PDF, stored as a document of the library (null while a draft).
    t.integer("document_id").unsigned().nullable().references("documents.id").onDelete("SET NULL");
    t.integer("supersedes_id").unsigned().nullable().references("reports.id").onDelete("SET NULL");
    // What a corrected issue changed, in words.
    t.text("correction_note").nullable();
    t.integer("issued_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("issued_at", { precision: 3 }).nullable();
    t.integer("created_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["project_id", "month"]);
  });

  await knex.schema.createTable("report_events", (t) => {
    t.bigIncrements("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("report_id").unsigned().nullable().references("reports.id").onDelete("CASCADE");
    t.string("field", 40).notNullable();
    t.string("from_value", 500).nullable();
    t.string("to_value", 500).nullable();
    t.dateTime("at", { precision: 3 }).notNullable();
    t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("note").nullable();
    t.index(["report_id", "at"]);
    t.index(["project_id", "at"]);
  });

  // Issuing notifies the report's readers once each: one row per (report, user), unique.
  await knex.schema.createTable("report_notices", (t) => {
    t.bigIncrements("id").primary();
    t.integer("report_id").unsigned().notNullable().references("reports.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.enum("status", ["queued", "sending", "sent", "failed"]).notNullable().defaultTo("queued");
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    t.dateTime("lease_until", { precision: 3 }).nullable();
    t.string("message_id", 255).notNullable();
    t.dateTime("sent_at", { precision: 3 }).nullable();
    t.string("error", 500).nullable();
    t.unique(["report_id", "user_id"]);
    t.index(["status"]);
  });

  await knex.schema.createTable("calendar_feeds", (t) => {
    t.increments("id").primary();
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    // SHA-256 of the token's secret part; the token itself is shown to its owner only.
    t.specificType("token_hash", "CHAR(64)").notNullable().unique();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("revoked_at", { precision: 3 }).nullable();
    t.index(["user_id", "project_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ["calendar_feeds", "report_notices", "report_events", "reports"]) await knex.schema.dropTableIfExists(table);
}
