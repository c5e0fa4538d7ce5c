import type { Knex } from "knex";

/**
 * Reading stored rows into records, and writing records' fields back. A record's fields are camelCase and its columns snake_case
 * (`projectId` is read from `project_id`), so a reader names each field once, with how its column
 * is read; a column of another name is given to the field's reader. The drivers' own conversions
 * stand (knex.ts: DATE columns arrive as `YYYY-MM-DD` strings, DATETIME as Date, BIGINT as numbers
 * or strings), so each reader says what the record holds, whatever arrived.
 */

export type Row = Record<string, unknown>;

/** How one field is read from a row: `key` is the field's name, for the column it defaults to. */
export type Field<V> = (row: Row, key: string) => V;

/** `projectId` → `project_id`. */
export const columnOf = (key: string) => key.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

function field<V>(read: (value: unknown) => V, column?: string): Field<V> {
  return (row, key) => read(row[column ?? columnOf(key)]);
}

const present = (v: unknown) => v !== null && v !== undefined;
const toDate = (v: unknown) => (v instanceof Date ? v : new Date(v as string));

/** A number (an id, a count, a version). */
export const num = (column?: string) => field((v) => Number(v), column);
export const numOrNull = (column?: string) => numOr(null, column);
/** A number, or `fallback` where none is stored. */
export function numOr<F>(fallback: F, column?: string): Field<number | F> {
  return field((v) => (present(v) ? Number(v) : fallback), column);
}
/** Text; a missing value reads as "". */
export const text = (column?: string) => field((v) => (present(v) ? String(v) : ""), column);
export const textOrNull = (column?: string) => field((v) => (present(v) ? String(v) : null), column);
/** A value of a closed set (a status, a role, an audience), as the shared schema types it. */
export const oneOf = <T>(column?: string) => field((v) => v as T, column);
export const oneOfOrNull = <T>(column?: string) => field((v) => (present(v) ? (v as T) : null), column);
/** A flag (TINYINT 0/1, or "0"/"1" from a computed column). */
export const bool = (column?: string) => field((v) => Boolean(Number(v)), column);
export const date = (column?: string) => field((v) => toDate(v), column);
export const dateOrNull = (column?: string) => field((v) => (present(v) ? toDate(v) : null), column);
/** An instant as ISO 8601 text (UTC), as the API answers it. */
export const instant = (column?: string) => field((v) => toDate(v).toISOString(), column);
export const instantOrNull = (column?: string) => field((v) => (present(v) ? toDate(v).toISOString() : null), column);
/** A JSON column; an empty or missing one reads as `empty`. */
export const json = <T>(empty: T, column?: string) => field((v) => (present(v) && v !== "" ? (JSON.parse(String(v)) as T) : empty), column);

/** A reader of a whole record: every field of `T` names how it is read, checked by the compiler. */
export function readRow<T>(fields: { [K in keyof T]-?: Field<T[K]> }): (row: Row) => T {
  const entries = Object.entries(fields) as Array<[string, Field<unknown>]>;
  return (row) => {
    const record: Record<string, unknown> = {};
    for (const [key, read] of entries) record[key] = read(row, key);
    return record as T;
  };
}

/**
 * The columns a write sets: each of `keys` that the fields give, under its snake_case column (a
 * field left undefined leaves its column as it is; a key not listed is never written).
 */
export function columnsOf<F extends object>(fields: F, keys: readonly (keyof F & string)[]): Row {
  const row: Row = {};
  for (const key of keys) if (fields[key] !== undefined) row[columnOf(key)] = fields[key];
  return row;
}

type Q = Knex | Knex.Transaction;

/** How many rows `query` finds. */
export async function countOf(query: Knex.QueryBuilder): Promise<number> {
  const r = (await query.count({ n: "*" }).first()) as { n?: number | string } | undefined;
  return Number(r?.n ?? 0);
}

/** The first row `query` finds (`forUpdate` locks it for the rest of the transaction), or undefined. */
export async function firstRow(query: Knex.QueryBuilder, opts: { forUpdate?: boolean } = {}): Promise<Row | undefined> {
  if (opts.forUpdate) query.forUpdate();
  return (await query.first()) as Row | undefined;
}

/**
 * Optimistic concurrency: the row changes only while it still has `version`, and its version goes
 * up by one. Returns the number of rows changed (0 = someone else saved first).
 */
export function updateVersioned(q: Q, table: string, id: number, version: number, columns: Row, at: Date): Promise<number> {
  return q(table)
    .where({ id, version })
    .update({ ...columns, version: version + 1, updated_at: at });
}

/** The project a row belongs to, whoever may see it (the caller's audience is checked after). */
export async function projectIdOf(q: Q, table: string, id: number): Promise<number | null> {
  const r = (await q(table).where({ id }).first("project_id")) as { project_id: unknown } | undefined;
  return r ? Number(r.project_id) : null;
}
