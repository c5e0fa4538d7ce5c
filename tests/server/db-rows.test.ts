import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Knex } from "knex";
import { createDb } from "../../server/db/knex.ts";
import { bool, columnOf, columnsOf, date, dateOrNull, instant, instantOrNull, json, num, numOr, numOrNull, oneOf, projectIdOf, readRow, text, textOrNull, updateVersioned } from "../../server/db/rows.ts";

// The row readers against what the project's own MariaDB connection hands back (knex.ts: DATE as
// text, DATETIME as Date, TINYINT as a number), not against values typed in by hand.

let db: Knex;
const table = `rows_check_${process.pid}`;

beforeAll(async () => {
  db = createDb(inject("databaseUrl"), { max: 2 });
  await db.schema.dropTableIfExists(table);
  await db.schema.createTable(table, (t) => {
    t.increments("id");
    t.integer("project_id").notNullable();
    t.string("stage_name", 40).notNullable();
    t.string("note", 200).nullable();
    t.integer("owner_id").nullable();
    t.integer("level").nullable();
    t.boolean("is_open").notNullable();
    t.date("due_on").nullable();
    t.datetime("sent_at", { precision: 3 }).nullable();
    t.text("tags").nullable();
    t.integer("version").notNullable();
    t.datetime("updated_at", { precision: 3 }).notNullable();
  });
});

afterAll(async () => {
  await db.schema.dropTableIfExists(table);
  await db.destroy();
});

interface Thing {
  id: number;
  projectId: number;
  stage: "design" | "built";
  note: string | null;
  ownerId: number | null;
  level: number;
  isOpen: boolean;
  dueOn: string | null;
  sentAt: Date | null;
  sentAtText: string | null;
  tags: string[];
  version: number;
}

const toThing = readRow<Thing>({
  id: num(), projectId: num(), stage: oneOf<Thing["stage"]>("stage_name"), note: textOrNull(), ownerId: numOrNull(), level: numOr(4), isOpen: bool(),
  dueOn: textOrNull(), sentAt: dateOrNull(), sentAtText: instantOrNull("sent_at"), tags: json<string[]>([]), version: num(),
});

describe("row readers", () => {
  it("read a full row: numbers, a renamed column, a DATE as its calendar text, a DATETIME as Date and ISO text, a flag, JSON", async () => {
    const at = new Date("2026-11-30T09:15:00.250Z");
    const [id] = await db(table).insert({ project_id: 7, stage_name: "built", note: "Hall 2A", owner_id: 3, level: 5, is_open: true, due_on: "2027-03-31", sent_at: at, tags: JSON.stringify(["power", "cooling"]), version: 2, updated_at: at });
    const thing = toThing(await db(table).where({ id }).first());
    expect(thing).toEqual({ id: Number(id), projectId: 7, stage: "built", note: "Hall 2A", ownerId: 3, level: 5, isOpen: true, dueOn: "2027-03-31", sentAt: at, sentAtText: "2026-11-30T09:15:00.250Z", tags: ["power", "cooling"], version: 2 });
  });

  it("read the empty columns as the record says: null, the fallback number, an empty list, false", async () => {
    const [id] = await db(table).insert({ project_id: 7, stage_name: "design", is_open: false, version: 1, updated_at: new Date() });
    const thing = toThing(await db(table).where({ id }).first());
    expect(thing).toMatchObject({ note: null, ownerId: null, level: 4, isOpen: false, dueOn: null, sentAt: null, sentAtText: null, tags: [] });
  });

  it("read a flag given as text from a computed column, and missing text as empty", () => {
    const read = readRow<{ a: boolean; b: boolean; c: string; d: Date; e: string }>({ a: bool(), b: bool(), c: text(), d: date(), e: instant() });
    expect(read({ a: "0", b: "1", c: null, d: "2026-01-02T03:04:05.000Z", e: new Date(0) })).toEqual({ a: false, b: true, c: "", d: new Date("2026-01-02T03:04:05.000Z"), e: "1970-01-01T00:00:00.000Z" });
  });
});

describe("row writers", () => {
  it("name each field's column in snake_case", () => {
    expect(["projectId", "kwPerRack", "sha256", "name"].map(columnOf)).toEqual(["project_id", "kw_per_rack", "sha256", "name"]);
  });

  it("write only the listed fields that are given; null is written, undefined is not", () => {
    const fields: { note?: string | null; ownerId?: number | null; stage?: string; secret?: string } = { note: null, ownerId: 4, secret: "x" };
    expect(columnsOf(fields, ["note", "ownerId", "stage"])).toEqual({ note: null, owner_id: 4 });
  });

  it("change a row only at the version it was read at, and find its project whoever asks", async () => {
    const [id] = await db(table).insert({ project_id: 9, stage_name: "design", is_open: true, version: 1, updated_at: new Date() });
    const at = new Date("2026-12-01T00:00:00.000Z");
    expect(await updateVersioned(db, table, Number(id), 1, { note: "first" }, at)).toBe(1);
    // The same version again: someone else saved first, nothing changes.
    expect(await updateVersioned(db, table, Number(id), 1, { note: "second" }, at)).toBe(0);
    const row = await db(table).where({ id }).first();
    expect([row.note, row.version, (row.updated_at as Date).toISOString()]).toEqual(["first", 2, at.toISOString()]);
    expect(await projectIdOf(db, table, Number(id))).toBe(9);
    expect(await projectIdOf(db, table, Number(id) + 1000)).toBeNull();
  });
});
