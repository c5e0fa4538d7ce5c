import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { isDeadlock, retryOnDeadlock } from "../../server/db/retry.ts";
import { DEMO, DEMO_PASSWORD, newClient, startTestApp, type TestApp } from "../helpers/app.ts";

// A transaction that InnoDB picks as a deadlock's victim is rolled back whole and may run again.
// Source: MariaDB Knowledge Base, "InnoDB Lock Modes" / error 1213 ER_LOCK_DEADLOCK ("try restarting
// transaction"); Galera reports a certification conflict with the same error (MariaDB Galera
// Cluster known limitations).

let t: TestApp;
const TABLE = "retry_probe";

beforeAll(async () => {
  t = await startTestApp();
  await t.db.schema.dropTableIfExists(TABLE);
  await t.db.schema.createTable(TABLE, (tb) => {
    tb.integer("id").primary();
    tb.integer("n").notNullable();
  });
  await t.db(TABLE).insert([
    { id: 1, n: 0 },
    { id: 2, n: 0 },
  ]);
});
afterAll(async () => {
  await t.db.schema.dropTableIfExists(TABLE);
  await t.close();
});

/** Two transactions that take the same two row locks in opposite order, meeting in the middle: one is a deadlock's victim. */
async function crossedPair(wrap: <T>(work: () => Promise<T>) => Promise<T>) {
  let arrived = 0;
  let release!: () => void;
  const bothHoldOne = new Promise<void>((r) => (release = r));
  const tx = (first: number, second: number) =>
    wrap(() =>
      t.db.transaction(async (trx) => {
        await trx(TABLE).where({ id: first }).increment("n", 1);
        // Only the first attempt waits for the other: a rerun goes straight through.
        if (arrived < 2) {
          arrived += 1;
          if (arrived === 2) release();
          await bothHoldOne;
        }
        await trx(TABLE).where({ id: second }).increment("n", 1);
      }),
    );
  return Promise.allSettled([tx(1, 2), tx(2, 1)]);
}

describe("retryOnDeadlock against a real InnoDB deadlock", () => {
  it("without it, one of two crossed transactions fails with ER_LOCK_DEADLOCK and its writes are rolled back", async () => {
    const before = await t.db(TABLE).sum({ s: "n" }).first();
    const results = await crossedPair((work) => work());
    const failed = results.filter((r) => r.status === "rejected");
    expect(failed).toHaveLength(1);
    expect(isDeadlock((failed[0] as PromiseRejectedResult).reason)).toBe(true);
    const after = await t.db(TABLE).sum({ s: "n" }).first();
    // Only the survivor's two increments remain.
    expect(Number(after!.s) - Number(before!.s)).toBe(2);
  });

  it("with it, both transactions complete and every increment is counted once", async () => {
    const before = await t.db(TABLE).sum({ s: "n" }).first();
    const results = await crossedPair((work) => retryOnDeadlock(work));
    expect(results.map((r) => r.status)).toEqual(["fulfilled", "fulfilled"]);
    const after = await t.db(TABLE).sum({ s: "n" }).first();
    expect(Number(after!.s) - Number(before!.s)).toBe(4);
  });

  it("passes any other error through at once, and gives up after its attempts", async () => {
    let calls = 0;
    await expect(
      retryOnDeadlock(async () => {
        calls += 1;
        throw Object.assign(new Error("dup"), { code: "ER_DUP_ENTRY" });
      }),
    ).rejects.toThrow("dup");
    expect(calls).toBe(1);
    calls = 0;
    await expect(
      retryOnDeadlock(
        async () => {
          calls += 1;
          throw Object.assign(new Error("Deadlock found"), { code: "ER_LOCK_DEADLOCK", errno: 1213 });
        },
        { attempts: 3, baseMs: 1 },
      ),
    ).rejects.toThrow("Deadlock found");
    expect(calls).toBe(3);
  });
});

describe("simultaneous sign-ins from one address", () => {
  it("forty at once, ten per demo account, are all signed in (no lock race answers 500)", async () => {
    const accounts = [DEMO.admin, DEMO.lead, DEMO.marketing, DEMO.investor];
    const clients = await Promise.all(Array.from({ length: 40 }, () => newClient(t)));
    const statuses = await Promise.all(
      clients.map((c, i) => c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: accounts[i % 4], password: DEMO_PASSWORD }).then((r) => r.status)),
    );
    expect(statuses).toEqual(Array(40).fill(200));
  });
});
