import type { Knex } from "knex";

const RECORD_AUDIENCES = ["investor", "internal"];
const RISK_CATEGORIES = ["programme", "cost", "supply_chain", "technical", "commercial", "safety", "regulatory", "other"];
const RISK_STATUSES = ["open", "closed", "became_issue"];
const ACTION_STATUSES = ["planned", "in_progress", "done", "dropped"];
const DECISION_STATUSES = ["open", "decided", "withdrawn"];
const CHANGE_STATUSES = ["proposed", "approved", "rejected"];
const EAC_METHODS = ["bac_over_cpi", "ac_plus_remaining", "ac_plus_remaining_over_cpi_spi"];
const DOCUMENT_CATEGORIES = ["monitoring_report", "lender_pack", "technical", "legal", "certificate", "financial", "other"];
const FILE_TYPES = ["pdf", "jpeg", "png", "webp"];

/**
 * The investor's record: the risks and issues register (with mitigation actions and events),
 * decisions needed, budget changes and the contingency, and the document library with versions,
 * organisations and the view log. Each has its own event table, so "what changed since X" is a
 * query. Nothing here is ever public: audiences are investor or internal.
 */
export async function up(knex: Knex): Promise<void> {
  const now = () => knex.raw("CURRENT_TIMESTAMP(3)");
  const stamps = (t: Knex.CreateTableBuilder) => {
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(now());
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(now());
  };
  const events = async (table: string, subject: string, subjectTable: string) => {
    await knex.schema.createTable(table, (t) => {
      t.bigIncrements("id").primary();
      t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
      t.integer(subject).unsigned().nullable().references(`${subjectTable}.id`).onDelete("CASCADE");
      t.string("field", 40).notNullable();
      t.string("from_value", 500).nullable();
      t.string("to_value", 500).nullable();
      t.dateTime("at", { precision: 3 }).notNullable();
      t.integer("by_user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
      t.text("note").nullable();
      t.index([subject, "at"]);
      t.index(["project_id", "at"]);
    });
  };

  // Project settings of the record: the risk scale and bands, the contingency and the EAC chosen.
  await knex.schema.alterTable("projects", (t) => {
    t.tinyint("risk_likelihood_levels").unsigned().notNullable().defaultTo(5);
    t.tinyint("risk_impact_levels").unsigned().notNullable().defaultTo(5);
    // JSON {"medium":5,"high":10,"critical":16}: the lowest score of each band above low.
    t.string("risk_band_edges", 200).notNullable().defaultTo('{"medium":5,"high":10,"critical":16}');
    t.bigInteger("contingency_held").notNullable().defaultTo(0);
    t.enum("projected_final_cost_method", EAC_METHODS).notNullable().defaultTo("bac_over_cpi");
  });

  // Organisations of investor accounts; a document may be limited to some of them.
  await knex.schema.createTable("organisations", (t) => {
    t.increments("id").primary();
    t.string("name", 120).notNullable().unique();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(now());
  });
  await knex.schema.alterTable("users", (t) => {
    t.integer("organisation_id").unsigned().nullable().references("organisations.id").onDelete("SET NULL");
  });

  await knex.schema.createTable("risks", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.enum("kind", ["risk", "issue"]).notNullable();
    // Per project and kind: R-001 … for risks, I-001 … for issues.
    t.integer("number").unsigned().notNullable();
    t.string("title", 200).notNullable();
    t.text("description").nullable();
    t.text("cause").nullable();
    t.text("effect").nullable();
    t.enum("category", RISK_CATEGORIES).notNullable();
    t.integer("owner_id").unsigned().notNullable().references("users.id").onDelete("RESTRICT");
    t.tinyint("likelihood").unsigned().notNullable();
    t.tinyint("impact").unsigned().notNullable();
    t.bigInteger("cost_min").nullable();
    t.bigInteger("cost_most_likely").nullable();
    t.bigInteger("cost_max").nullable();
    t.double("probability").nullable();
    t.integer("schedule_days").unsigned().nullable();
    t.enum("status", RISK_STATUSES).notNullable().defaultTo("open");
    t.enum("audience", RECORD_AUDIENCES).notNullable();
    t.text("impact_now").nullable();
    t.text("action").nullable();
    t.date("due_date").nullable();
    // An issue opened from a risk points at it.
    t.integer("from_risk_id").unsigned().nullable().references("risks.id").onDelete("SET NULL");
    stamps(t);
    t.unique(["project_id", "kind", "number"]);
    t.index(["project_id", "status"]);
  });
  await knex.schema.raw(
    "ALTER TABLE risks ADD CONSTRAINT risks_levels_positive CHECK (likelihood >= 1 AND impact >= 1), ADD CONSTRAINT risks_probability_range CHECK (probability IS NULL OR (probability >= 0 AND probability <= 1)), ADD CONSTRAINT risks_cost_order CHECK (cost_most_likely IS NULL OR (cost_min <= cost_most_likely AND cost_most_likely <= cost_max))",
  );

  await knex.schema.createTable("risk_mitigations", (t) => {
    t.increments("id").primary();
    t.integer("risk_id").unsigned().notNullable().references("risks.id").onDelete("CASCADE");
    t.string("description", 200).notNullable();
    t.integer("owner_id").unsigned().notNullable().references("users.id").onDelete("RESTRICT");
    t.date("due_date").nullable();
    t.enum("status", ACTION_STATUSES).notNullable().defaultTo("planned");
    t.integer("sort_order").notNullable().defaultTo(0);
    stamps(t);
  });

  for (const [table, column] of [
    ["risk_milestones", "milestone_id"],
    ["risk_blocks", "block_id"],
    ["risk_systems", "system_id"],
  ] as const) {
    const target = { milestone_id: "milestones", block_id: "capacity_blocks", system_id: "plant_systems" }[column];
    await knex.schema.createTable(table, (t) => {
      t.integer("risk_id").unsigned().notNullable().references("risks.id").onDelete("CASCADE");
      t.integer(column).unsigned().notNullable().references(`${target}.id`).onDelete("CASCADE");
      t.primary(["risk_id", column]);
      t.index([column]);
    });
  }
  await events("risk_events", "risk_id", "risks");

  await knex.schema.createTable("decisions", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.string("title", 200).notNullable();
    t.text("question").notNullable();
    t.text("background").nullable();
    // JSON array of {label, consequence, cost}: always read and written whole with the decision.
    t.text("options").notNullable();
    t.integer("recommended_option").unsigned().nullable();
    t.text("recommendation").nullable();
    t.string("decider", 120).notNullable();
    t.date("needed_by").notNullable();
    t.enum("status", DECISION_STATUSES).notNullable().defaultTo("open");
    t.integer("chosen_option").unsigned().nullable();
    t.text("outcome").nullable();
    t.string("decided_by", 120).nullable();
    t.date("decided_on").nullable();
    t.integer("outcome_recorded_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("withdrawn_reason").nullable();
    t.enum("audience", RECORD_AUDIENCES).notNullable();
    stamps(t);
    t.unique(["project_id", "number"]);
    t.index(["project_id", "status", "needed_by"]);
  });
  await knex.schema.createTable("decision_milestones", (t) => {
    t.integer("decision_id").unsigned().notNullable().references("decisions.id").onDelete("CASCADE");
    t.integer("milestone_id").unsigned().notNullable().references("milestones.id").onDelete("CASCADE");
    t.primary(["decision_id", "milestone_id"]);
  });
  await knex.schema.createTable("decision_risks", (t) => {
    t.integer("decision_id").unsigned().notNullable().references("decisions.id").onDelete("CASCADE");
    t.integer("risk_id").unsigned().notNullable().references("risks.id").onDelete("CASCADE");
    t.primary(["decision_id", "risk_id"]);
  });
  await events("decision_events", "decision_id", "decisions");

  await knex.schema.createTable("budget_changes", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.string("description", 500).notNullable();
    t.text("detail").nullable();
    t.bigInteger("amount").notNullable();
    t.enum("status", CHANGE_STATUSES).notNullable().defaultTo("proposed");
    t.string("approved_by", 120).nullable();
    t.date("approved_on").nullable();
    t.boolean("draws_on_contingency").notNullable().defaultTo(false);
    t.enum("audience", RECORD_AUDIENCES).notNullable();
    stamps(t);
    t.unique(["project_id", "number"]);
    t.index(["project_id", "status"]);
  });
  await knex.schema.raw(
    "ALTER TABLE budget_changes ADD CONSTRAINT budget_changes_approval CHECK (status <> 'approved' OR (approved_by IS NOT NULL AND approved_on IS NOT NULL))",
  );
  await knex.schema.createTable("budget_change_milestones", (t) => {
    t.integer("change_id").unsigned().notNullable().references("budget_changes.id").onDelete("CASCADE");
    t.integer("milestone_id").unsigned().notNullable().references("milestones.id").onDelete("CASCADE");
    t.primary(["change_id", "milestone_id"]);
  });
  await knex.schema.createTable("budget_change_risks", (t) => {
    t.integer("change_id").unsigned().notNullable().references("budget_changes.id").onDelete("CASCADE");
    t.integer("risk_id").unsigned().notNullable().references("risks.id").onDelete("CASCADE");
    t.primary(["change_id", "risk_id"]);
  });
  // change_id null: an event of the project's budget settings (contingency held, EAC chosen).
  await events("budget_events", "change_id", "budget_changes");

  await knex.schema.createTable("documents", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.string("title", 200).notNullable();
    t.enum("category", DOCUMENT_CATEGORIES).notNullable();
    t.string("period", 60).notNullable().defaultTo("");
    t.date("period_end").nullable();
    t.enum("audience", RECORD_AUDIENCES).notNullable();
    stamps(t);
    t.index(["project_id", "category"]);
  });
  await knex.schema.createTable("document_organisations", (t) => {
    t.integer("document_id").unsigned().notNullable().references("documents.id").onDelete("CASCADE");
    t.integer("organisation_id").unsigned().notNullable().references("organisations.id").onDelete("CASCADE");
    t.primary(["document_id", "organisation_id"]);
  });
  await knex.schema.createTable("document_versions", (t) => {
    t.increments("id").primary();
    t.integer("document_id").unsigned().notNullable().references("documents.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.enum("file_type", FILE_TYPES).notNullable();
    // Private storage key of the cleaned original (never served as a public file).
    t.string("storage_key", 200).notNullable();
    t.bigInteger("bytes").unsigned().notNullable();
    t.integer("pages").unsigned().nullable();
    t.specificType("sha256", "CHAR(64)").notNullable();
    t.string("original_name", 255).notNullable();
    t.string("note", 500).notNullable().defaultTo("");
    // JSON array of what was removed before storing (JavaScript, launch actions, embedded files …).
    t.text("removed").notNullable();
    t.integer("uploaded_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("uploaded_at", { precision: 3 }).notNullable().defaultTo(now());
    t.unique(["document_id", "number"]);
  });
  await knex.schema.createTable("document_views", (t) => {
    t.bigIncrements("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("document_id").unsigned().notNullable().references("documents.id").onDelete("CASCADE");
    t.integer("version_id").unsigned().notNullable().references("document_versions.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.enum("kind", ["view", "download"]).notNullable();
    t.dateTime("at", { precision: 3 }).notNullable();
    t.string("address", 64).notNullable();
    t.string("agent", 500).notNullable();
    t.index(["document_id", "at"]);
    t.index(["user_id", "at"]);
  });
  // The investor's last visit to a project's documents ("what is new since").
  await knex.schema.createTable("document_visits", (t) => {
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.dateTime("last_visit_at", { precision: 3 }).notNullable();
    t.primary(["project_id", "user_id"]);
  });
  await events("document_events", "document_id", "documents");
}

export async function down(knex: Knex): Promise<void> {
  for (const table of [
    "document_events",
    "document_visits",
    "document_views",
    "document_versions",
    "document_organisations",
    "documents",
    "budget_events",
    "budget_change_risks",
    "budget_change_milestones",
    "budget_changes",
    "decision_events",
    "decision_risks",
    "decision_milestones",
    "decisions",
    "risk_events",
    "risk_systems",
    "risk_blocks",
    "risk_milestones",
    "risk_mitigations",
    "risks",
  ]) {
    await knex.schema.dropTableIfExists(table);
  }
  await knex.schema.alterTable("users", (t) => {
    t.dropForeign(["organisation_id"]);
    t.dropColumn("organisation_id");
  });
  await knex.schema.dropTableIfExists("organisations");
  await knex.schema.alterTable("projects", (t) => {
    for (const column of ["risk_likelihood_levels", "risk_impact_levels", "risk_band_edges", "contingency_held", "projected_final_cost_method"]) t.dropColumn(column);
  });
}
