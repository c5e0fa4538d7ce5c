import type { Knex } from "knex";

/**
 * Help for the people who write (issue #15):
 * - review links: a named outside reviewer may read one exact revision of a post or story, without
 *   an account, until the link expires or is revoked; every opening and answer is kept;
 * - a perceptual fingerprint of each photo (a 64-bit difference hash as 16 hex digits), for the
 *   then-and-now pairs;
 * - the usage terms a project prints beside its downloadable press photographs.
 * Draft suggestions and press kits are computed and streamed: they keep nothing.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("review_links", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    // A post or a story; no foreign key across the two tables: deleting the content ends the link (the service checks).
    t.enum("content_kind", ["post", "story"]).notNullable();
    t.integer("content_id").unsigned().notNullable();
    // The revision number the link was made for: the reviewer reads exactly that one.
    t.integer("revision_number").unsigned().notNullable();
    t.string("reviewer_name", 200).notNullable();
    t.string("reviewer_email", 254).notNullable();
    t.string("reviewer_organisation", 200).nullable();
    // A random value signed into the token: a link re-created for the same reviewer is a new secret.
    t.string("nonce", 43).notNullable();
    t.dateTime("expires_at", { precision: 3 }).notNullable();
    t.dateTime("revoked_at", { precision: 3 }).nullable();
    t.integer("revoked_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.integer("created_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    // The creator's role when made: unreviewed photos show only on a lead's (or admin's) link.
    t.enum("created_by_role", ["admin", "lead", "marketing"]).notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["content_kind", "content_id"]);
    t.index(["project_id"]);
  });
  await knex.schema.createTable("review_link_events", (t) => {
    t.increments("id").primary();
    t.integer("review_link_id").unsigned().notNullable().references("review_links.id").onDelete("CASCADE");
    t.enum("kind", ["opened", "answered"]).notNullable();
    t.enum("verdict", ["looks_right", "needs_changes"]).nullable();
    t.text("comment").nullable();
    t.integer("revision_number").unsigned().notNullable();
    t.string("ip", 64).nullable();
    t.string("user_agent", 300).nullable();
    t.dateTime("at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["review_link_id", "at"]);
  });
  await knex.schema.alterTable("media_items", (t) => {
    t.string("fingerprint", 16).nullable();
  });
  await knex.schema.alterTable("projects", (t) => {
    t.string("press_usage_terms", 500).nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("projects", (t) => {
    t.dropColumn("press_usage_terms");
  });
  await knex.schema.alterTable("media_items", (t) => {
    t.dropColumn("fingerprint");
  });
  await knex.schema.dropTable("review_link_events");
  await knex.schema.dropTable("review_links");
}
