import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, DEMO, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t?.close();
});

describe("GET /api/users/staff (who may own a risk or an action)", () => {
  it("lists active staff by name with their role, and no investor, no disabled account and no address", async () => {
    const staff = await createUser(t, "marketing");
    const gone = await createUser(t, "lead");
    await t.db("users").where({ id: gone.id }).update({ disabled_at: new Date() });
    const investor = await createUser(t, "investor");

    const lead = await signIn(t, DEMO.lead);
    const list = (await lead.agent.get("/api/users/staff").expect(200)).body as Array<Record<string, unknown>>;
    const ids = list.map((u) => u.id);
    expect(ids).toContain(staff.id);
    expect(ids).not.toContain(gone.id);
    expect(ids).not.toContain(investor.id);
    expect(list.every((u) => u.role !== "investor")).toBe(true);
    for (const u of list) expect(Object.keys(u).sort()).toEqual(["id", "name", "role"]);
    const names = list.map((u) => String(u.name));
    expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b)));
  });

  it("is refused to investors and visitors", async () => {
    const investor = await signIn(t, DEMO.investor);
    await investor.agent.get("/api/users/staff").expect(403);
    const visitor = await newClient(t);
    await visitor.agent.get("/api/users/staff").expect(401);
  });
});
