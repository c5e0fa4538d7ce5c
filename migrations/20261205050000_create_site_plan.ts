import type { Knex } from "knex";

const AREA_KINDS = ["hall", "suite", "plant_yard", "energy_centre", "client_area", "other"];
const AUDIENCES = ["public", "investor", "internal"];

/**
 * The site plan (issue #14, decision 054): the site's areas as rectangles of whole grid cells,
 * each with an audience like every other item, a version for stale edits, and its events in the
 * record's one event shape (server/core/record-events.ts). A name is unique within a project, as
 * it is the key the programme's milestones and the photos' area tags share.
 */
export async function up(knex: Knex): Promise<void> {
  const now = () => knex.raw("CURRENT_TIMESTAMP(3)");
  await knex.schema.createTable("site_areas", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("name", 100).notNullable();
    t.enum("kind", AREA_KINDS).notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.tinyint("x").unsigned().notNullable();
    t.tinyint("y").unsigned().notNullable();
    t.tinyint("w").unsigned().notNullable();
    t.tinyint("h").unsigned().notNullable();
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(now());
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(now());
    t.unique(["project_id", "name"]);
  });
  await knex.schema.createTable("site_area_events", (t) => {
    t.bigIncrements("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    // Null once the area is deleted: its history stays with the project.
    t.integer("site_area_id").unsigned().nullable().references("site_areas.id").onDelete("SET NULL");
    t.string("field", 40).notNullable();
    t.string("from_value", 500).nullable();
    t.string("to_value", 500).nullable();
    t.dateTime("at", { precision: 3 }).notNullable();
    t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("note").nullable();
    t.index(["site_area_id", "at"]);
    t.index(["project_id", "at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("site_area_events");
  await knex.schema.dropTableIfExists("site_areas");
}
