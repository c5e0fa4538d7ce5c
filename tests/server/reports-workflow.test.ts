import { DateTime } from "luxon";
import { beforeAll, describe, expect, it } from "vitest";
import type { ReportDetail, ReportListItem } from "../../src/shared/schemas/reports.ts";
import type { ReportFigures } from "../../src/shared/domain/report-figures.ts";
import { createMilestone, createProject, doc, text, useAppAsEveryRole } from "./posts-fixtures.ts";
import { ok } from "./record-fixtures.ts";

/**
 * Monthly reports through HTTP: figures as the record stood at the month end (however it moved
 * since), drafts staff-only, issue once (frozen figures, a library document, one notice per
 * reader), corrections superseding. Events are stamped with the real clock, so a milestone meant
 * to have existed before last month's end has its creation moved back in the database.
 */

const f = useAppAsEveryRole();

/** Last month on site (Europe/London, the test project's zone): ended, so a report may be drafted. */
const lastMonth = DateTime.now().setZone("Europe/London").minus({ months: 1 }).toFormat("yyyy-MM");

async function milestoneBefore(slug: string, forecastFinish: string) {
  const m = await createMilestone(f.t, slug, { audience: "investor", baselineFinish: "2027-03-01", forecastFinish });
  // Entered three months ago: it and its creation events stood at last month's end.
  const then = DateTime.now().minus({ months: 3 }).toJSDate();
  await f.t.db("milestones").where({ id: m.id }).update({ created_at: then });
  await f.t.db("milestone_events").where({ milestone_id: m.id }).update({ at: then });
  return m;
}

async function moveForecast(m: { id: number; version: number }, forecastFinish: string) {
  const { lead } = f.as;
  const after = await ok<{ version: number }>(lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", lead.csrf).send({ forecastFinish, version: m.version }), 200);
  m.version = after.version;
}

const send = (method: "post" | "patch", path: string, body: object) => f.as.lead.agent[method](path).set("X-CSRF-Token", f.as.lead.csrf).send(body);
const draft = (slug: string, month = lastMonth) => ok<ReportDetail>(send("post", `/api/projects/${slug}/reports`, { month }), 201);
const issue = (r: { id: number; version: number }) => send("post", `/api/reports/${r.id}/issue`, { version: r.version });
const forecastIn = (figures: unknown, name: string) => (figures as ReportFigures).milestones.find((m) => m.name === name)?.forecastFinish;

describe("a report shows the record as it stood at its month end", () => {
  it("keeps last month's forecast in a draft, in the issued figures, and in a correction, after the forecast moves", async () => {
    const project = await createProject(f.t);
    const m = await milestoneBefore(project.slug, "2027-03-10");
    await moveForecast(m, "2027-04-20");

    const d = await draft(project.slug);
    // The draft recomputes at the month end from events: the later move is undone.
    expect(forecastIn(d.figures, m.name)).toBe("2027-03-10");
    expect((d.figures as unknown as ReportFigures).monthEnd.slice(0, 7)).toBe(lastMonth);

    const issued = await ok<ReportDetail>(issue(d), 200);
    expect(issued.state).toBe("issued");
    expect(forecastIn(issued.figures, m.name)).toBe("2027-03-10");

    await moveForecast(m, "2027-06-01");
    const again = await ok<ReportDetail>(f.as.lead.agent.get(`/api/reports/${d.id}`), 200);
    expect(forecastIn(again.figures, m.name)).toBe("2027-03-10");

    const correction = await ok<ReportDetail>(send("post", `/api/reports/${d.id}/correct`, { note: "Budget walk restated", version: issued.version }), 201);
    expect(correction.state).toBe("draft");
    expect(correction.supersedes?.id).toBe(d.id);
    expect(forecastIn(correction.figures, m.name)).toBe("2027-03-10");

    await ok(issue(correction), 200);
    const list = await ok<ReportListItem[]>(f.as.lead.agent.get(`/api/projects/${project.slug}/reports`), 200);
    expect(list.find((r) => r.id === d.id)).toMatchObject({ state: "superseded", supersededBy: { id: correction.id } });
    expect(list.find((r) => r.id === correction.id)).toMatchObject({ state: "issued", correctionNote: "Budget walk restated" });
  });

  it("refuses a month that has not ended (422) and a second open draft of a month (409)", async () => {
    const project = await createProject(f.t);
    const thisMonth = DateTime.now().setZone("Europe/London").toFormat("yyyy-MM");
    expect((await send("post", `/api/projects/${project.slug}/reports`, { month: thisMonth })).status).toBe(422);
    await draft(project.slug);
    expect((await send("post", `/api/projects/${project.slug}/reports`, { month: lastMonth })).status).toBe(409);
  });

  it("keeps commentary per section as sanitised HTML, and refuses edits once issued", async () => {
    const project = await createProject(f.t);
    const d = await draft(project.slug);
    const patched = await ok<ReportDetail>(send("patch", `/api/reports/${d.id}`, { commentary: { summary: doc(text("Hall 2A held its date <script>")) }, version: d.version }), 200);
    expect(patched.commentaryHtml.summary).toContain("Hall 2A held its date &lt;script&gt;");
    await ok(issue(patched), 200);
    expect((await send("patch", `/api/reports/${d.id}`, { commentary: { summary: null }, version: patched.version + 1 })).status).toBe(409);
  });
});

describe("drafts are for staff only", () => {
  let slug = "";
  let draftId = 0;
  beforeAll(async () => {
    slug = (await createProject(f.t)).slug;
    draftId = (await draft(slug)).id;
  });

  it("an investor does not find a draft in the list, by id, or as a PDF", async () => {
    const { investor } = f.as;
    const list = await ok<ReportListItem[]>(investor.agent.get(`/api/projects/${slug}/reports`), 200);
    expect(list.map((r) => r.id)).not.toContain(draftId);
    expect((await investor.agent.get(`/api/reports/${draftId}`)).status).toBe(404);
    expect((await investor.agent.get(`/api/reports/${draftId}/pdf`)).status).toBe(404);
  });

  it("leads and admins see the draft and preview its PDF; marketing gets 403 (no money) and visitors 401", async () => {
    expect((await f.as.marketing.agent.get(`/api/projects/${slug}/reports`)).status).toBe(403);
    expect((await f.as.marketing.agent.get(`/api/reports/${draftId}`)).status).toBe(403);
    const list = await ok<ReportListItem[]>(f.as.admin.agent.get(`/api/projects/${slug}/reports`), 200);
    expect(list.find((r) => r.id === draftId)?.state).toBe("draft");
    const pdf = await f.as.lead.agent.get(`/api/reports/${draftId}/pdf`).buffer(true);
    expect(pdf.status).toBe(200);
    expect(pdf.headers["content-type"]).toBe("application/pdf");
    expect(Buffer.from(pdf.body as Buffer).subarray(0, 5).toString()).toBe("%PDF-");
    const { default: request } = await import("supertest");
    expect((await request(f.t.plumbline.app).get(`/api/projects/${slug}/reports`)).status).toBe(401);
  });

  it("only leads and admins draft and issue (403 for marketing and investors)", async () => {
    for (const who of [f.as.marketing, f.as.investor]) {
      expect((await who.agent.post(`/api/projects/${slug}/reports`).set("X-CSRF-Token", who.csrf).send({ month: "2020-01" })).status).toBe(403);
      expect((await who.agent.post(`/api/reports/${draftId}/issue`).set("X-CSRF-Token", who.csrf).send({ version: 1 })).status).toBe(403);
    }
  });
});

describe("issuing notifies each reader once", () => {
  it("stores the PDF as an investor document, queues one notice per active investor, sends each once even with two senders racing, and a second issue sends nothing", async () => {
    // Other tests' notices go first, so this test counts only its own.
    await f.t.plumbline.reports.sendNotices();
    const project = await createProject(f.t);
    const d = await draft(project.slug);
    const issued = await ok<ReportDetail>(issue(d), 200);
    expect(issued.documentId).not.toBeNull();
    const document = await f.t.db("documents").where({ id: issued.documentId! }).first("category", "audience", "period_end");
    expect(document).toMatchObject({ category: "monitoring_report", audience: "investor" });

    const investors = (await f.t.db("users").where({ role: "investor" }).whereNull("disabled_at").select("id", "email")) as Array<{ id: number; email: string }>;
    const notices = await f.t.db("report_notices").where({ report_id: d.id }).select("user_id");
    expect(notices.map((n) => Number(n.user_id)).sort()).toEqual(investors.map((u) => Number(u.id)).sort());

    expect((await issue(issued)).status).toBe(409);
    expect((await issue(d)).status).toBe(409);
    expect(await f.t.db("report_notices").where({ report_id: d.id }).count({ n: "*" })).toEqual([{ n: investors.length }]);

    const [a, b] = await Promise.all([f.t.plumbline.reports.sendNotices(), f.t.plumbline.reports.sendNotices()]);
    expect(a + b).toBe(investors.length);
    expect(await f.t.plumbline.reports.sendNotices()).toBe(0);
    expect((await f.t.db("report_notices").where({ report_id: d.id }).select("status")).map((n) => n.status)).toEqual(investors.map(() => "sent"));

    const link = `/investors/projects/${project.slug}/reports/${d.id}`;
    for (const u of investors) {
      const mails = (await f.t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", u.email.toLowerCase()).andWhere("m.text", "like", `%${link}%`).select("m.text", "m.html")) as Array<{ text: string; html: string }>;
      expect(mails).toHaveLength(1);
      // A link into the investor room, never the file.
      expect(mails[0]!.text).not.toContain("/pdf");
      expect(mails[0]!.html).not.toContain(`/api/documents/${issued.documentId}/file`);
    }
  });

  it("an investor downloads the issued report from the library: stamped for them, and the view logged", async () => {
    const project = await createProject(f.t);
    const issued = await ok<ReportDetail>(issue(await draft(project.slug)), 200);
    const list = await ok<ReportListItem[]>(f.as.investor.agent.get(`/api/projects/${project.slug}/reports`), 200);
    expect(list.map((r) => ({ id: r.id, month: r.month, state: r.state }))).toEqual([{ id: issued.id, month: lastMonth, state: "issued" }]);
    const res = await f.as.investor.agent.get(`/api/reports/${issued.id}/pdf`).buffer(true);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    const views = await f.t.db("document_views").where({ document_id: issued.documentId! }).count({ n: "*" });
    expect(views).toEqual([{ n: 1 }]);
  });
});
