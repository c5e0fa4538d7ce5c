import type { Knex } from "knex";

/**
 * A plant unit counts as available to carry load from a commissioning level the project sets
 * (1 … 5; default 4, the functional test passed), kept with the project's other settings.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("projects", (t) => {
    t.tinyint("available_from_level").unsigned().notNullable().defaultTo(4);
  });
  await knex.schema.raw("ALTER TABLE projects ADD CONSTRAINT projects_available_from_level_range CHECK (available_from_level BETWEEN 1 AND 5)");
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.raw("ALTER TABLE projects DROP CONSTRAINT projects_available_from_level_range");
  await knex.schema.alterTable("projects", (t) => {
    t.dropColumn("available_from_level");
  });
}
