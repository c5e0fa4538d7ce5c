import knexFactory, { type Knex } from "knex";

export type Db = Knex;

/**
 * Connection options shared by the app, scripts and tests. Calendar dates stay
 * `YYYY-MM-DD` strings end to end; instants are UTC DATETIME(3).
 */
type ConnectionOptions = Omit<Knex.MySql2ConnectionConfig, "dateStrings"> & { dateStrings: string[] };

export function connectionFromUrl(url: string, overrides: { database?: string | null } = {}): ConnectionOptions {
  const u = new URL(url);
  const database = overrides.database === null ? undefined : (overrides.database ?? decodeURIComponent(u.pathname.replace(/^\//, "")));
  return {
    host: u.hostname,
    port: u.port ? Number(u.port) : 3306,
    user: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
    ...(database ? { database } : {}),
    charset: "utf8mb4",
    timezone: "Z",
    dateStrings: ["DATE"],
    supportBigNumbers: true,
    connectTimeout: 5000,
  };
}

/** Where Knex's own messages go (a lost connection, say): the app's logger rather than the console. */
export interface DbLog {
  warn(obj: object, msg: string): void;
  error(obj: object, msg: string): void;
  debug(obj: object, msg: string): void;
}

export function createDb(url: string, pool: { min?: number; max?: number } = {}, log?: DbLog): Knex {
  const text = (m: unknown) => (m instanceof Error ? m.message : String(m));
  return knexFactory({
    client: "mysql2",
    connection: connectionFromUrl(url) as unknown as Knex.MySql2ConnectionConfig,
    pool: { min: pool.min ?? 0, max: pool.max ?? 10 },
    acquireConnectionTimeout: 5000,
    // Without a log, Knex prints to the console (the scripts' and tests' default).
    ...(log
      ? {
          log: {
            warn: (m: unknown) => log.warn({ knex: text(m) }, "database connection"),
            error: (m: unknown) => log.error({ knex: text(m) }, "database connection"),
            deprecate: (m: unknown) => log.debug({ knex: text(m) }, "database library"),
            debug: (m: unknown) => log.debug({ knex: text(m) }, "database library"),
          },
        }
      : {}),
  });
}

/** Creates the database named in the URL when it does not exist (utf8mb4). */
export async function ensureDatabase(url: string): Promise<void> {
  const conn = connectionFromUrl(url);
  const name = conn.database;
  if (!name) throw new Error("DATABASE_URL names no database");
  const admin = knexFactory({ client: "mysql2", connection: connectionFromUrl(url, { database: null }) as unknown as Knex.MySql2ConnectionConfig, pool: { min: 0, max: 1 } });
  try {
    await admin.raw("CREATE DATABASE IF NOT EXISTS ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci", [name]);
  } finally {
    await admin.destroy();
  }
}

export async function dropDatabase(url: string): Promise<void> {
  const conn = connectionFromUrl(url);
  const admin = knexFactory({ client: "mysql2", connection: connectionFromUrl(url, { database: null }) as unknown as Knex.MySql2ConnectionConfig, pool: { min: 0, max: 1 } });
  try {
    await admin.raw("DROP DATABASE IF EXISTS ??", [conn.database ?? ""]);
  } finally {
    await admin.destroy();
  }
}
