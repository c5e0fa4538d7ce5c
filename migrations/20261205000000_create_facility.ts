import type { Knex } from "knex";

const AUDIENCES = ["public", "investor", "internal"];
const CONTAINMENT = ["none", "hot_aisle", "cold_aisle", "chimney", "enclosed_rack"];
const PLANT_KINDS = ["cooling", "air_movement", "power_generation", "ups", "fuel_storage", "electrical_distribution", "fire_suppression", "security", "other"];
const RATING_UNITS = ["kW", "kVA", "L", "m3/s"];
const UNIT_STAGES = ["ordered", "delivered", "installed", "L1", "L2", "L3", "L4", "L5"];
const FEATURE_KINDS = ["security", "client", "connectivity", "certification"];
const SECURITY_LAYERS = ["perimeter", "building", "hall", "rack"];
const FEATURE_STATUSES = ["planned", "in_progress", "in_place", "contracted", "in_audit", "certified"];
const SUBJECTS = ["block", "system", "unit", "feature"];
const MEDIA_TAG_KINDS = ["area", "system", "milestone"];
const POST_TAG_KINDS = ["area", "system"];

/**
 * The facility: capacity blocks, plant systems and their units, site features, and one event
 * table for every change (a unit's stage history is its events). Photos and posts may be tagged
 * with a block or a plant system (`block` / `plant` tags holding the id as text).
 */
export async function up(knex: Knex): Promise<void> {
  const timestamps = (t: Knex.CreateTableBuilder) => {
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
  };

  await knex.schema.createTable("capacity_blocks", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("name", 120).notNullable();
    t.integer("racks").unsigned().notNullable();
    t.double("it_kw").notNullable();
    t.double("max_kw_per_rack").notNullable();
    t.string("cooling_approach", 200).notNullable().defaultTo("");
    t.enum("containment", CONTAINMENT).notNullable().defaultTo("none");
    t.enum("audience", AUDIENCES).notNullable();
    t.string("stage", 60).notNullable().defaultTo("");
    t.text("notes").nullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    timestamps(t);
    t.unique(["project_id", "name"]);
    t.index(["project_id", "audience"]);
  });
  await knex.schema.raw(
    "ALTER TABLE capacity_blocks ADD CONSTRAINT capacity_blocks_kw_nonnegative CHECK (it_kw >= 0), ADD CONSTRAINT capacity_blocks_density_positive CHECK (max_kw_per_rack > 0)",
  );

  await knex.schema.createTable("capacity_block_milestones", (t) => {
    t.integer("block_id").unsigned().notNullable().references("capacity_blocks.id").onDelete("CASCADE");
    // RESTRICT: the programme refuses to delete a milestone a block depends on; this is the backstop.
    t.integer("milestone_id").unsigned().notNullable().references("milestones.id").onDelete("RESTRICT");
    t.primary(["block_id", "milestone_id"]);
    t.index(["milestone_id"]);
  });

  await knex.schema.createTable("plant_systems", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("name", 120).notNullable();
    t.enum("kind", PLANT_KINDS).notNullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.integer("needed_per_system").unsigned().notNullable();
    t.integer("independent_systems").unsigned().notNullable().defaultTo(1);
    t.double("rating_per_unit").nullable();
    t.enum("rating_unit", RATING_UNITS).nullable();
    // The design figures (airflow, ΔT, chilled water, supply air, fuel) as JSON: optional,
    // differing by kind, never queried on their own.
    t.text("design").notNullable();
    t.text("notes").nullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    timestamps(t);
    t.unique(["project_id", "name"]);
    t.index(["project_id", "audience"]);
  });
  await knex.schema.raw(
    "ALTER TABLE plant_systems ADD CONSTRAINT plant_systems_needed_positive CHECK (needed_per_system >= 1), ADD CONSTRAINT plant_systems_systems_positive CHECK (independent_systems >= 1), ADD CONSTRAINT plant_systems_rating_with_unit CHECK ((rating_per_unit IS NULL) = (rating_unit IS NULL))",
  );

  await knex.schema.createTable("plant_system_blocks", (t) => {
    t.integer("system_id").unsigned().notNullable().references("plant_systems.id").onDelete("CASCADE");
    t.integer("block_id").unsigned().notNullable().references("capacity_blocks.id").onDelete("CASCADE");
    t.primary(["system_id", "block_id"]);
    t.index(["block_id"]);
  });

  await knex.schema.createTable("plant_system_milestones", (t) => {
    t.integer("system_id").unsigned().notNullable().references("plant_systems.id").onDelete("CASCADE");
    t.integer("milestone_id").unsigned().notNullable().references("milestones.id").onDelete("RESTRICT");
    t.primary(["system_id", "milestone_id"]);
    t.index(["milestone_id"]);
  });

  await knex.schema.createTable("plant_units", (t) => {
    t.increments("id").primary();
    t.integer("system_id").unsigned().notNullable().references("plant_systems.id").onDelete("CASCADE");
    t.string("label", 120).notNullable();
    t.string("tag", 80).notNullable().defaultTo("");
    t.integer("train").unsigned().notNullable().defaultTo(1);
    t.enum("stage", UNIT_STAGES).notNullable().defaultTo("ordered");
    // The day on site the current stage was reached.
    t.date("stage_on").notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    timestamps(t);
    t.unique(["system_id", "label"]);
  });

  await knex.schema.createTable("site_features", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.enum("kind", FEATURE_KINDS).notNullable();
    t.string("name", 120).notNullable();
    t.text("detail").nullable();
    t.enum("layer", SECURITY_LAYERS).nullable();
    t.enum("status", FEATURE_STATUSES).notNullable();
    t.date("status_date").nullable();
    t.enum("audience", AUDIENCES).notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    timestamps(t);
    t.index(["project_id", "kind"]);
  });

  await knex.schema.createTable("facility_events", (t) => {
    t.bigIncrements("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.enum("subject", SUBJECTS).notNullable();
    // No foreign key: the subject may be a block, system, unit or feature; deleting one deletes
    // its events in the same transaction (the service does it).
    t.integer("subject_id").unsigned().notNullable();
    // The subject's name when the event was written, so the history reads after a rename.
    t.string("subject_name", 120).notNullable();
    t.string("field", 40).notNullable();
    t.string("from_value", 200).nullable();
    t.string("to_value", 200).nullable();
    // The day on site (a unit's stage date), and the instant it was recorded.
    t.date("on_date").notNullable();
    t.dateTime("at", { precision: 3 }).notNullable();
    t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("note").nullable();
    t.index(["project_id", "at"]);
    t.index(["project_id", "on_date"]);
    t.index(["subject", "subject_id", "at"]);
  });

  const list = (values: string[]) => values.map((v) => `'${v}'`).join(", ");
  await knex.schema.raw(`ALTER TABLE media_tags MODIFY kind ENUM(${list([...MEDIA_TAG_KINDS, "block", "plant"])}) NOT NULL`);
  await knex.schema.raw(`ALTER TABLE post_tags MODIFY kind ENUM(${list([...POST_TAG_KINDS, "block", "plant"])}) NOT NULL`);
}

export async function down(knex: Knex): Promise<void> {
  const list = (values: string[]) => values.map((v) => `'${v}'`).join(", ");
  await knex("media_tags").whereIn("kind", ["block", "plant"]).delete();
  await knex("post_tags").whereIn("kind", ["block", "plant"]).delete();
  await knex.schema.raw(`ALTER TABLE media_tags MODIFY kind ENUM(${list(MEDIA_TAG_KINDS)}) NOT NULL`);
  await knex.schema.raw(`ALTER TABLE post_tags MODIFY kind ENUM(${list(POST_TAG_KINDS)}) NOT NULL`);
  for (const table of ["facility_events", "site_features", "plant_units", "plant_system_milestones", "plant_system_blocks", "plant_systems", "capacity_block_milestones", "capacity_blocks"]) {
    await knex.schema.dropTableIfExists(table);
  }
}
