import type { Knex } from "knex";

const EVENT_FIELDS = ["forecast_finish", "actual_finish", "percent_complete", "baseline_finish", "audience", "planned_start", "weight"];

/**
 * A milestone that has been on record (in a baseline, linked by an update or a photo, or moved
 * since it was entered) is removed from the programme rather than deleted: the row and its
 * history stay, marked with who removed it, when and why. Removal and restoration are events
 * of their own (field `removed`, "false" → "true" and back), so "what moved" reports them.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("milestones", (t) => {
    t.dateTime("removed_at", { precision: 3 }).nullable().after("version");
    t.integer("removed_by_user_id").unsigned().nullable().after("removed_at").references("users.id").onDelete("SET NULL");
    t.text("removed_reason").nullable().after("removed_by_user_id");
  });
  await knex.schema.raw(`ALTER TABLE milestone_events MODIFY field ENUM(${[...EVENT_FIELDS, "removed"].map((f) => `'${f}'`).join(", ")}) NOT NULL`);
}

export async function down(knex: Knex): Promise<void> {
  await knex("milestone_events").where({ field: "removed" }).delete();
  await knex.schema.raw(`ALTER TABLE milestone_events MODIFY field ENUM(${EVENT_FIELDS.map((f) => `'${f}'`).join(", ")}) NOT NULL`);
  await knex.schema.alterTable("milestones", (t) => {
    t.dropForeign(["removed_by_user_id"]);
    t.dropColumn("removed_reason");
    t.dropColumn("removed_by_user_id");
    t.dropColumn("removed_at");
  });
}
