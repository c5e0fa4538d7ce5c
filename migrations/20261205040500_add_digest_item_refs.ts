import type { Knex } from "knex";

/**
 * The items a rendered digest tells of (posts, their pictures, milestones, facility names, the
 * record's risks, decisions, changes and documents), as JSON, so a subscriber's archive can withhold
 * one that has since become hidden from its readers (decision 045). Contents rendered before this
 * column have none recorded (NULL): the archive cannot tell their items apart.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("digest_contents", (t) => {
    t.text("item_refs", "mediumtext").nullable().after("text");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("digest_contents", (t) => {
    t.dropColumn("item_refs");
  });
}
