import { describe, expect, it } from "vitest";
import type { UserRow } from "../../src/shared/schemas/users.ts";
import { createUser, DEMO, newClient } from "../helpers/app.ts";
import { useAppAsEveryRole, type Client } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
let seq = 0;
const orgName = () => `Test organisation ${Date.now().toString(36)}-${seq++}`;
const send = (c: Client, method: "post" | "patch", path: string, body: object) => c.agent[method](path).set("X-CSRF-Token", c.csrf).send(body);

describe("organisations of investor accounts", () => {
  it("GET /api/organisations is staff's; POST is the admin's, refuses a name twice (409) and writes the audit log", async () => {
    const name = orgName();
    expect((await send(f.as.lead, "post", "/api/organisations", { name })).status).toBe(403);
    const created = await send(f.as.admin, "post", "/api/organisations", { name });
    expect(created.status).toBe(201);
    expect(created.body).toEqual({ id: expect.any(Number), name, investors: 0 });
    const again = await send(f.as.admin, "post", "/api/organisations", { name });
    expect(again.status).toBe(409);
    expect(again.body.error.fields).toEqual({ name: "is already the name of an organisation" });
    expect((await send(f.as.admin, "post", "/api/organisations", { name: "" })).status).toBe(400);
    expect(await f.t.db("organisations").where({ name })).toHaveLength(1);
    expect(await f.t.db("audit_events").where({ action: "organisation_created", target_id: String(created.body.id) })).toHaveLength(1);

    for (const c of [f.as.admin, f.as.lead, f.as.marketing]) {
      const list = await c.agent.get("/api/organisations");
      expect(list.status).toBe(200);
      expect(list.body.map((o: { name: string }) => o.name)).toContain(name);
    }
    expect((await f.as.investor.agent.get("/api/organisations")).status).toBe(403);
    expect((await (await newClient(f.t)).agent.get("/api/organisations")).status).toBe(401);
  });

  it("the demo investor belongs to their fund, the lender's account to the bank", async () => {
    const users = (await f.as.admin.agent.get("/api/users")).body as UserRow[];
    expect(users.find((u) => u.email === DEMO.investor)?.organisation?.name).toBe("Harbourfund Infrastructure Partners");
    expect(users.find((u) => u.email === "credit@northmoorbank.example")?.organisation?.name).toBe("Northmoor Bank (lender)");
    expect(users.find((u) => u.email === DEMO.lead)?.organisation).toBeNull();
    const orgs = (await f.as.lead.agent.get("/api/organisations")).body as Array<{ name: string; investors: number }>;
    expect(orgs.find((o) => o.name === "Northmoor Bank (lender)")?.investors).toBe(1);
  });

  it("PATCH /api/users/:id/organisation: admin only; only investors may have one (422); an unknown organisation is 422; changing the role away from investor clears it", async () => {
    const org = (await send(f.as.admin, "post", "/api/organisations", { name: orgName() })).body as { id: number; name: string };
    const investor = await createUser(f.t, "investor");
    const staff = await createUser(f.t, "lead");

    expect((await send(f.as.lead, "patch", `/api/users/${investor.id}/organisation`, { organisationId: org.id })).status).toBe(403);
    const notInvestor = await send(f.as.admin, "patch", `/api/users/${staff.id}/organisation`, { organisationId: org.id });
    expect(notInvestor.status).toBe(422);
    expect(notInvestor.body.error.fields).toEqual({ organisationId: "may be set only for an investor" });
    const unknown = await send(f.as.admin, "patch", `/api/users/${investor.id}/organisation`, { organisationId: 999_999_999 });
    expect(unknown.status).toBe(422);
    expect(Object.keys(unknown.body.error.fields)).toEqual(["organisationId"]);
    expect((await send(f.as.admin, "patch", "/api/users/999999999/organisation", { organisationId: null })).status).toBe(404);
    expect((await f.t.db("users").whereIn("id", [investor.id, staff.id]).whereNotNull("organisation_id")).length).toBe(0);

    const set = await send(f.as.admin, "patch", `/api/users/${investor.id}/organisation`, { organisationId: org.id });
    expect(set.status).toBe(200);
    expect(set.body).toMatchObject({ id: investor.id, role: "investor", organisation: { id: org.id, name: org.name } });
    expect(await f.t.plumbline.users.organisationOf(investor.id)).toEqual({ id: org.id, name: org.name });
    const [audit] = await f.t.db("audit_events").where({ action: "user_organisation_changed", target_id: String(investor.id) });
    expect(JSON.parse(audit.detail)).toMatchObject({ from: null, to: org.id, organisation: org.name });

    const promoted = await send(f.as.admin, "patch", `/api/users/${investor.id}`, { role: "marketing" });
    expect(promoted.status).toBe(200);
    expect(promoted.body.organisation).toBeNull();
    expect(await f.t.plumbline.users.organisationOf(investor.id)).toBeNull();
  });
});
