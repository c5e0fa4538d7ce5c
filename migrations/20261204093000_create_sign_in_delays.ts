import type { Knex } from "knex";

/**
 * Failed sign-ins per (account, client address) pair: the growing wait between attempts
 * from one place at one account, kept in MariaDB so every app process sees the same wait.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("sign_in_delays", (t) => {
    // As typed at sign-in (trimmed, lower-case), whether or not such an account exists.
    t.string("account", 254).notNullable();
    // The client address (an IPv6 client's /56), as the trusted proxies report it.
    t.string("address", 64).notNullable();
    t.integer("failures").unsigned().notNullable().defaultTo(0);
    t.dateTime("blocked_until", { precision: 3 }).nullable();
    t.dateTime("expires_at", { precision: 3 }).notNullable().index();
    t.primary(["account", "address"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("sign_in_delays");
}
