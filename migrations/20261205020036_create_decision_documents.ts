import type { Knex } from "knex";

/**
 * Documents attached to a decision needed (the contract's `documentIds`): the investor record's
 * migration gave decisions links to milestones and risks but no table for their documents.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("decision_documents", (t) => {
    t.integer("decision_id").unsigned().notNullable().references("decisions.id").onDelete("CASCADE");
    t.integer("document_id").unsigned().notNullable().references("documents.id").onDelete("CASCADE");
    t.primary(["decision_id", "document_id"]);
    t.index(["document_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("decision_documents");
}
