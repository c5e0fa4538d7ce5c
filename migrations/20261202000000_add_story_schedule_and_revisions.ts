import type { Knex } from "knex";

const AUDIENCES = ["public", "investor", "internal"];
const STATUSES = ["draft", "in_review", "approved", "scheduled", "published", "withdrawn"];

/**
 * Photo stories get what updates have (migrations/20261201040000_create_posts.ts): a
 * publication time for the scheduler, a revision per save, and their earlier addresses so old
 * links redirect. Each story that already exists gets revision 1 as it stands, so it can be
 * compared with and restored to from its next save on.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("stories", (t) => {
    t.dateTime("scheduled_for", { precision: 3 }).nullable().after("author_name");
    // The scheduler's claim: due scheduled stories across all projects.
    t.index(["status", "scheduled_for"]);
  });

  await knex.schema.createTable("story_revisions", (t) => {
    t.bigIncrements("id").primary();
    t.integer("story_id").unsigned().notNullable().references("stories.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.string("title", 200).notNullable();
    t.text("intro").notNullable();
    t.string("slug", 120).notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.enum("status", STATUSES).notNullable();
    // JSON array: the items as saved, in order (the shape of StoryItemInput).
    t.text("items", "mediumtext").notNullable();
    t.string("note", 500).nullable();
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("author_name", 200).notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["story_id", "number"]);
  });

  await knex.schema.createTable("story_slugs", (t) => {
    // A story's earlier addresses, kept so old links redirect (301) to the current one.
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("slug", 120).notNullable();
    t.integer("story_id").unsigned().notNullable().references("stories.id").onDelete("CASCADE");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.primary(["project_id", "slug"]);
    t.index(["story_id"]);
  });

  const stories = await knex("stories").select("id", "slug", "title", "intro", "audience", "status", "author_id", "author_name", "updated_at");
  for (const s of stories) {
    const rows = await knex("story_items").where({ story_id: s.id }).orderBy("position");
    const items = rows.map((r) =>
      r.kind === "photo"
        ? { kind: "photo", mediaId: Number(r.media_id), caption: String(r.caption ?? "") }
        : { kind: "pair", area: String(r.area ?? ""), beforeMediaId: Number(r.media_id), afterMediaId: Number(r.after_media_id), caption: String(r.caption ?? "") },
    );
    await knex("story_revisions").insert({
      story_id: s.id,
      number: 1,
      title: s.title,
      intro: s.intro ?? "",
      slug: s.slug,
      audience: s.audience,
      status: s.status,
      items: JSON.stringify(items),
      note: "As it stood when revisions began",
      author_id: s.author_id,
      author_name: s.author_name,
      created_at: s.updated_at,
    });
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("story_slugs");
  await knex.schema.dropTableIfExists("story_revisions");
  await knex.schema.alterTable("stories", (t) => {
    t.dropIndex(["status", "scheduled_for"]);
    t.dropColumn("scheduled_for");
  });
}
