import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";
import { ROLE_MATRIX, type Caller } from "./role-matrix.table.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

async function clientFor(caller: Caller): Promise<{ agent: Agent; csrf: string }> {
  return caller === "anonymous" ? newClient(t) : signIn(t, DEMO[caller]);
}

describe("role matrix: every route × every caller", () => {
  const callers: Caller[] = ["admin", "lead", "marketing", "investor", "anonymous"];
  for (const caller of callers) {
    it(`answers each route as expected for ${caller}`, async () => {
      const failures: string[] = [];
      // One session per caller; rows that end the session (sign-out) run last.
      const rows = [...ROLE_MATRIX].sort((a, b) => Number(a.path === "/api/auth/logout") - Number(b.path === "/api/auth/logout"));
      const { agent, csrf } = await clientFor(caller);
      for (const row of rows) {
        let req = agent[row.method](row.path).set("X-CSRF-Token", csrf);
        if (row.body !== undefined) req = req.send(row.body as object);
        const res = await req;
        if (res.status !== row.expect[caller]) {
          failures.push(`${row.method.toUpperCase()} ${row.path}: expected ${row.expect[caller]}, got ${res.status} ${JSON.stringify(res.body).slice(0, 120)}`);
        }
        if (res.status >= 400 && row.path.startsWith("/api")) {
          expect(res.body.error?.code, `${row.path} error shape`).toEqual(expect.any(String));
          expect(res.body.error?.message, `${row.path} error shape`).toEqual(expect.any(String));
        }
      }
      expect(failures).toEqual([]);
    });
  }
});
