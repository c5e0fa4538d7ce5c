import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("users", (t) => {
    t.increments("id").primary();
    t.string("email", 254).notNullable().unique();
    t.string("name", 200).notNullable();
    t.enum("role", ["admin", "lead", "marketing", "investor"]).notNullable();
    t.string("password_hash", 255).notNullable();
    t.dateTime("disabled_at", { precision: 3 }).nullable();
    t.dateTime("last_sign_in_at", { precision: 3 }).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
  });

  await knex.schema.createTable("sessions", (t) => {
    t.string("sid", 128).primary();
    t.integer("user_id").unsigned().nullable().index();
    t.text("sess", "mediumtext").notNullable();
    t.dateTime("expires_at", { precision: 3 }).notNullable().index();
  });

  await knex.schema.createTable("invitations", (t) => {
    t.increments("id").primary();
    t.string("email", 254).notNullable().index();
    t.enum("role", ["admin", "lead", "marketing", "investor"]).notNullable();
    t.specificType("token_hash", "CHAR(64)").notNullable().unique();
    t.integer("invited_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.dateTime("expires_at", { precision: 3 }).notNullable();
    t.dateTime("accepted_at", { precision: 3 }).nullable();
    t.dateTime("revoked_at", { precision: 3 }).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
  });

  await knex.schema.createTable("password_resets", (t) => {
    t.increments("id").primary();
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.specificType("token_hash", "CHAR(64)").notNullable().unique();
    t.dateTime("expires_at", { precision: 3 }).notNullable();
    t.dateTime("used_at", { precision: 3 }).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
  });

  await knex.schema.createTable("audit_events", (t) => {
    t.bigIncrements("id").primary();
    t.dateTime("at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)")).index();
    t.integer("actor_id").unsigned().nullable();
    t.string("actor_email", 254).nullable();
    t.string("action", 64).notNullable().index();
    t.string("target_type", 32).nullable();
    t.string("target_id", 64).nullable();
    t.string("target_label", 254).nullable();
    t.string("ip", 64).nullable();
    t.text("detail").nullable();
  });

  await knex.schema.createTable("mail_messages", (t) => {
    t.bigIncrements("id").primary();
    t.string("message_id", 512).nullable();
    t.string("envelope_from", 512).nullable();
    t.text("to_header").nullable();
    t.text("from_header").nullable();
    t.string("subject", 998).nullable();
    t.dateTime("received_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)")).index();
    t.text("text", "longtext").nullable();
    t.text("html", "longtext").nullable();
    t.text("headers", "longtext").notNullable();
    t.binary("raw").notNullable();
  });
  await knex.raw("ALTER TABLE mail_messages MODIFY raw LONGBLOB NOT NULL");

  await knex.schema.createTable("mail_recipients", (t) => {
    t.bigInteger("message_id").unsigned().notNullable().references("mail_messages.id").onDelete("CASCADE");
    t.string("address", 254).notNullable();
    t.primary(["message_id", "address"]);
    t.index(["address"]);
  });

  await knex.schema.createTable("rate_limit_hits", (t) => {
    t.string("key", 255).primary();
    t.integer("hits").unsigned().notNullable();
    t.dateTime("reset_at", { precision: 3 }).notNullable().index();
  });

  await knex.schema.createTable("projects", (t) => {
    t.increments("id").primary();
    t.string("slug", 100).notNullable().unique();
    t.string("name", 200).notNullable();
    t.string("operator_name", 200).notNullable();
    t.string("location_label", 200).notNullable().defaultTo("");
    t.string("time_zone", 64).notNullable().defaultTo("Europe/London");
    t.text("description").nullable();
    t.text("postal_address").nullable();
    t.specificType("currency", "CHAR(3)").notNullable().defaultTo("GBP");
    t.integer("tolerance_working_days").notNullable().defaultTo(5);
    t.integer("behind_working_days").notNullable().defaultTo(15);
    t.string("weekend_days", 32).notNullable().defaultTo("[6,7]");
    t.text("holidays").nullable();
    t.boolean("visits_offered").notNullable().defaultTo(true);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.raw("CURRENT_TIMESTAMP(3)"));
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const table of [
    "projects",
    "rate_limit_hits",
    "mail_recipients",
    "mail_messages",
    "audit_events",
    "password_resets",
    "invitations",
    "sessions",
    "users",
  ]) {
    await knex.schema.dropTableIfExists(table);
  }
}
