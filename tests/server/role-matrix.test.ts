import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";
import { plainPdf } from "./documents-fixtures.ts";
import { readerRows } from "../helpers/subscriber-rows.ts";
import { postInput } from "./posts-fixtures.ts";
import { pathOf, ROLE_MATRIX, ROLE_MATRIX_WITH_HEAD, type Caller, type MatrixIds, type MatrixRow, type OwnObjects } from "./role-matrix.table.ts";

const SLUG = "aldermere-phase-2";
let t: TestApp;
let ids: MatrixIds;

function fileOf(url: string): string {
  const name = /\/media\/v\/([^/?]+)$/.exec(url)?.[1];
  if (!name) throw new Error(`not a derivative URL: ${url}`);
  return name;
}

/** Real objects of each audience, from the seeded demo; a draft story is made through the API. */
async function resolveIds(): Promise<MatrixIds> {
  const admin = await signIn(t, DEMO.admin);
  const marketing = await signIn(t, DEMO.marketing);
  const get = async (agent: Agent, path: string) => {
    const res = await agent.get(path);
    if (res.status !== 200) throw new Error(`${path}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return res.body;
  };
  const pick = <T>(items: T[], what: string, test: (item: T) => boolean): T => {
    const found = items.find(test);
    if (!found) throw new Error(`the demo has no ${what}`);
    return found;
  };

  type Milestone = { id: number; audience: string };
  const milestones = (await get(admin.agent, `/api/projects/${SLUG}/milestones`)) as Milestone[];

  type MediaListItem = { id: number; sensitivity: string; status: string };
  const library = (await get(admin.agent, `/api/media?project=${SLUG}&pageSize=100`)) as { items: MediaListItem[] } | MediaListItem[];
  const items = Array.isArray(library) ? library : library.items;
  const unreviewed = pick(items, "ready unreviewed photo", (m) => m.sensitivity === "unreviewed" && m.status === "ready");
  const unreviewedDetail = (await get(admin.agent, `/api/media/${unreviewed.id}`)) as { variants: Array<{ url: string }> };
  // The public gallery shows exactly the cleared photos that published public content uses.
  type GalleryItem = { id: number; sources: Record<string, Array<{ url: string }>> };
  const gallery = (await get(request(t.plumbline.app) as unknown as Agent, `/api/projects/${SLUG}/gallery`)) as { items: GalleryItem[] };
  const cleared = pick(gallery.items, "photo in public content", (g) => (g.sources.webp ?? []).length > 0);

  // Other test files add projects and posts meanwhile: only the demo project's rows count.
  const project = (await t.db("projects").where({ slug: SLUG }).first("id")) as { id: number };
  type PostRow = { id: number; slug: string };
  const postWhere = async (what: string, where: Record<string, string>) => {
    const row = (await t.db("posts").where({ project_id: project.id, ...where }).orderBy("id").first("id", "slug")) as PostRow | undefined;
    if (!row) throw new Error(`the demo has no ${what}`);
    return { id: Number(row.id), slug: row.slug };
  };
  const investorPost = await postWhere("published investor post", { audience: "investor", status: "published" });
  const publicPost = await postWhere("published public post", { audience: "public", status: "published" });
  const inReviewRow = await postWhere("post in review", { status: "in_review" });

  const story = await marketing.agent
    .post(`/api/projects/${SLUG}/stories`)
    .set("X-CSRF-Token", marketing.csrf)
    .send({ title: `Role matrix draft ${Date.now()}`, audience: "public" });
  if (story.status !== 201) throw new Error(`draft story: ${story.status} ${JSON.stringify(story.body)}`);
  const storyRow = (await t.db("stories").where({ id: story.body.id }).first("slug")) as { slug: string };

  const investorUser = (await t.db("users").where({ email: DEMO.investor }).first("id")) as { id: number };
  const subscriber = (await t.db("subscribers").where({ project_id: project.id }).whereNot({ email: DEMO.investor }).orderBy("id").first("id")) as { id: number } | undefined;
  const enquiry = (await t.db("enquiries").where({ project_id: project.id }).orderBy("id").first("id")) as { id: number } | undefined;
  const run = (await t.db("digest_runs").where({ project_id: project.id }).orderBy("id").first("id")) as { id: number } | undefined;
  if (!subscriber || !enquiry || !run || !investorUser) throw new Error("the demo lacks subscribers, enquiries or digest runs");

  // Budget changes of each audience, from the seeded demo.
  const changeOf = async (audience: string) => {
    const row = (await t.db("budget_changes").where({ project_id: project.id, audience }).orderBy("id").first("id")) as { id: number } | undefined;
    if (!row) throw new Error(`the demo has no ${audience} budget change`);
    return Number(row.id);
  };
  const [investorChange, internalChange] = [await changeOf("investor"), await changeOf("internal")];
  const siteArea = (await t.db("site_areas").where({ project_id: project.id, audience: "internal" }).orderBy("id").first("id")) as { id: number } | undefined;
  if (!siteArea) throw new Error("the demo has no internal site area");

  const facility = await matrixFacility();
  const documents = await matrixDocuments();
  const record = await matrixRecord();
  const reports = await matrixReports();

  // A published story of the demo: a step it has already passed is refused.
  const publishedRow = (await t.db("stories").where({ project_id: project.id, status: "published", audience: "public" }).orderBy("id").first("id", "slug")) as { id: number; slug: string } | undefined;
  if (!publishedRow) throw new Error("the demo has no published public photo story");
  const published = { id: Number(publishedRow.id), slug: publishedRow.slug };

  // Made in the matrix's own project, so the demo's lists stay as seeded for the other files.
  const recordProject = (await t.db("projects").where({ slug: record.recordSlug }).first("id")) as { id: number };
  const draftPostRes = await marketing.agent.post(`/api/projects/${record.recordSlug}/posts`).set("X-CSRF-Token", marketing.csrf).send(postInput(null, { title: `Role matrix draft update ${Date.now()}` }));
  if (draftPostRes.status !== 201) throw new Error(`draft update: ${draftPostRes.status} ${JSON.stringify(draftPostRes.body).slice(0, 200)}`);
  const draftPost = draftPostRes.body as { id: number };

  // A message in the mail sink, as the sink stores one.
  const raw = "From: site@example.test\r\nTo: reader@example.test\r\nSubject: Role matrix\r\n\r\nA message.\r\n";
  const [outboxMessage] = await t.db("mail_messages").insert({ envelope_from: "site@example.test", to_header: "reader@example.test", from_header: "site@example.test", subject: "Role matrix", text: "A message.", headers: "{}", raw: Buffer.from(raw) });

  const investor = await signIn(t, DEMO.investor);
  const archive = (await get(investor.agent, "/api/me/digests")) as { items: Array<{ id: number }> };
  const investorDigest = pick(archive.items, "digest in the demo investor's archive", () => true).id;

  const own = await ownObjects(facility.facilitySlug, record.recordSlug, documents.documentsSlug, Number(recordProject.id), inReviewRow.id);

  return {
    internalMilestone: pick(milestones, "internal milestone", (m) => m.audience === "internal").id,
    investorMilestone: pick(milestones, "investor milestone", (m) => m.audience === "investor").id,
    publicMilestone: pick(milestones, "public milestone", (m) => m.audience === "public").id,
    unreviewedPhoto: unreviewed.id,
    unreviewedPhotoFile: fileOf(unreviewedDetail.variants[0]!.url),
    clearedPhoto: cleared.id,
    clearedPhotoFile: fileOf(cleared.sources.webp![0]!.url),
    investorPost: investorPost.id,
    investorPostSlug: investorPost.slug,
    publicPost: publicPost.id,
    publicPostSlug: publicPost.slug,
    postInReview: inReviewRow.id,
    postInReviewSlug: inReviewRow.slug,
    draftStory: Number(story.body.id),
    draftStorySlug: storyRow.slug,
    otherSubscriber: Number(subscriber.id),
    enquiry: Number(enquiry.id),
    digestRun: Number(run.id),
    investorChange,
    internalSiteArea: Number(siteArea.id),
    internalChange,
    ...facility,
    ...documents,
    ...record,
    ...reports,
    publishedStory: Number(published.id),
    publishedStorySlug: published.slug,
    draftPost: Number(draftPost.id),
    outboxMessage: Number(outboxMessage),
    investorDigest: Number(investorDigest),
    own,
  };
}

/** One set of objects for each caller to delete for itself, made through the API (investor audience where there is one). */
async function ownObjects(facilitySlug: string, recordSlug: string, documentsSlug: string, projectId: number, postInReview: number): Promise<Record<Caller, OwnObjects>> {
  const lead = await signIn(t, DEMO.lead);
  const leadId = Number(((await t.db("users").where({ email: DEMO.lead }).first("id")) as { id: number }).id);
  const post = async (path: string, body: object): Promise<number> => {
    const res = await lead.agent.post(path).set("X-CSRF-Token", lead.csrf).send(body);
    if (res.status !== 201) throw new Error(`${path}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return Number(res.body.id);
  };
  const pdf = await plainPdf(1, "Matrix own document");
  const sets = {} as Record<Caller, OwnObjects>;
  for (const [i, caller] of callers.entries()) {
    const tag = `${caller} ${Date.now().toString(36)}`;
    const [subscriber] = await t.db("subscribers").insert(readerRows(projectId, 1, `own-${caller}-${Date.now().toString(36)}.example.test`, Date.now()));
    const system = await post(`/api/projects/${facilitySlug}/facility/systems`, { name: `Own fans (${tag})`, kind: "air_movement", audience: "investor", neededPerSystem: 1 });
    const newRisk = () => post(`/api/projects/${recordSlug}/risks`, { title: `Own risk (${tag})`, category: "supply_chain", ownerId: leadId, likelihood: 2, impact: 2, audience: "investor" });
    const [risk, riskWithAction] = [await newRisk(), await newRisk()];
    const document = await lead.agent
      .post(`/api/projects/${documentsSlug}/documents`)
      .set("X-CSRF-Token", lead.csrf)
      .field("title", `Own certificate (${tag})`)
      .field("category", "certificate")
      .field("audience", "investor")
      .field("organisationIds", "[]")
      .attach("file", pdf, "own.pdf");
    if (document.status !== 201) throw new Error(`own document: ${document.status} ${JSON.stringify(document.body).slice(0, 200)}`);
    sets[caller] = {
      subscriber: Number(subscriber),
      block: await post(`/api/projects/${facilitySlug}/facility/blocks`, { name: `Own hall (${tag})`, racks: 10, itKw: 100, maxKwPerRack: 10, audience: "investor" }),
      system,
      unit: await post(`/api/facility/systems/${system}/units`, { label: `Fan ${i + 1}` }),
      feature: await post(`/api/projects/${facilitySlug}/facility/features`, { kind: "client", name: `Own room (${tag})`, status: "planned", audience: "investor" }),
      siteArea: await post(`/api/projects/${facilitySlug}/site-areas`, { name: `Own yard (${tag})`, kind: "hall", audience: "investor", x: 2 + 3 * i, y: 2, w: 2, h: 2 }),
      risk,
      riskWithAction,
      mitigation: await post(`/api/risks/${riskWithAction}/mitigations`, { description: `Own action (${tag})`, ownerId: leadId }),
      change: await post(`/api/projects/${recordSlug}/budget-changes`, { description: `Own change (${tag})`, amount: 1_000, audience: "investor" }),
      document: Number(document.body.id),
      reviewLink: await post(`/api/posts/${postInReview}/review-links`, { name: `Own Reviewer ${i + 1}`, email: `own.reviewer.${caller}@example.test` }),
    };
  }
  return sets;
}

/** Monthly reports of the matrix's own, made through the API in a project of its own: an issued investor report, a draft, an issued internal report. */
async function matrixReports() {
  const lead = await signIn(t, DEMO.lead);
  const slug = `matrix-reports-${Date.now().toString(36)}`;
  await t.db("projects").insert({ slug, name: "Role matrix reports", operator_name: "Kestrel Colocation", time_zone: "Europe/London", currency: "GBP" });
  const draft = async (month: string, audience: string): Promise<{ id: number; version: number }> => {
    const res = await lead.agent.post(`/api/projects/${slug}/reports`).set("X-CSRF-Token", lead.csrf).send({ month, audience });
    if (res.status !== 201) throw new Error(`report ${month}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return { id: Number(res.body.id), version: Number(res.body.version) };
  };
  const issued = async (month: string, audience: string): Promise<number> => {
    const r = await draft(month, audience);
    const res = await lead.agent.post(`/api/reports/${r.id}/issue`).set("X-CSRF-Token", lead.csrf).send({ version: r.version });
    if (res.status !== 200) throw new Error(`issue ${month}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return r.id;
  };
  return {
    reportsSlug: slug,
    issuedReport: await issued("2026-01", "investor"),
    draftReport: (await draft("2026-02", "investor")).id,
    internalReport: await issued("2026-03", "internal"),
  };
}

/**
 * A document library of the matrix's own, in a project of its own: an investor document, an
 * internal one, and one limited to an organisation the demo investor does not belong to.
 */
async function matrixDocuments() {
  const lead = await signIn(t, DEMO.lead);
  const slug = `matrix-documents-${Date.now().toString(36)}`;
  await t.db("projects").insert({ slug, name: "Role matrix documents", operator_name: "Kestrel Colocation", time_zone: "Europe/London", currency: "GBP" });
  const [other] = await t.db("organisations").insert({ name: `Matrix other fund ${Date.now().toString(36)} (invented)` });
  const pdf = await plainPdf(1, "Matrix document");
  const upload = async (title: string, audience: string, organisationIds: number[]): Promise<number> => {
    const res = await lead.agent
      .post(`/api/projects/${slug}/documents`)
      .set("X-CSRF-Token", lead.csrf)
      .field("title", title)
      .field("category", "certificate")
      .field("audience", audience)
      .field("organisationIds", JSON.stringify(organisationIds))
      .attach("file", pdf, "matrix.pdf");
    if (res.status !== 201) throw new Error(`document ${title}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return Number(res.body.id);
  };
  return {
    documentsSlug: slug,
    investorDocument: await upload("Investor certificate", "investor", []),
    internalDocument: await upload("Internal certificate", "internal", []),
    otherOrganisationDocument: await upload("Another fund's certificate", "investor", [Number(other)]),
  };
}

/**
 * A facility of the matrix's own, made through the API in a project of its own (the demo's
 * facility stays as seeded for the tests that read it): something of each audience.
 */
/** A risks register and decisions of the matrix's own, made through the API in a project of its own: one of each audience. */
async function matrixRecord() {
  const lead = await signIn(t, DEMO.lead);
  const slug = `matrix-record-${Date.now().toString(36)}`;
  await t.db("projects").insert({ slug, name: "Role matrix record", operator_name: "Kestrel Colocation", time_zone: "Europe/London", currency: "GBP" });
  const leadId = Number(((await t.db("users").where({ email: DEMO.lead }).first("id")) as { id: number }).id);
  const post = async (path: string, body: object): Promise<{ id: number }> => {
    const res = await lead.agent.post(path).set("X-CSRF-Token", lead.csrf).send(body);
    if (res.status !== 201) throw new Error(`${path}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return res.body as { id: number };
  };
  const risk = (audience: string) => post(`/api/projects/${slug}/risks`, { title: `Late chiller (${audience})`, category: "supply_chain", ownerId: leadId, likelihood: 3, impact: 4, audience });
  const decision = (audience: string) =>
    post(`/api/projects/${slug}/decisions`, { title: `Second generator (${audience})`, question: "Order now?", options: [{ label: "Yes" }, { label: "No" }], decider: "Board", neededBy: "2099-01-15", audience });
  return {
    recordSlug: slug,
    investorRisk: (await risk("investor")).id,
    internalRisk: (await risk("internal")).id,
    investorDecision: (await decision("investor")).id,
    internalDecision: (await decision("internal")).id,
  };
}

async function matrixFacility() {
  const lead = await signIn(t, DEMO.lead);
  const slug = `matrix-facility-${Date.now().toString(36)}`;
  await t.db("projects").insert({ slug, name: "Role matrix facility", operator_name: "Kestrel Colocation", time_zone: "Europe/London", currency: "GBP" });
  const post = async (path: string, body: object): Promise<{ id: number }> => {
    const res = await lead.agent.post(path).set("X-CSRF-Token", lead.csrf).send(body);
    if (res.status !== 201) throw new Error(`${path}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
    return res.body as { id: number };
  };
  const block = (audience: string) => post(`/api/projects/${slug}/facility/blocks`, { name: `Hall (${audience})`, racks: 10, itKw: 100, maxKwPerRack: 10, audience });
  const system = (audience: string) => post(`/api/projects/${slug}/facility/systems`, { name: `Fans (${audience})`, kind: "air_movement", audience, neededPerSystem: 1 });
  const feature = (audience: string) => post(`/api/projects/${slug}/facility/features`, { kind: "client", name: `Meeting room (${audience})`, status: "planned", audience });
  const [internalSystem, investorSystem, publicSystem] = [await system("internal"), await system("investor"), await system("public")];
  return {
    facilitySlug: slug,
    internalBlock: (await block("internal")).id,
    investorBlock: (await block("investor")).id,
    publicBlock: (await block("public")).id,
    internalSystem: internalSystem.id,
    publicSystem: publicSystem.id,
    internalUnit: (await post(`/api/facility/systems/${internalSystem.id}/units`, { label: "Fan 1" })).id,
    investorUnit: (await post(`/api/facility/systems/${investorSystem.id}/units`, { label: "Fan 1" })).id,
    publicUnit: (await post(`/api/facility/systems/${publicSystem.id}/units`, { label: "Fan 1" })).id,
    internalFeature: (await feature("internal")).id,
    publicFeature: (await feature("public")).id,
  };
}

beforeAll(async () => {
  t = await startTestApp();
  ids = await resolveIds();
});
afterAll(async () => {
  await t?.close();
});

async function clientFor(caller: Caller): Promise<{ agent: Agent; csrf: string }> {
  return caller === "anonymous" ? newClient(t) : signIn(t, DEMO[caller]);
}

const callers: Caller[] = ["admin", "lead", "marketing", "investor", "anonymous"];

describe("role matrix: every route × every caller", () => {
  for (const caller of callers) {
    it(`answers each route as expected for ${caller}`, async () => {
      const failures: string[] = [];
      // One session per caller; rows that end the session (sign-out) run last.
      const rows = [...ROLE_MATRIX_WITH_HEAD].sort((a, b) => Number(a.path === "/api/auth/logout") - Number(b.path === "/api/auth/logout"));
      const { agent, csrf } = await clientFor(caller);
      for (const row of rows) {
        const path = pathOf(row, ids, caller);
        let req = agent[row.method](path).set("X-CSRF-Token", csrf);
        if (row.body !== undefined) req = req.send(row.body as object);
        const res = await req;
        if (res.status !== row.expect[caller]) {
          failures.push(`${row.method.toUpperCase()} ${path}: expected ${row.expect[caller]}, got ${res.status} ${JSON.stringify(res.body).slice(0, 120)}`);
        }
        if (res.status >= 400 && path.startsWith("/api") && row.method !== "head") {
          expect(res.body.error?.code, `${path} error shape`).toEqual(expect.any(String));
          expect(res.body.error?.message, `${path} error shape`).toEqual(expect.any(String));
        }
      }
      expect(failures).toEqual([]);
    });
  }

  it("has a HEAD row, with the GET's expectations, for every GET a visitor may call", () => {
    const gets = ROLE_MATRIX.filter((r) => r.method === "get" && r.expect.anonymous !== 401);
    const heads = ROLE_MATRIX_WITH_HEAD.filter((r) => r.method === "head");
    expect(gets.length).toBeGreaterThan(50);
    expect(heads.map((r) => [pathOf(r, ids), r.expect])).toEqual(gets.map((r) => [pathOf(r, ids), r.expect]));
  });
});

/** Every route the app serves, as Express holds them: method and path pattern (`/api/risks/:id`). */
function servedRoutes(): Array<{ method: string; pattern: string }> {
  type Layer = { rawPath?: unknown; route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
  const out: Array<{ method: string; pattern: string }> = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) for (const method of Object.keys(layer.route.methods)) out.push({ method, pattern: prefix + layer.route.path });
      else if (layer.handle?.stack) walk(layer.handle.stack, prefix + (typeof layer.rawPath === "string" && layer.rawPath !== "/" ? layer.rawPath : ""));
    }
  };
  walk((t.plumbline.app as unknown as { router: { stack: Layer[] } }).router.stack, "");
  return out;
}

const matches = (pattern: string, path: string) => new RegExp(`^${pattern.replace(/\./g, "\\.").replace(/:[A-Za-z]+/g, "[^/]+")}$`).test(path.split("?")[0]!);

describe("role matrix: coverage", () => {
  // The single-page fallback serves every other page path; the page rows name those paths.
  const served = () => servedRoutes().filter((r) => r.pattern !== "/{*splat}");

  it("has a row for every route the app serves", () => {
    const routes = served();
    expect(routes.length).toBeGreaterThan(200);
    const missing = routes.filter((r) => !ROLE_MATRIX.some((row) => row.method === r.method && matches(r.pattern, pathOf(row, ids))));
    expect(missing).toEqual([]);
  });

  it("has a row with a real object for every route that names one", () => {
    // A row meets a real object when its path comes from `MatrixIds` (the seeded demo, or objects
    // made through the API) or names the demo's own (its slug, milestone 1, user 1); a made-up id
    // or name proves only the 404. Secret links are called here with a link of the right shape
    // whose signature is wrong; their own tests open real ones, which only their owner is given.
    const unknown = /999999999|no-such|does-not-exist|nonexistent/;
    const real = ROLE_MATRIX.filter((row) => typeof row.path === "function" || !unknown.test(row.path));
    const missing = served()
      .filter((r) => r.pattern.includes(":"))
      .filter((r) => !real.some((row) => row.method === r.method && callers.every((c) => matches(r.pattern, pathOf(row, ids, c)))));
    expect(missing).toEqual([]);
  });
});

/**
 * The cache policy of every GET answer (server/core/cache-policy.ts). Visitors are asked
 * without any cookie, as a CDN in front would see them.
 */
function cacheProblems(row: MatrixRow, caller: Caller, res: { status: number; headers: Record<string, string | undefined> }): string[] {
  const problems: string[] = [];
  const cc = res.headers["cache-control"] ?? "";
  const vary = res.headers.vary ?? "";
  const api = pathOf(row, ids).startsWith("/api/");
  const kind = row.cache ?? (api ? "per-caller" : "shared");
  const fail = (why: string) => problems.push(`${why} (Cache-Control: "${cc}", Vary: "${vary}")`);
  if (res.status >= 400) {
    if (!/\bno-store\b/.test(cc)) fail("an error answer must not be stored");
    return problems;
  }
  if (caller !== "anonymous") {
    if (/\bpublic\b/.test(cc)) fail("a signed-in caller's answer is never public");
    if (api && cc !== "private, no-store") fail("a signed-in caller's API answer is private, no-store");
    if (!api && !(row.immutable ? /^private, .*\bimmutable\b/.test(cc) : /\bno-store\b/.test(cc))) fail("a signed-in caller's page or file is private (kept only when immutable)");
    if (api && kind === "per-caller" && !/\bcookie\b/i.test(vary)) fail("varies by Cookie");
    return problems;
  }
  if (kind === "shared") {
    if (/\b(private|no-store)\b/.test(cc)) fail("the same for every caller: public caching allowed");
    if (!res.headers.etag) fail("the same for every caller: revalidated by ETag");
    return problems;
  }
  if (api && !/\bcookie\b/i.test(vary)) fail("depends on the session: Vary: Cookie");
  if (/\bpublic\b|s-maxage/.test(cc) || !/\b(private|no-store)\b/.test(cc)) fail("depends on the session: no shared cache may keep it");
  return problems;
}

describe("cache policy: every GET route of the matrix × every caller", () => {
  for (const caller of callers) {
    it(`gives ${caller} the caching each answer allows`, async () => {
      const client = caller === "anonymous" ? null : await signIn(t, DEMO[caller]);
      const problems: string[] = [];
      let checked = 0;
      for (const row of ROLE_MATRIX.filter((r) => r.method === "get")) {
        const path = pathOf(row, ids);
        const res = client ? await client.agent.get(path) : await request(t.plumbline.app).get(path);
        if (res.status !== row.expect[caller]) continue; // the role matrix reports it
        checked += 1;
        for (const p of cacheProblems(row, caller, res as never)) problems.push(`GET ${path} → ${res.status}: ${p}`);
      }
      expect(checked).toBeGreaterThan(80);
      expect(problems).toEqual([]);
    });
  }
});
