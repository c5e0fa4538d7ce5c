import type { Knex } from "knex";

type Q = Knex | Knex.Transaction;

/**
 * Makes a parent's rows in `table` exactly `rows` (each row names the parent's columns too),
 * for repositories to call on their own tables. Every statement names whole primary keys
 * (`parent` + `key`): a delete by the parent alone, even of no rows, takes a gap lock, and two
 * parents written at the same moment then wait on each other's gap to insert, a deadlock.
 * Rows kept get their other columns updated (columns a row does not name are left as they are);
 * rows no longer wanted are deleted, new ones inserted.
 *
 * The caller holds the parent's own row locked (or has just inserted it), so no other writer
 * changes these rows meanwhile and a plain read of the current keys will do.
 */
export async function replaceChildRows(
  q: Q,
  table: string,
  parent: Readonly<Record<string, unknown>>,
  key: readonly string[],
  rows: ReadonlyArray<Readonly<Record<string, unknown>>>,
): Promise<void> {
  const keyOf = (r: Readonly<Record<string, unknown>>) => JSON.stringify(key.map((k) => r[k]));
  const pick = (r: Readonly<Record<string, unknown>>) => Object.fromEntries(key.map((k) => [k, r[k]]));
  const existing = new Map<string, Record<string, unknown>>();
  for (const r of (await q(table).where(parent).select([...key])) as Array<Record<string, unknown>>) existing.set(keyOf(r), pick(r));
  const wanted = new Map(rows.map((r) => [keyOf(r), r]));

  const gone = [...existing].filter(([k]) => !wanted.has(k)).map(([, r]) => r);
  if (key.length === 1) {
    if (gone.length) await q(table).where(parent).whereIn(key[0]!, gone.map((r) => r[key[0]!] as Knex.Value)).delete();
  } else {
    for (const r of gone) await q(table).where({ ...parent, ...r }).delete();
  }
  const added: Array<Readonly<Record<string, unknown>>> = [];
  for (const [k, row] of wanted) {
    const kept = existing.get(k);
    if (!kept) {
      added.push(row);
      continue;
    }
    const rest = Object.fromEntries(Object.entries(row).filter(([c]) => !key.includes(c) && !(c in parent)));
    if (Object.keys(rest).length) await q(table).where({ ...parent, ...kept }).update(rest);
  }
  if (added.length) await q(table).insert(added);
}
