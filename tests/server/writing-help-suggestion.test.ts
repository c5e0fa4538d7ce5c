import { describe, expect, it } from "vitest";
import { newClient } from "../helpers/app.ts";
import { DraftSuggestionAnswerSchema } from "../../src/shared/schemas/writing-help.ts";
import { createMilestone, createPhoto, createProject, useAppAsEveryRole, type Client } from "./posts-fixtures.ts";

const DEMO_SLUG = "aldermere-phase-2";
const f = useAppAsEveryRole();

const suggestion = (who: Client, slug: string, audience: string) => who.agent.get(`/api/projects/${slug}/draft-suggestion?audience=${audience}`);
const makeDraft = (who: Client, slug: string, body: unknown) => who.agent.post(`/api/projects/${slug}/draft-suggestion/draft`).set("X-CSRF-Token", who.csrf).send(body as object);

/** A project of its own: a public and an internal milestone whose forecasts both moved today, and a cleared photo of each. */
async function projectWithMoves() {
  const p = await createProject(f.t);
  const open = await createMilestone(f.t, p.slug, { name: "Chillers commissioned (L4)", audience: "public", forecastFinish: "2027-03-01" });
  const hidden = await createMilestone(f.t, p.slug, { name: "Contractor compound handed back", audience: "internal", forecastFinish: "2027-03-01" });
  for (const m of [open, hidden]) {
    const res = await f.as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", f.as.lead.csrf).send({ version: m.version, forecastFinish: "2027-03-13" });
    expect(res.status).toBe(200);
  }
  const today = new Date().toISOString().slice(0, 10);
  const shown = await createPhoto(f.t, p.id, { takenAt: `${today}T08:00:00`, caption: "Chiller CH-2 on its plinth" });
  const hiddenPhoto = await createPhoto(f.t, p.id, { takenAt: `${today}T08:00:00`, caption: "The compound, cleared" });
  await f.t.db("media_tags").insert([
    { media_id: shown.id, kind: "milestone", value: String(open.id) },
    { media_id: hiddenPhoto.id, kind: "milestone", value: String(hidden.id) },
  ]);
  return { ...p, open, hidden, shown: shown.id, hiddenPhoto: hiddenPhoto.id };
}

describe("GET /api/projects/:slug/draft-suggestion", () => {
  it("suggests nothing for a project where nothing happened", async () => {
    const p = await createProject(f.t);
    const res = await suggestion(f.as.marketing, p.slug, "public").expect(200);
    expect(res.body).toEqual({ suggestion: null });
    expect(res.headers["cache-control"]).toBe("private, no-store");
  });

  it("tells a public update of the public milestone that moved and never of the internal one; an internal update of both", async () => {
    const p = await projectWithMoves();
    const pub = DraftSuggestionAnswerSchema.parse((await suggestion(f.as.marketing, p.slug, "public").expect(200)).body).suggestion!;
    expect(pub.milestoneIds).toEqual([p.open.id]);
    expect(pub.groups.flatMap((g) => g.moves)).toEqual([expect.objectContaining({ kind: "forecast_moved", title: p.open.name, days: 12, milestoneId: p.open.id })]);
    expect(JSON.stringify(pub)).not.toContain("Contractor compound");
    expect(pub.photos.map((x) => x.mediaId)).toEqual([p.shown]);
    expect(pub.photos[0]).toMatchObject({ altCandidate: "Chiller CH-2 on its plinth", because: [p.open.name] });
    const internal = DraftSuggestionAnswerSchema.parse((await suggestion(f.as.lead, p.slug, "internal").expect(200)).body).suggestion!;
    expect(internal.milestoneIds.sort()).toEqual([p.open.id, p.hidden.id].sort());
    expect(internal.photos.map((x) => x.mediaId).sort()).toEqual([p.shown, p.hiddenPhoto].sort());
  });

  it("on the demo, a public or investor suggestion never carries an internal milestone", async () => {
    const internalMilestones = await f.t.db("milestones").join("projects", "projects.id", "milestones.project_id").where({ "projects.slug": DEMO_SLUG, "milestones.audience": "internal" }).select("milestones.id", "milestones.name");
    expect(internalMilestones.length).toBeGreaterThan(0);
    const staff = DraftSuggestionAnswerSchema.parse((await suggestion(f.as.lead, DEMO_SLUG, "internal").expect(200)).body).suggestion;
    expect(staff).not.toBeNull();
    for (const audience of ["public", "investor"]) {
      const s = DraftSuggestionAnswerSchema.parse((await suggestion(f.as.marketing, DEMO_SLUG, audience).expect(200)).body).suggestion;
      const json = JSON.stringify(s);
      for (const m of internalMilestones) {
        expect(json).not.toContain(m.name);
        expect(s?.milestoneIds ?? []).not.toContain(m.id);
      }
    }
  });

  it("tells the record's risks and decisions to investor updates, never to public ones, and never an internal item to marketing", async () => {
    const investor = DraftSuggestionAnswerSchema.parse((await suggestion(f.as.lead, DEMO_SLUG, "investor").expect(200)).body).suggestion!;
    expect(investor.groups.map((g) => g.heading)).toContain("Risks and issues");
    const pub = DraftSuggestionAnswerSchema.parse((await suggestion(f.as.lead, DEMO_SLUG, "public").expect(200)).body).suggestion;
    expect((pub?.groups ?? []).flatMap((g) => g.moves).filter((m) => m.kind === "risk" || m.kind === "decision")).toEqual([]);
    const internalTitles = [
      ...(await f.t.db("risks").join("projects", "projects.id", "risks.project_id").where({ "projects.slug": DEMO_SLUG, "risks.audience": "internal" }).pluck("risks.title")),
      ...(await f.t.db("decisions").join("projects", "projects.id", "decisions.project_id").where({ "projects.slug": DEMO_SLUG, "decisions.audience": "internal" }).pluck("decisions.title")),
    ];
    expect(internalTitles.length).toBeGreaterThan(0);
    for (const [who, audience] of [[f.as.marketing, "internal"], [f.as.lead, "investor"], [f.as.marketing, "investor"]] as const) {
      const json = JSON.stringify((await suggestion(who, DEMO_SLUG, audience).expect(200)).body);
      for (const title of internalTitles) expect(json).not.toContain(title);
    }
  });

  it("is for those who start updates: investors 403, visitors 401", async () => {
    await suggestion(f.as.admin, DEMO_SLUG, "investor").expect(200);
    await suggestion(f.as.investor, DEMO_SLUG, "investor").expect(403);
    await (await newClient(f.t)).agent.get(`/api/projects/${DEMO_SLUG}/draft-suggestion`).expect(401);
  });

  it("refuses hostile audience values with 400 and an unknown project with 404", async () => {
    for (const q of ["audience=everyone", "audience=public&audience=internal", "audience=%00", "audience=PUBLIC", "audience=public&extra=1"]) {
      const res = await f.as.lead.agent.get(`/api/projects/${DEMO_SLUG}/draft-suggestion?${q}`);
      expect(res.status, q).toBe(400);
      expect(res.body.error.code).toBe("validation");
    }
    await suggestion(f.as.lead, "no-such-project", "public").expect(404);
  });
});

describe("POST /api/projects/:slug/draft-suggestion/draft", () => {
  it("makes a draft of the suggestion: its title, body, milestone links and audience; nothing published", async () => {
    const p = await projectWithMoves();
    const res = await makeDraft(f.as.marketing, p.slug, { audience: "public" }).expect(201);
    expect(Object.keys(res.body)).toEqual(["id"]);
    const post = (await f.as.marketing.agent.get(`/api/posts/${res.body.id}`).expect(200)).body;
    // The title leaves the name's bracketed detail ("(L4)") to the body (decision 061).
    expect(post).toMatchObject({ status: "draft", audience: "public", title: "Chillers commissioned forecast 12 days later", coverMediaId: p.shown });
    expect(post.milestoneIds ?? post.milestones?.map((m: { id: number }) => m.id)).toEqual([p.open.id]);
    const body = JSON.stringify(post.body);
    expect(body).toContain('"type":"milestone"');
    expect(body).toContain("Forecasts moved");
    expect(body).toContain(`"mediaId":${p.shown}`);
    expect(body).toContain("check it");
    expect(body).not.toContain("Contractor compound");
    expect(body).not.toContain(`"mediaId":${p.hiddenPhoto}`);
    expect(post.publishedAt ?? null).toBeNull();
  });

  it("with nothing to suggest answers 409 and writes nothing", async () => {
    const p = await createProject(f.t);
    const res = await makeDraft(f.as.lead, p.slug, { audience: "public" }).expect(409);
    expect(res.body.error.code).toBe("nothing_to_suggest");
    expect(await f.t.db("posts").where({ project_id: p.id }).count({ n: "*" }).first()).toMatchObject({ n: 0 });
  });

  it("refuses hostile bodies with 400 and writes nothing", async () => {
    const p = await projectWithMoves();
    for (const body of [{}, { audience: "everyone" }, { audience: "public", title: "x" }, { audience: ["public"] }, { audience: null }]) {
      const res = await makeDraft(f.as.lead, p.slug, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
    }
    expect(await f.t.db("posts").where({ project_id: p.id }).count({ n: "*" }).first()).toMatchObject({ n: 0 });
    await makeDraft(f.as.investor, p.slug, { audience: "public" }).expect(403);
  });
});
