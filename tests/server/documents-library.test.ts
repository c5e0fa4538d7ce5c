import { createHash } from "node:crypto";
import request from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { PDFDocument } from "pdf-lib";
import { createProject, useAppAsEveryRole } from "./posts-fixtures.ts";
import { activePdf, binary, createOrganisation, encryptedPdf, investorOf, pageTexts, plainPdf, storedKeys, upload } from "./documents-fixtures.ts";

const f = useAppAsEveryRole();
let slug: string;
let ours: number;
let theirs: number;

beforeAll(async () => {
  slug = (await createProject(f.t)).slug;
  ours = await createOrganisation(f.t, "Harrow Lane Capital (invented)");
  theirs = await createOrganisation(f.t, "Other fund (invented)");
});

async function uploaded(fields: Parameters<typeof upload>[4] = {}, file?: Buffer, name = "report.pdf") {
  const res = await upload(f.as.lead, slug, file ?? (await plainPdf(3)), name, fields);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number; latestVersion: { id: number; number: number; removed: string[]; pages: number; fileType: string } };
}

const fileOf = (agent: ReturnType<typeof request.agent>, path: string) => agent.get(path).buffer(true).parse(binary);

describe("GET /api/projects/:slug/documents by audience", () => {
  it("shows investors investor documents not limited to another organisation; marketing investor ones; leads all; visitors 401", async () => {
    const open = await uploaded({ title: "Open report" });
    const internal = await uploaded({ title: "Internal note", audience: "internal" });
    const mine = await uploaded({ title: "Lender pack for us", organisationIds: [ours] });
    const other = await uploaded({ title: "Lender pack for them", organisationIds: [theirs] });
    const member = await investorOf(f.t, ours);
    const loner = await investorOf(f.t, null);
    const titles = async (agent: ReturnType<typeof request.agent>) => ((await agent.get(`/api/projects/${slug}/documents`).expect(200)).body as Array<{ id: number }>).map((d) => d.id).sort();

    expect(await titles(member.agent)).toEqual([open.id, mine.id].sort());
    expect(await titles(loner.agent)).toEqual([open.id]);
    expect(await titles(f.as.marketing.agent)).toEqual([open.id, mine.id, other.id].sort());
    expect(await titles(f.as.lead.agent)).toEqual([open.id, internal.id, mine.id, other.id].sort());
    await request(f.t.plumbline.app).get(`/api/projects/${slug}/documents`).expect(401);

    // Another organisation's document, or an internal one, is not there for this investor at all.
    for (const id of [other.id, internal.id]) {
      await member.agent.get(`/api/documents/${id}`).expect(404);
      await member.agent.get(`/api/documents/${id}/file`).expect(404);
    }
    await f.as.marketing.agent.get(`/api/documents/${internal.id}/file`).expect(404);
    await request(f.t.plumbline.app).get(`/api/documents/${open.id}/file`).expect(401);
    // Staff see the organisations a document is limited to; investors do not.
    const staffView = (await f.as.lead.agent.get(`/api/documents/${mine.id}`).expect(200)).body as { organisations: Array<{ id: number }> };
    expect(staffView.organisations.map((o) => o.id)).toEqual([ours]);
    expect(((await member.agent.get(`/api/documents/${mine.id}`).expect(200)).body as { organisations: unknown[] }).organisations).toEqual([]);
  });

  it("marks for an investor what is new since their last visit, then records the visit", async () => {
    const project = await createProject(f.t);
    const first = (await upload(f.as.lead, project.slug, await plainPdf(1)).expect(201)).body as { id: number };
    const reader = await investorOf(f.t, null);
    const list = async () => (await reader.agent.get(`/api/projects/${project.slug}/documents`).expect(200)).body as Array<{ id: number; newSinceLastVisit: boolean }>;
    expect((await list()).map((d) => d.newSinceLastVisit)).toEqual([true]);
    expect((await list()).map((d) => d.newSinceLastVisit)).toEqual([false]);
    await f.as.lead.agent.post(`/api/documents/${first.id}/versions`).set("X-CSRF-Token", f.as.lead.csrf).field("note", "Revised").attach("file", await plainPdf(2), "r2.pdf").expect(201);
    expect((await list()).map((d) => d.newSinceLastVisit)).toEqual([true]);
  });
});

describe("GET /api/documents/:id/file", () => {
  it("gives an investor a copy stamped on every page with their name, organisation and e-mail; staff the clean original", async () => {
    const doc = await uploaded({ title: "Stamped report" }, await plainPdf(4, "Stamped report"));
    const member = await investorOf(f.t, ours);
    const stamped = await fileOf(member.agent, `/api/documents/${doc.id}/file?as=view`).expect(200);
    expect(stamped.headers["content-type"]).toBe("application/pdf");
    expect(stamped.headers["content-disposition"]).toMatch(/^inline; /);
    expect(stamped.headers["cache-control"]).toBe("private, no-store");
    const orgName = ((await f.t.db("organisations").where({ id: ours }).first("name")) as { name: string }).name;
    const texts = await pageTexts(stamped.body as Buffer);
    expect(texts).toHaveLength(4);
    texts.forEach((text, i) => {
      expect(text, `page ${i + 1}`).toContain(member.name);
      expect(text, `page ${i + 1}`).toContain(member.email);
      expect(text, `page ${i + 1}`).toContain(orgName);
      expect(text, `page ${i + 1}`).toContain(`Stamped report page ${i + 1}`);
    });
    const download = await fileOf(member.agent, `/api/documents/${doc.id}/file?as=download`).expect(200);
    expect(download.headers["content-disposition"]).toMatch(/^attachment; /);

    // Staff: the stored bytes, unmarked.
    const clean = await fileOf(f.as.lead.agent, `/api/documents/${doc.id}/file?clean=1`).expect(200);
    const stored = await f.t.db("document_versions").where({ id: doc.latestVersion.id }).first("sha256");
    expect(createHash("sha256").update(clean.body as Buffer).digest("hex")).toBe(stored.sha256);
    const cleanTexts = await pageTexts(clean.body as Buffer);
    expect(cleanTexts.join(" ")).not.toContain(member.name);
    expect(cleanTexts.join(" ")).not.toMatch(/Copy for/);
    // An investor may not ask for the clean original.
    await member.agent.get(`/api/documents/${doc.id}/file?clean=1`).expect(403);
  });

  it("serves an image to an investor as a stamped one-page PDF", async () => {
    const sharp = (await import("sharp")).default;
    const png = await sharp({ create: { width: 300, height: 200, channels: 3, background: "#3a6" } }).png().toBuffer();
    const doc = await uploaded({ title: "Site photo certificate", category: "certificate" }, png, "certificate.png");
    expect(doc.latestVersion.fileType).toBe("png");
    const member = await investorOf(f.t, null);
    const res = await fileOf(member.agent, `/api/documents/${doc.id}/file`).expect(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    expect(res.headers["content-disposition"]).toContain("certificate.pdf");
    const texts = await pageTexts(res.body as Buffer);
    expect(texts).toHaveLength(1);
    expect(texts[0]).toContain(member.email);
  });

  it("writes exactly one view-log row per view or download, none for staff or a HEAD, and one for a request with a Range", async () => {
    const doc = await uploaded({ title: "Counted report" });
    const reader = await investorOf(f.t, null);
    const count = async () => Number(((await f.t.db("document_views").where({ document_id: doc.id }).count({ n: "*" }).first()) as { n: number }).n);
    await fileOf(reader.agent, `/api/documents/${doc.id}/file?as=view`).set("User-Agent", "test-viewer/1").expect(200);
    expect(await count()).toBe(1);
    await fileOf(reader.agent, `/api/documents/${doc.id}/file?as=download`).expect(200);
    expect(await count()).toBe(2);
    // A viewer asking for a range gets the whole copy (no ranges), logged once.
    const ranged = await fileOf(reader.agent, `/api/documents/${doc.id}/file?as=view`).set("Range", "bytes=0-1023").expect(200);
    expect(ranged.headers["accept-ranges"]).toBe("none");
    expect(await count()).toBe(3);
    await reader.agent.head(`/api/documents/${doc.id}/file`).expect(200);
    await fileOf(f.as.lead.agent, `/api/documents/${doc.id}/file`).expect(200);
    expect(await count()).toBe(3);
    const rows = (await f.t.db("document_views").where({ document_id: doc.id }).orderBy("id")) as Array<{ kind: string; user_id: number; agent: string; address: string; version_id: number }>;
    expect(rows.map((r) => [r.kind, Number(r.user_id), Number(r.version_id)])).toEqual([
      ["view", reader.id, doc.latestVersion.id],
      ["download", reader.id, doc.latestVersion.id],
      ["view", reader.id, doc.latestVersion.id],
    ]);
    expect(rows[0]!.agent).toBe("test-viewer/1");
    expect(rows[0]!.address).toMatch(/127\.0\.0\.1|::1/);
  });
});

describe("POST /api/projects/:slug/documents: intake", () => {
  it("removes active content before storing and lists what went; links are kept", async () => {
    const doc = await uploaded({ title: "Active report" }, await activePdf());
    expect(doc.latestVersion.removed).toEqual(
      expect.arrayContaining(["document JavaScript", "embedded files", "file attachment annotation", "launch action in a link", "open action (JavaScript)", "page additional actions"]),
    );
    const version = await f.t.db("document_versions").where({ id: doc.latestVersion.id }).first("storage_key", "removed");
    const stored = (await f.t.plumbline.mediaStorage.get(version.storage_key))!;
    const raw = stored.toString("latin1");
    for (const word of ["/JavaScript", "/JS ", "/OpenAction", "/Launch", "/EmbeddedFile", "/FileAttachment", "opened-secret-js", "named-secret-js", "page-secret-js", "calc-secret.exe"]) {
      expect(raw, word).not.toContain(word);
    }
    // Read back: no embedded file streams or active actions among the objects; the URI link stays.
    const pdf = await PDFDocument.load(stored);
    const objects = pdf.context.enumerateIndirectObjects().map(([, o]) => o.toString());
    expect(objects.some((o) => /\/EmbeddedFile\b|\/S \/JavaScript|\/S \/Launch/.test(o))).toBe(false);
    expect(objects.some((o) => o.includes("https://example.com/kept-link"))).toBe(true);
    // The event and the audit entry say what was removed.
    const event = await f.t.db("document_events").where({ document_id: doc.id, field: "removed_content" }).first("note");
    expect(event.note).toContain("document JavaScript");
    const audit = await f.t.db("audit_events").where({ action: "document_created", target_id: String(doc.id) }).first("detail");
    expect(String(audit.detail)).toContain("embedded files");
  });

  it.each([
    ["an encrypted PDF", async () => encryptedPdf(), "report.pdf", 422, /encrypted PDFs are refused/i],
    ["a broken PDF", async () => Buffer.concat([Buffer.from("%PDF-1.7\n"), Buffer.from("this is not really a PDF at all\n".repeat(20))]), "report.pdf", 422, /cannot be read/],
    ["a text file named .pdf", async () => Buffer.from("Quarterly figures\nnot a PDF\n"), "figures.pdf", 415, /whatever its name says/],
    ["an HTML page named .pdf", async () => Buffer.from("<!doctype html><html><script>alert(1)</script></html>"), "page.pdf", 415, /PDF, JPEG, PNG and WebP/],
  ])("refuses %s naming the file, and stores nothing", async (_what, make, name, status, message) => {
    const before = await storedKeys(f.t);
    const rowsBefore = await f.t.db("documents").count({ n: "*" }).first();
    const res = await upload(f.as.lead, slug, await make(), name, { title: `Refused ${name}` });
    expect(res.status).toBe(status);
    expect(res.body.error.message).toMatch(message);
    expect(res.body.error.fields.file).toEqual(expect.any(String));
    expect(await storedKeys(f.t)).toEqual(before);
    expect(await f.t.db("documents").count({ n: "*" }).first()).toEqual(rowsBefore);
    expect(await f.t.db("documents").where({ title: `Refused ${name}` }).first()).toBeUndefined();
  });

  it("refuses bad fields with 400 or 422 naming them, and no file with 400", async () => {
    const bad = await upload(f.as.lead, slug, await plainPdf(1), "r.pdf", { category: "gossip" });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("category");
    const noOrg = await upload(f.as.lead, slug, await plainPdf(1), "r.pdf", { organisationIds: [999_999_999] });
    expect(noOrg.status).toBe(422);
    expect(noOrg.body.error.fields.organisationIds).toMatch(/names no organisation/);
    const internalLimited = await upload(f.as.lead, slug, await plainPdf(1), "r.pdf", { audience: "internal", organisationIds: [ours] });
    expect(internalLimited.status).toBe(422);
    const noFile = await upload(f.as.lead, slug, null);
    expect(noFile.status).toBe(400);
    expect(noFile.body.error.fields).toHaveProperty("file");
    await upload(f.as.marketing, slug, await plainPdf(1)).expect(403);
    await upload(f.as.investor, slug, await plainPdf(1)).expect(403);
  });

  it("refuses a file over the size limit with 413", async () => {
    const { startTestApp, signIn, DEMO } = await import("../helpers/app.ts");
    const small = await startTestApp({ DOCUMENT_MAX_FILE_MB: "0.01" });
    try {
      const lead = await signIn(small, DEMO.lead);
      const res = await upload(lead, slug, Buffer.concat([await plainPdf(1), Buffer.alloc(20_000, 0x20)]), "big.pdf");
      expect(res.status).toBe(413);
      expect(res.body.error.fields).toHaveProperty("file");
    } finally {
      await small.close();
    }
  });
});

describe("versions, edits and deletion", () => {
  it("keeps old versions and their logs; serves a chosen version; PATCH and DELETE are events and audited", async () => {
    const doc = await uploaded({ title: "Technical note" }, await plainPdf(1, "Revision A"));
    const reader = await investorOf(f.t, null);
    await fileOf(reader.agent, `/api/documents/${doc.id}/file`).expect(200);
    const v2 = await f.as.lead.agent.post(`/api/documents/${doc.id}/versions`).set("X-CSRF-Token", f.as.lead.csrf).field("note", "Revision B").attach("file", await plainPdf(2, "Revision B"), "note-b.pdf").expect(201);
    expect(v2.body.versions.map((v: { number: number }) => v.number)).toEqual([2, 1]);
    expect(v2.body.latestVersion.note).toBe("Revision B");
    const first = await fileOf(reader.agent, `/api/documents/${doc.id}/file?version=1`).expect(200);
    expect((await pageTexts(first.body as Buffer))[0]).toContain("Revision A page 1");
    const latest = await fileOf(reader.agent, `/api/documents/${doc.id}/file`).expect(200);
    expect(await pageTexts(latest.body as Buffer)).toHaveLength(2);
    const log = (await f.as.lead.agent.get(`/api/documents/${doc.id}/views`).expect(200)).body as Array<{ versionNumber: number }>;
    expect(log.map((r) => r.versionNumber)).toEqual([2, 1, 1]);

    const stale = await f.as.lead.agent.patch(`/api/documents/${doc.id}`).set("X-CSRF-Token", f.as.lead.csrf).send({ title: "Renamed", version: 1 });
    expect(stale.status).toBe(409);
    const patched = await f.as.lead.agent.patch(`/api/documents/${doc.id}`).set("X-CSRF-Token", f.as.lead.csrf).send({ title: "Technical note, HD-1", version: v2.body.version }).expect(200);
    expect(patched.body.title).toBe("Technical note, HD-1");
    const events = (await f.t.db("document_events").where({ document_id: doc.id }).orderBy("id").select("field", "to_value")) as Array<{ field: string; to_value: string }>;
    expect(events.map((e) => e.field)).toEqual(["created", "version", "title"]);

    const keys = (await f.t.db("document_versions").where({ document_id: doc.id }).pluck("storage_key")) as string[];
    await f.as.lead.agent.delete(`/api/documents/${doc.id}`).set("X-CSRF-Token", f.as.lead.csrf).expect(204);
    await f.as.lead.agent.get(`/api/documents/${doc.id}`).expect(404);
    const stored = await storedKeys(f.t);
    for (const key of keys) expect(stored).not.toContain(key);
    expect(await f.t.db("audit_events").where({ action: "document_deleted", target_id: String(doc.id) }).first()).toBeDefined();
  });
});

describe("the view log", () => {
  it("exports CSV with formula-looking cells made harmless, filters by reader, and shows an investor only their own", async () => {
    const project = await createProject(f.t);
    const doc = (await upload(f.as.lead, project.slug, await plainPdf(1)).expect(201)).body as { id: number };
    const a = await investorOf(f.t, null);
    const b = await investorOf(f.t, null);
    await fileOf(a.agent, `/api/documents/${doc.id}/file`).set("User-Agent", "=HYPERLINK(\"http://evil.example\")").expect(200);
    await fileOf(b.agent, `/api/documents/${doc.id}/file?as=view`).set("User-Agent", "@SUM(1+1)").expect(200);

    const csv = await f.as.lead.agent.get(`/api/projects/${project.slug}/document-views?format=csv`).expect(200);
    expect(csv.headers["content-type"]).toMatch(/^text\/csv/);
    expect(csv.text.split("\r\n")[0]).toBe("at,document,version,reader,email,organisation,kind,address,agent");
    expect(csv.text).toContain(`"'=HYPERLINK(""http://evil.example"")"`);
    expect(csv.text).toContain("'@SUM(1+1)");
    expect(csv.text).not.toMatch(/(^|,)=HYPERLINK/m);

    const onlyA = (await f.as.lead.agent.get(`/api/projects/${project.slug}/document-views?userId=${a.id}`).expect(200)).body as Array<{ email: string }>;
    expect(onlyA.map((r) => r.email)).toEqual([a.email]);
    const mine = (await b.agent.get(`/api/projects/${project.slug}/my-document-views`).expect(200)).body as Array<{ email: string; kind: string }>;
    expect(mine).toEqual([expect.objectContaining({ email: b.email, kind: "view" })]);
    await b.agent.get(`/api/projects/${project.slug}/document-views`).expect(403);
    await b.agent.get(`/api/documents/${doc.id}/views`).expect(403);
    await f.as.lead.agent.get(`/api/projects/${project.slug}/my-document-views`).expect(403);
  });
});

describe("documents.movesIn (digests)", () => {
  it("names new documents and new versions in the window, investors' only for an investor digest, with no file link", async () => {
    const project = await createProject(f.t);
    const from = new Date(Date.now() - 1000);
    const open = (await upload(f.as.lead, project.slug, await plainPdf(1), "a.pdf", { title: "Open" }).expect(201)).body as { id: number };
    await upload(f.as.lead, project.slug, await plainPdf(1), "b.pdf", { title: "Internal", audience: "internal" }).expect(201);
    await upload(f.as.lead, project.slug, await plainPdf(1), "c.pdf", { title: "Limited", organisationIds: [ours] }).expect(201);
    await f.as.lead.agent.post(`/api/documents/${open.id}/versions`).set("X-CSRF-Token", f.as.lead.csrf).attach("file", await plainPdf(2), "a2.pdf").expect(201);
    const to = new Date(Date.now() + 1000);
    const moves = await f.t.plumbline.documents.movesIn(project.id, from, to, "investor");
    expect(moves.map((m) => [m.title, m.kind, m.versionNumber])).toEqual([
      ["Open", "new", 1],
      ["Open", "version", 2],
    ]);
    expect(JSON.stringify(moves)).not.toMatch(/\/file|storage|documents\//);
    expect((await f.t.plumbline.documents.movesIn(project.id, from, to, "staff")).map((m) => m.title)).toEqual(["Open", "Internal", "Limited", "Open"]);
    expect(await f.t.plumbline.documents.movesIn(project.id, to, new Date(to.getTime() + 1000), "staff")).toEqual([]);
  });
});
