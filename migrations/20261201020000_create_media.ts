import type { Knex } from "knex";

const STATUSES = ["processing", "ready", "failed"];
const SENSITIVITIES = ["unreviewed", "cleared", "restricted"];
const FORMATS = ["avif", "webp", "jpeg"];
const TAG_KINDS = ["area", "system", "milestone"];
const AUDIENCES = ["public", "investor", "internal"];
const OWNER_TYPES = ["post", "story", "project"];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("media_items", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    // SHA-256 of the original's bytes: the same photo uploaded twice into one project is one item.
    t.specificType("sha256", "CHAR(64)").notNullable();
    t.enum("status", STATUSES).notNullable().defaultTo("processing");
    t.text("failure_reason").nullable();
    // Storage key of the original (private to staff; it may still carry GPS and other metadata).
    t.string("original_key", 200).notNullable();
    t.string("original_name", 255).notNullable().defaultTo("");
    t.string("mime", 32).notNullable();
    t.integer("bytes").unsigned().notNullable();
    // Displayed size, after the EXIF orientation is applied.
    t.integer("width").unsigned().notNullable();
    t.integer("height").unsigned().notNullable();
    // DateTimeOriginal as the camera recorded it (local time, offset when the camera wrote one),
    // kept as text so no server time zone ever shifts it; taken_on is its calendar date, for filters.
    t.string("taken_at", 40).nullable();
    t.date("taken_on").nullable();
    // Whether the original carried location data. Staff-only; coordinates are never stored.
    t.boolean("had_gps").notNullable().defaultTo(false);
    t.text("alt_text").nullable();
    t.text("caption").nullable();
    t.string("credit", 200).nullable();
    t.double("focal_x").notNullable().defaultTo(0.5);
    t.double("focal_y").notNullable().defaultTo(0.5);
    t.enum("sensitivity", SENSITIVITIES).notNullable().defaultTo("unreviewed");
    t.boolean("flagged_for_review").notNullable().defaultTo(false);
    t.integer("reviewed_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("reviewed_at", { precision: 3 }).nullable();
    t.text("placeholder").nullable();
    t.specificType("dominant_color", "CHAR(7)").nullable();
    t.boolean("is_illustration").notNullable().defaultTo(false);
    t.integer("uploaded_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["project_id", "sha256"]);
    t.index(["project_id", "created_at"]);
    t.index(["project_id", "sensitivity", "flagged_for_review"]);
    t.index(["project_id", "taken_on"]);
    t.index(["original_key"]);
  });
  await knex.schema.raw(
    "ALTER TABLE media_items ADD CONSTRAINT media_items_focal_range CHECK (focal_x BETWEEN 0 AND 1 AND focal_y BETWEEN 0 AND 1)",
  );

  await knex.schema.createTable("media_variants", (t) => {
    t.increments("id").primary();
    t.integer("media_id").unsigned().notNullable().references("media_items.id").onDelete("CASCADE");
    t.integer("width").unsigned().notNullable();
    t.integer("height").unsigned().notNullable();
    t.enum("format", FORMATS).notNullable();
    // Content-hashed file name: the bytes behind a key never change, so it is cached for ever.
    t.string("storage_key", 200).notNullable();
    t.integer("bytes").unsigned().notNullable();
    t.unique(["media_id", "width", "format"]);
    t.index(["storage_key"]);
  });

  await knex.schema.createTable("media_tags", (t) => {
    t.integer("media_id").unsigned().notNullable().references("media_items.id").onDelete("CASCADE");
    t.enum("kind", TAG_KINDS).notNullable();
    // For kind "milestone", the milestone's id as text.
    t.string("value", 100).notNullable();
    t.primary(["media_id", "kind", "value"]);
    t.index(["kind", "value"]);
  });

  await knex.schema.createTable("media_jobs", (t) => {
    t.increments("id").primary();
    t.integer("media_id").unsigned().notNullable().unique().references("media_items.id").onDelete("CASCADE");
    t.enum("state", ["queued", "running"]).notNullable().defaultTo("queued");
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    // A fresh token per claim: only the holder of the current token may commit the result.
    t.specificType("lease_token", "CHAR(32)").nullable();
    t.dateTime("lease_until", { precision: 3 }).nullable();
    t.dateTime("run_after", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    // Storage keys written by any attempt (JSON array), so a re-run can delete what a crashed one left.
    t.text("staged_keys").nullable();
    t.text("last_error").nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["state", "run_after"]);
    t.index(["state", "lease_until"]);
  });

  await knex.schema.createTable("media_usages", (t) => {
    t.integer("media_id").unsigned().notNullable().references("media_items.id").onDelete("CASCADE");
    t.enum("owner_type", OWNER_TYPES).notNullable();
    t.integer("owner_id").unsigned().notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.boolean("published").notNullable().defaultTo(false);
    t.primary(["owner_type", "owner_id", "media_id"]);
    t.index(["media_id", "published", "audience"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ["media_usages", "media_jobs", "media_tags", "media_variants", "media_items"]) {
    await knex.schema.dropTableIfExists(table);
  }
}
