import type { Knex } from "knex";

const AUDIENCES = ["public", "investor", "internal"];
const STATUSES = ["draft", "in_review", "approved", "scheduled", "published", "withdrawn"];
const MILESTONE_STATUSES = ["complete", "on_programme", "at_risk", "behind"];

/**
 * Updates (posts) and photo stories with their revisions, old addresses, linked milestones
 * (with the figures captured at publication), tags, photos and workflow history.
 * Media and milestone ids are plain integers, not foreign keys: those rows belong to other
 * modules, and a post keeps what it recorded (a milestone's name and "then" figures) even
 * when the source is later removed.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("posts", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("slug", 120).notNullable();
    t.string("title", 200).notNullable();
    t.string("summary", 600).notNullable().defaultTo("");
    // The editor's JSON as sent (validated); the sanitised HTML and the plain text are derived
    // from it at every save and publication, so reads never render.
    t.text("body", "longtext").notNullable();
    t.text("html", "longtext").notNullable();
    t.text("plain_text", "mediumtext").notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.enum("status", STATUSES).notNullable().defaultTo("draft");
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("author_name", 200).notNullable();
    t.integer("cover_media_id").unsigned().nullable();
    t.dateTime("scheduled_for", { precision: 3 }).nullable();
    t.dateTime("published_at", { precision: 3 }).nullable();
    t.dateTime("withdrawn_at", { precision: 3 }).nullable();
    t.text("review_comment").nullable();
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["project_id", "slug"]);
    t.index(["project_id", "status", "audience", "published_at"]);
    // The scheduler's claim: due scheduled posts across all projects.
    t.index(["status", "scheduled_for"]);
  });
  await knex.raw("ALTER TABLE posts ADD FULLTEXT INDEX posts_fulltext (title, summary, plain_text)");

  await knex.schema.createTable("post_revisions", (t) => {
    t.bigIncrements("id").primary();
    t.integer("post_id").unsigned().notNullable().references("posts.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.string("title", 200).notNullable();
    t.string("summary", 600).notNullable();
    t.string("slug", 120).notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.enum("status", STATUSES).notNullable();
    t.text("body", "longtext").notNullable();
    t.text("plain_text", "mediumtext").notNullable();
    t.integer("cover_media_id").unsigned().nullable();
    // JSON arrays: the linked milestones and tags as saved.
    t.text("milestone_ids").notNullable();
    t.text("tags").notNullable();
    t.string("note", 500).nullable();
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("author_name", 200).notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["post_id", "number"]);
  });

  await knex.schema.createTable("post_slugs", (t) => {
    // A post's earlier addresses, kept so old links redirect (301) to the current one.
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("slug", 120).notNullable();
    t.integer("post_id").unsigned().notNullable().references("posts.id").onDelete("CASCADE");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.primary(["project_id", "slug"]);
    t.index(["post_id"]);
  });

  await knex.schema.createTable("post_milestones", (t) => {
    t.integer("post_id").unsigned().notNullable().references("posts.id").onDelete("CASCADE");
    t.integer("milestone_id").unsigned().notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    // Linked in the post's fields, or only through a milestone block in its text.
    t.boolean("linked_explicitly").notNullable().defaultTo(true);
    // Captured at publication ("then"); null until the post is first published.
    t.string("name", 200).nullable();
    t.enum("then_status", MILESTONE_STATUSES).nullable();
    t.date("then_baseline_finish").nullable();
    t.date("then_forecast_finish").nullable();
    t.date("then_actual_finish").nullable();
    t.double("then_percent_complete").nullable();
    t.dateTime("captured_at", { precision: 3 }).nullable();
    t.primary(["post_id", "milestone_id"]);
    t.index(["milestone_id"]);
  });

  await knex.schema.createTable("post_tags", (t) => {
    t.integer("post_id").unsigned().notNullable().references("posts.id").onDelete("CASCADE");
    t.enum("kind", ["area", "system"]).notNullable();
    t.string("value", 100).notNullable();
    t.primary(["post_id", "kind", "value"]);
    t.index(["value"]);
  });

  await knex.schema.createTable("post_media", (t) => {
    // The photos a post shows: its cover and every inline image, in order.
    t.integer("post_id").unsigned().notNullable().references("posts.id").onDelete("CASCADE");
    t.integer("media_id").unsigned().notNullable();
    t.enum("role", ["cover", "inline"]).notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    t.primary(["post_id", "role", "media_id"]);
    t.index(["media_id"]);
  });

  await knex.schema.createTable("stories", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("slug", 120).notNullable();
    t.string("title", 200).notNullable();
    t.text("intro").notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.enum("status", STATUSES).notNullable().defaultTo("draft");
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("author_name", 200).notNullable();
    t.dateTime("published_at", { precision: 3 }).nullable();
    t.dateTime("withdrawn_at", { precision: 3 }).nullable();
    t.text("review_comment").nullable();
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["project_id", "slug"]);
    t.index(["project_id", "status", "audience", "published_at"]);
  });

  await knex.schema.createTable("story_items", (t) => {
    t.increments("id").primary();
    t.integer("story_id").unsigned().notNullable().references("stories.id").onDelete("CASCADE");
    t.integer("position").unsigned().notNullable();
    t.enum("kind", ["photo", "pair"]).notNullable();
    // A photo item's photo, or a pair's before photo.
    t.integer("media_id").unsigned().notNullable();
    t.integer("after_media_id").unsigned().nullable();
    t.string("area", 100).nullable();
    t.text("caption").notNullable();
    t.unique(["story_id", "position"]);
  });

  await knex.schema.createTable("publishing_events", (t) => {
    // Every workflow step of a post or story, with the reviewer's comment or the reason the
    // scheduler held a post back.
    t.bigIncrements("id").primary();
    t.enum("owner_type", ["post", "story"]).notNullable();
    t.integer("owner_id").unsigned().notNullable();
    t.string("action", 32).notNullable();
    t.enum("from_status", STATUSES).notNullable();
    t.enum("to_status", STATUSES).notNullable();
    t.integer("actor_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("actor_name", 200).nullable();
    t.text("comment").nullable();
    t.dateTime("at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["owner_type", "owner_id", "at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ["publishing_events", "story_items", "stories", "post_media", "post_tags", "post_milestones", "post_slugs", "post_revisions", "posts"]) {
    await knex.schema.dropTableIfExists(table);
  }
}
