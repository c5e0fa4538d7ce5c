import type { Knex } from "knex";

/**
 * The project's hero photograph (docs/decisions/055-hero-home-gallery.md): a cleared public photo of
 * the project that staff chose, with the point of it a crop must keep (fractions of width and
 * height from the top left). `hero_version` counts the changes, so two people choosing at once
 * cannot overwrite each other unseen. A deleted photo leaves no hero (the pages fall back to the
 * latest cover).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("projects", (t) => {
    t.integer("hero_media_id").unsigned().nullable().references("media_items.id").onDelete("SET NULL");
    t.double("hero_focus_x").notNullable().defaultTo(0.5);
    t.double("hero_focus_y").notNullable().defaultTo(0.5);
    t.integer("hero_version").unsigned().notNullable().defaultTo(0);
  });
  await knex.schema.raw("ALTER TABLE projects ADD CONSTRAINT projects_hero_focus_range CHECK (hero_focus_x BETWEEN 0 AND 1 AND hero_focus_y BETWEEN 0 AND 1)");
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.raw("ALTER TABLE projects DROP CONSTRAINT projects_hero_focus_range");
  await knex.schema.alterTable("projects", (t) => {
    t.dropForeign(["hero_media_id"]);
    t.dropColumn("hero_media_id");
    t.dropColumn("hero_focus_x");
    t.dropColumn("hero_focus_y");
    t.dropColumn("hero_version");
  });
}
