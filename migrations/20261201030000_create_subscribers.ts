import type { Knex } from "knex";

const INTERESTS = ["prospect", "investor", "press", "neighbour"];
const FREQUENCIES = ["immediate", "weekly", "monthly"];
const SUBSCRIBER_STATUSES = ["pending", "confirmed", "unsubscribed", "bounced", "complained"];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("subscribers", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    // Set for an investor account's own digest (kept in the investor room); null for visitors.
    t.integer("user_id").unsigned().nullable().references("users.id").onDelete("CASCADE");
    t.string("email", 254).notNullable();
    // SHA-256 of the normalised address, so a join against `suppressions` needs no address.
    t.specificType("email_hash", "CHAR(64)").notNullable();
    t.string("name", 200).notNullable();
    t.string("organisation", 200).nullable();
    t.enum("interest", INTERESTS).notNullable();
    // What the digest may contain: only investor accounts receive the investor audience.
    t.enum("audience", ["public", "investor"]).notNullable().defaultTo("public");
    t.enum("frequency", FREQUENCIES).notNullable();
    // JSON { areas: string[], systems: string[] }; NULL = every topic.
    t.text("topics").nullable();
    // "all", or the SHA-256 of the canonical topics: digests render once per (audience, topics_key, window).
    t.string("topics_key", 64).notNullable().defaultTo("all");
    t.enum("status", SUBSCRIBER_STATUSES).notNullable().defaultTo("pending");
    t.dateTime("status_changed_at", { precision: 3 }).nullable();
    // Consent evidence: when, from where, which wording, and how it was collected.
    t.dateTime("consent_at", { precision: 3 }).nullable();
    t.string("consent_ip", 64).nullable();
    t.string("consent_version", 32).nullable();
    t.string("consent_source", 255).nullable();
    // The single-use part of the confirmation link; cleared once confirmed.
    t.string("confirm_nonce", 32).nullable();
    t.dateTime("pending_since", { precision: 3 }).nullable();
    t.dateTime("confirmed_at", { precision: 3 }).nullable();
    t.string("confirm_ip", 64).nullable();
    t.dateTime("unsubscribed_at", { precision: 3 }).nullable();
    // The end of the window of the last digest delivered to this subscriber.
    t.dateTime("last_digest_at", { precision: 3 }).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.unique(["project_id", "email"]);
    t.unique(["project_id", "user_id"]);
    t.index(["project_id", "status", "frequency", "audience", "topics_key"], "subscribers_digest_selection");
    t.index(["status", "pending_since"]);
    t.index(["email_hash"]);
  });

  await knex.schema.createTable("suppressions", (t) => {
    t.increments("id").primary();
    // Only a hash: an erased person's address is not kept, yet it can be recognised if it comes back.
    t.specificType("email_hash", "CHAR(64)").notNullable().unique();
    t.enum("reason", ["bounced", "complained", "erased"]).notNullable();
    t.string("source", 32).notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
  });

  // A small outbound queue for subscription e-mails (confirmation, welcome, "already subscribed"):
  // the HTTP answer never waits on SMTP, a crash loses nothing, and several processes share it.
  await knex.schema.createTable("subscriber_mail_jobs", (t) => {
    t.bigIncrements("id").primary();
    t.integer("subscriber_id").unsigned().notNullable().references("subscribers.id").onDelete("CASCADE");
    t.enum("kind", ["confirmation", "welcome", "already_subscribed"]).notNullable();
    t.enum("status", ["queued", "sent", "failed", "skipped"]).notNullable().defaultTo("queued");
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    t.dateTime("run_after", { precision: 3 }).notNullable();
    t.dateTime("lease_until", { precision: 3 }).nullable();
    t.string("last_error", 500).nullable();
    t.string("message_id", 255).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("sent_at", { precision: 3 }).nullable();
    t.index(["status", "run_after"]);
    t.index(["subscriber_id"]);
  });

  await knex.schema.createTable("enquiries", (t) => {
    t.increments("id").primary();
    t.integer("project_id").unsigned().notNullable().references("projects.id").onDelete("CASCADE");
    t.enum("kind", ["capacity", "visit", "general"]).notNullable();
    t.string("name", 200).notNullable();
    t.string("email", 254).notNullable();
    t.string("organisation", 200).nullable();
    t.string("phone", 40).nullable();
    t.text("message").nullable();
    // Capacity: racks, kW per rack, the date the space is needed.
    t.integer("racks").unsigned().nullable();
    t.double("kw_per_rack").nullable();
    t.date("needed_by").nullable();
    // Site visit: up to three preferred dates (JSON array of YYYY-MM-DD), the size of the party.
    t.string("preferred_dates", 64).nullable();
    t.integer("party_size").unsigned().nullable();
    t.dateTime("rules_accepted_at", { precision: 3 }).nullable();
    t.enum("status", ["new", "contacted", "closed"]).notNullable().defaultTo("new");
    t.integer("owner_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("notes").nullable();
    t.string("ip", 64).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.index(["project_id", "status", "created_at"]);
    t.index(["email"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ["enquiries", "subscriber_mail_jobs", "suppressions", "subscribers"]) {
    await knex.schema.dropTableIfExists(table);
  }
}
