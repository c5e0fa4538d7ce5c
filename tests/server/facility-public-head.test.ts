import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { createProject, type EveryRole, useAppAsEveryRole } from "./posts-fixtures.ts";

// The facility page's head as the server sends it: link previews and readers without
// JavaScript get the public blocks' figures in the title, description and Open Graph tags.

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

async function write(path: string, body: Record<string, unknown>): Promise<{ id: number }> {
  const res = await as.lead.agent.post(path).set("X-CSRF-Token", as.lead.csrf).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number };
}

/** A project with a public block that depends on a late milestone, and an investors' block. */
async function facilityProject() {
  const p = await createProject(t);
  const m = await write(`/api/projects/${p.slug}/milestones`, { name: "Hall 9 integrated systems test", phase: "Commissioning", system: "commissioning", weight: 1, audience: "public", baselineFinish: "2027-04-02", forecastFinish: "2027-05-14" });
  await write(`/api/projects/${p.slug}/facility/blocks`, { name: "Hall 9 & <annexe>", racks: 1200, itKw: 480, maxKwPerRack: 12.5, audience: "public", dependsOn: [m.id] });
  await write(`/api/projects/${p.slug}/facility/blocks`, { name: "Reserved suite", racks: 10, itKw: 200, maxKwPerRack: 20, audience: "investor" });
  return p;
}

describe("GET /projects/:slug/facility (the HTML shell's head)", () => {
  it("carries the title, a description with each public block's racks, kW, density and ready date, and the Open Graph tags", async () => {
    const p = await facilityProject();
    const res = await (await newClient(t)).agent.get(`/projects/${p.slug}/facility`).expect(200);
    expect(res.headers["content-type"]).toMatch(/text\/html/);
    expect(res.text).toMatch(new RegExp(`<title>Capacity and readiness · Test campus ${p.slug}</title>`));
    const description = `Capacity blocks of Test campus ${p.slug}. Hall 9 &amp; &lt;annexe&gt;: 1,200 racks, 480 kW IT, up to 12.5 kW per rack, ready for service: forecast 14 May 2027 (planned 2 April 2027).`;
    expect(res.text).toContain(`<meta name="description" content="${description}">`);
    expect(res.text).toContain(`<meta property="og:description" content="${description}">`);
    expect(res.text).toContain('<meta property="og:title" content="Capacity and readiness">');
    expect(res.text).toContain('<meta property="og:type" content="website">');
    expect(res.text).toContain(`<meta property="og:url" content="http://plumbline.test/projects/${p.slug}/facility">`);
    expect(res.text).toContain(`<link rel="canonical" href="http://plumbline.test/projects/${p.slug}/facility">`);
  });

  it("names no block hidden from the public, even when an investor's link preview asks", async () => {
    const p = await facilityProject();
    for (const who of [await newClient(t), as.investor, as.lead]) {
      const res = await who.agent.get(`/projects/${p.slug}/facility`).expect(200);
      expect(res.text).toContain("Hall 9");
      expect(res.text).not.toContain("Reserved suite");
    }
  });

  it("says the capacity is not published yet for a project without public blocks, and leaves an unknown project to the app", async () => {
    const p = await createProject(t);
    const res = await (await newClient(t)).agent.get(`/projects/${p.slug}/facility`).expect(200);
    expect(res.text).toContain(`<meta property="og:description" content="Capacity and readiness of Test campus ${p.slug}: not published yet.">`);
    const unknown = await (await newClient(t)).agent.get("/projects/no-such-project/facility").expect(200);
    expect(unknown.text).not.toContain("og:title");
  });

  it("is listed in the sitemap", async () => {
    const p = await createProject(t);
    const res = await (await newClient(t)).agent.get("/sitemap.xml").expect(200);
    expect(res.text).toContain(`<loc>http://plumbline.test/projects/${p.slug}/facility</loc>`);
  });
});
