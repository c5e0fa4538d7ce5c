import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { MILESTONE_CSV_COLUMNS } from "../../src/shared/schemas/programme.ts";
import { DEMO, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject } from "./posts-fixtures.ts";

/**
 * Issue #9 item 2 beyond posts: the other places text enters refuse control characters with the
 * ordinary 400 naming the field (CSV files name the line), and write nothing. Every field of
 * every schema is checked in tests/domain/schemas-text.test.ts; these go through HTTP.
 */

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

const count = async (table: string, where: Record<string, unknown>) => Number((await t.db(table).where(where).count({ n: "*" }))[0]!.n);
const HEADER = MILESTONE_CSV_COLUMNS.join(",");
const row = (name: string) => `,${name},Commissioning,Hall 2A,cooling,10,0,,2027-03-01,,,public,,,`;

describe("programme", () => {
  it("POST /api/projects/:slug/milestones refuses a control character in the name with 400 naming it, and writes nothing", async () => {
    const p = await createProject(t);
    const lead = await signIn(t, DEMO.lead);
    const res = await lead.agent
      .post(`/api/projects/${p.slug}/milestones`)
      .set("X-CSRF-Token", lead.csrf)
      .send({ name: "Chillers\u0007 commissioned (L4)", phase: "Commissioning", system: "cooling", weight: 10, baselineFinish: "2027-03-01", audience: "public" });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: "validation", fields: { name: "contains a control character (U+0007), which is not allowed" } });
    expect(await count("milestones", { project_id: p.id })).toBe(0);
  });

  it("a CSV import with a control character anywhere is refused with 400 naming the csv field and its line; nothing is written", async () => {
    const p = await createProject(t);
    const lead = await signIn(t, DEMO.lead);
    const csv = [HEADER, row("Chillers delivered"), row("Fans\u0000 installed")].join("\n");
    const res = await lead.agent.post(`/api/projects/${p.slug}/milestones/import`).set("X-CSRF-Token", lead.csrf).send({ csv });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.csv).toBe("contains a control character (U+0000) on line 3, which is not allowed");
    expect(await count("milestones", { project_id: p.id })).toBe(0);
  });

  it("a CSV cell that a spreadsheet wrapped onto two lines gives a one-line name", async () => {
    const p = await createProject(t);
    const lead = await signIn(t, DEMO.lead);
    const csv = [HEADER, row('"Integrated systems\ntest"')].join("\r\n");
    await lead.agent.post(`/api/projects/${p.slug}/milestones/import`).set("X-CSRF-Token", lead.csrf).send({ csv }).expect(200);
    const names = (await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body.map((m: { name: string }) => m.name);
    expect(names).toEqual(["Integrated systems test"]);
  });
});

describe("public forms", () => {
  it("POST /api/projects/:slug/enquiries refuses a control character in the message with 400 naming it, and keeps nothing", async () => {
    const p = await createProject(t);
    const visitor = await newClient(t);
    const res = await visitor.agent
      .post(`/api/projects/${p.slug}/enquiries`)
      .set("X-CSRF-Token", visitor.csrf)
      .send({ kind: "general", name: "Ann Lee", email: "ann@example.test", message: "When will Hall 2A be\u001B ready for service?" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.message).toContain("U+001B");
    expect(await count("enquiries", { project_id: p.id })).toBe(0);
  });

  it("POST /api/subscriptions refuses a line break in the name (a one-line field) with 400 naming it", async () => {
    const visitor = await newClient(t);
    const res = await visitor.agent
      .post("/api/subscriptions")
      .set("X-CSRF-Token", visitor.csrf)
      .send({ email: "neighbour@example.test", name: "Ann\nLee", interest: "neighbour", frequency: "weekly", projectSlug: "aldermere-phase-2" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.name).toBe("must be on one line (no tabs or line breaks)");
  });
});

describe("media", () => {
  it("PATCH /api/media/:id refuses a control character in the credit with 400 naming it, and changes nothing", async () => {
    const p = await createProject(t);
    const photo = await createPhoto(t, p.id, { caption: "Plant yard" });
    const marketing = await signIn(t, DEMO.marketing);
    const res = await marketing.agent.patch(`/api/media/${photo.id}`).set("X-CSRF-Token", marketing.csrf).send({ caption: "Chillers", credit: "Site\u0002 team" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.credit).toContain("U+0002");
    const [stored] = await t.db("media_items").where({ id: photo.id }).select("caption", "credit");
    expect(stored).toEqual({ caption: "Plant yard", credit: null });
  });
});
