import type { Knex } from "knex";

const SYSTEMS = ["building", "cooling", "power", "fuel", "security", "fit-out", "commissioning"];
const AUDIENCES = ["public", "investor", "internal"];
const EVENT_FIELDS = ["forecast_finish", "actual_finish", "percent_complete", "baseline_finish", "audience", "planned_start", "weight"];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("phases", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("name", 200).notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    t.unique(["project_id", "name"]);
    t.index(["project_id", "sort_order"]);
  });

  await knex.schema.createTable("milestones", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("phase_id").unsigned().notNullable().references("phases.id").onDelete("RESTRICT");
    t.string("name", 200).notNullable();
    t.string("area", 100).notNullable().defaultTo("");
    t.enum("system", SYSTEMS).notNullable();
    t.text("description").nullable();
    // DOUBLE, not DECIMAL: mysql2 returns DECIMAL as strings, and weights and percents are
    // computed as floats anyway.
    t.double("weight").notNullable();
    t.double("percent_complete").notNullable().defaultTo(0);
    // Calendar dates are DATE, read back as 'YYYY-MM-DD' strings (server/db/knex.ts): a day on
    // site, not an instant.
    t.date("planned_start").nullable();
    t.date("baseline_finish").notNullable();
    t.date("forecast_finish").nullable();
    t.date("actual_finish").nullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.bigInteger("budget").nullable();
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["project_id", "audience"]);
    t.index(["project_id", "phase_id", "baseline_finish"]);
  });

  await knex.schema.raw(
    "ALTER TABLE milestones ADD CONSTRAINT milestones_weight_positive CHECK (weight > 0), ADD CONSTRAINT milestones_percent_range CHECK (percent_complete BETWEEN 0 AND 100), ADD CONSTRAINT milestones_budget_nonnegative CHECK (budget IS NULL OR budget >= 0)",
  );

  await knex.schema.createTable("milestone_dependencies", (t) => {
    // Finish-to-start: milestone_id cannot finish before depends_on_id does.
    t.integer("milestone_id").unsigned().notNullable().references("milestones.id").onDelete("CASCADE");
    // RESTRICT: a milestone others depend on is refused deletion by the service; this is the backstop.
    t.integer("depends_on_id").unsigned().notNullable().references("milestones.id").onDelete("RESTRICT");
    t.primary(["milestone_id", "depends_on_id"]);
    t.index(["depends_on_id"]);
  });

  await knex.schema.createTable("baselines", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.text("reason").notNullable();
    t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("at", { precision: 3 }).notNullable();
    // Every milestone's planned start, baseline finish, weight, budget (and name, audience, so
    // an old version stays readable after milestones are renamed or deleted).
    t.text("snapshot", "longtext").notNullable();
    t.unique(["project_id", "number"]);
  });

  await knex.schema.createTable("milestone_events", (t) => {
    t.bigIncrements("id").primary();
    // Deleting a milestone deletes its history with it: an event of a milestone that no longer
    // exists has no audience to check it against.
    t.integer("milestone_id").unsigned().notNullable().references("milestones.id").onDelete("CASCADE");
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.enum("field", EVENT_FIELDS).notNullable();
    t.string("from_value", 64).nullable();
    t.string("to_value", 64).nullable();
    t.dateTime("at", { precision: 3 }).notNullable();
    t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("note").nullable();
    t.integer("baseline_version").unsigned().nullable();
    t.index(["milestone_id", "at"]);
    t.index(["project_id", "at"]);
  });

  await knex.schema.createTable("cost_actuals", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.date("period_end").notNullable();
    t.bigInteger("amount").notNullable();
    t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["project_id", "period_end"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ["cost_actuals", "milestone_events", "baselines", "milestone_dependencies", "milestones", "phases"]) {
    await knex.schema.dropTableIfExists(table);
  }
}
