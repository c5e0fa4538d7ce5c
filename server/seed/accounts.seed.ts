import type { Knex } from "knex";
import type { Role } from "#shared/schemas/common.ts";
import { hashPassword, verifyPassword } from "../auth/passwords.ts";

/**
 * The demo's sign-ins (the scenario's staff, the record's investors): an account made when it is
 * missing, its password set again when DEMO_PASSWORD changed since the last seed, so the printed
 * sign-ins work. What it did, in words, for the seed's report.
 */
export async function seedAccounts(db: Knex, users: ReadonlyArray<{ email: string; name: string; role: Role }>, password: string): Promise<string[]> {
  const created: string[] = [];
  for (const u of users) {
    const existing = await db("users").where({ email: u.email }).first();
    if (!existing) {
      await db("users").insert({ email: u.email, name: u.name, role: u.role, password_hash: await hashPassword(password) });
      created.push(`user ${u.email}`);
    } else if (!(await verifyPassword(existing.password_hash, password))) {
      await db("users").where({ id: existing.id }).update({ password_hash: await hashPassword(password) });
      created.push(`password of ${u.email}`);
    }
  }
  return created;
}
