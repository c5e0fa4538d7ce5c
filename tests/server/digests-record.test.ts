import { DateTime } from "luxon";
import { PDFDocument, StandardFonts } from "pdf-lib";
import { beforeAll, describe, expect, it } from "vitest";
import { formatAmount, riskLines } from "../../server/digests/digests.record.ts";
import { DEMO, lastMailId, newClient, type TestApp } from "../helpers/app.ts";
import { digestSubscriber, digestsTo, scheduledRun } from "../helpers/digests.ts";
import { createProject, useAppAsEveryRole, type Client, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole({ PUBLIC_URL: "https://progress.kestrel.example", COOKIE_SECURE: "false" });
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const DAY = 86_400_000;
const ZONE = "Europe/London"; // createProject's zone
const today = () => DateTime.now().setZone(ZONE).toISODate()!;
const inDays = (n: number) => DateTime.now().setZone(ZONE).plus({ days: n }).toISODate()!;
const longDate = (iso: string) => DateTime.fromISO(iso).toFormat("d LLLL yyyy");
/** Before this ISO week (the window of the weekly run below) began, whatever the weekday today. */
const beforeTheWindow = () => new Date(DateTime.now().setZone(ZONE).startOf("week").minus({ days: 3 }).toMillis());

/** This week's weekly run, started as the scheduler will start it next Monday, and sent into the sink. */
async function thisWeeksDigests(slug: string) {
  const run = await scheduledRun(t, slug, "weekly", new Date(Date.now() + 7 * DAY));
  expect(run.created).toBe(true);
  await t.plumbline.digestJobs.drain();
  return run;
}

async function ok<T>(res: PromiseLike<{ status: number; body: unknown }>, status: number): Promise<T> {
  const r = await res;
  expect(r.status, JSON.stringify(r.body)).toBe(status);
  return r.body as T;
}

type Item = { id: number; reference?: string; title?: string; version: number };

/** The record as a lead writes it, through the API. */
function recordWriter(c: Client) {
  const send = (method: "post" | "patch", path: string, body: object) => c.agent[method](path).set("X-CSRF-Token", c.csrf).send(body);
  return {
    risk: async (slug: string, body: Record<string, unknown>) => {
      const owner = await t.db("users").where({ email: DEMO.lead }).first("id");
      return ok<Item>(send("post", `/api/projects/${slug}/risks`, { category: "supply_chain", ownerId: Number(owner.id), likelihood: 2, impact: 2, audience: "investor", ...body }), 201);
    },
    patchRisk: (r: Item, body: Record<string, unknown>) => ok<Item>(send("patch", `/api/risks/${r.id}`, { version: r.version, ...body }), 200),
    toIssue: (r: Item, impactNow: string) => ok<unknown>(send("post", `/api/risks/${r.id}/issue`, { version: r.version, impactNow }), 201),
    decision: (slug: string, body: Record<string, unknown>) =>
      ok<Item>(send("post", `/api/projects/${slug}/decisions`, { question: "Which way?", options: [{ label: "Go ahead" }, { label: "Wait" }], decider: "Investors' committee", audience: "investor", ...body }), 201),
    outcome: (d: Item, body: Record<string, unknown>) => ok<Item>(send("post", `/api/decisions/${d.id}/outcome`, { version: d.version, chosenOption: 0, decidedBy: "Investors' committee", decidedOn: today(), ...body }), 200),
    change: (slug: string, body: Record<string, unknown>) =>
      ok<Item>(send("post", `/api/projects/${slug}/budget-changes`, { status: "approved", approvedBy: "Investors' committee", approvedOn: today(), audience: "investor", ...body }), 201),
    document: async (slug: string, fields: Record<string, string>) => {
      const pdf = await PDFDocument.create();
      const font = await pdf.embedFont(StandardFonts.Helvetica);
      pdf.addPage().drawText(fields.title ?? "A document", { x: 50, y: 700, size: 14, font });
      const bytes = Buffer.from(await pdf.save());
      let req = c.agent.post(`/api/projects/${slug}/documents`).set("X-CSRF-Token", c.csrf);
      for (const [k, v] of Object.entries({ category: "monitoring_report", audience: "investor", ...fields })) req = req.field(k, v);
      return ok<Item>(req.attach("file", bytes, { filename: "report.pdf", contentType: "application/pdf" }), 201);
    },
  };
}

/** Moves a subject and its events to before the window: written then, as far as any digest can tell. */
async function writtenBeforeTheWindow(table: string, events: string, column: string, id: number) {
  const at = beforeTheWindow();
  await t.db(table).where({ id }).update({ created_at: at, updated_at: at });
  await t.db(events).where({ [column]: id }).update({ at });
}

const titled = (what: string) => `${what} ${Math.random().toString(36).slice(2, 7)}`;

describe("an investor digest reports the record's moves in its window", () => {
  it("tells investor subscribers of new and risen risks, closures, an issue, decisions, approved changes and new documents (a link to the investor room, no file), over SMTP; the public and internal items reach nobody else", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    // Before the window: a low risk that rises in it, one that closes in it, one that happens in it; a decision needed soon.
    const rising = await w.risk(p.slug, { title: titled("Switchgear lead time"), likelihood: 2, impact: 2 });
    const closing = await w.risk(p.slug, { title: titled("Crane hire on the north apron") });
    const happening = await w.risk(p.slug, { title: titled("Late chiller delivery"), category: "supply_chain", likelihood: 3, impact: 4 });
    for (const r of [rising, closing, happening]) await writtenBeforeTheWindow("risks", "risk_events", "risk_id", r.id);
    const dueSoon = await w.decision(p.slug, { title: titled("Approve the second fuel tank"), neededBy: inDays(7) });
    await writtenBeforeTheWindow("decisions", "decision_events", "decision_id", dueSoon.id);
    // Wholly before the window: nothing of it is news.
    const old = await w.risk(p.slug, { title: titled("Old ground conditions") });
    const oldChange = await w.change(p.slug, { description: titled("Old drainage works"), amount: 1_000_000, approvedOn: beforeTheWindow().toISOString().slice(0, 10) });
    await writtenBeforeTheWindow("risks", "risk_events", "risk_id", old.id);
    await writtenBeforeTheWindow("budget_changes", "budget_events", "change_id", oldChange.id);

    const publicEmail = await digestSubscriber(t, p.id, "public", "record");
    const investorEmail = await digestSubscriber(t, p.id, "investor", "record");

    // In the window.
    const fresh = await w.risk(p.slug, { title: titled("Grid connection date"), category: "regulatory", likelihood: 3, impact: 4 });
    await w.patchRisk(rising, { likelihood: 4, impact: 4 });
    await w.patchRisk(closing, { status: "closed" });
    await w.toIssue(happening, "Chiller 3 arrives five weeks late.");
    const hiddenRisk = await w.risk(p.slug, { title: titled("Contractor claim on piling"), audience: "internal" });
    const needed = await w.decision(p.slug, { title: titled("Liquid-cooling fit-out for HD-1"), neededBy: inDays(40) });
    const toDecide = await w.decision(p.slug, { title: titled("Second water main"), neededBy: inDays(20) });
    await w.outcome(toDecide, { outcome: "Go ahead with the second main." });
    const hiddenDecision = await w.decision(p.slug, { title: titled("Board-only re-tender"), neededBy: inDays(10), audience: "internal" });
    const approved = await w.change(p.slug, { description: titled("Additional cooling controls"), amount: 25_000_000, drawsOnContingency: true });
    const proposed = await w.change(p.slug, { description: titled("Extra landscaping"), amount: 4_000_000, status: "proposed", approvedBy: null, approvedOn: null });
    const hiddenChange = await w.change(p.slug, { description: titled("Internal legal fees"), amount: 3_000_000, audience: "internal" });
    const report = await w.document(p.slug, { title: titled("Monitoring report November"), period: "November 2026" });
    const hiddenDoc = await w.document(p.slug, { title: titled("Internal cost plan"), audience: "internal" });

    const before = await lastMailId(t);
    const run = await thisWeeksDigests(p.slug);

    const [forInvestor, ...more] = await digestsTo(t, investorEmail, before);
    expect(forInvestor, "an investor digest was sent: record moves alone are news").toBeDefined();
    expect(more).toEqual([]);
    const text = forInvestor!.text;
    const ref = async (id: number) => {
      const r = await t.db("risks").where({ id }).first("kind", "number");
      return `${r.kind === "risk" ? "R" : "I"}-${String(r.number).padStart(3, "0")}`;
    };
    const issue = await t.db("risks").where({ from_risk_id: happening.id }).first("id");
    expect(text).toContain("Risks and issues\n");
    expect(text).toContain(`- ${await ref(fresh.id)} ${fresh.title}: new`);
    expect(text).toContain(`- ${await ref(rising.id)} ${rising.title}: rose from low to critical\n`);
    expect(text).toContain(`- ${await ref(closing.id)} ${closing.title}: closed\n`);
    expect(text).toContain(`- ${await ref(happening.id)} ${happening.title}: happened, and is now an issue (${await ref(issue.id)})\n`);
    // The issue opened from it is told with it, not again as new.
    expect(text.split(happening.title!).length - 1).toBe(1);

    expect(text).toContain("Decisions needed\n");
    expect(text).toContain(`${toDecide.title}: decided on ${longDate(today())} by Investors' committee: Go ahead with the second main.\n`);
    expect(text).toContain(`${needed.title}: new request, needed by ${longDate(inDays(40))} (`);
    expect(text).toMatch(new RegExp(`${dueSoon.title}: needed by ${longDate(inDays(7))}: \\d+ days? left \\(Investors' committee decides\\)`));

    expect(text).toContain("Approved budget changes\n");
    expect(text).toContain(`${approved.reference} ${(approved as { description?: string }).description}: +£250,000, approved by Investors' committee on ${longDate(today())}; drawn from the contingency\n`);

    expect(text).toContain("New documents\n");
    expect(text).toContain(`- ${report.title}: new\n`);
    // Each section links to its part of the investor room.
    const room = `https://progress.kestrel.example/investors/projects/${p.slug}`;
    for (const part of ["risks", "decisions", "cost", "documents"]) expect(text).toContain(`: ${room}/${part}\n`);
    expect(forInvestor!.html).toContain(`href="${room}/documents"`);
    // Never a file, nor a signed link to one.
    expect(text).not.toMatch(/\/api\/documents|\/file\b|\.pdf/);
    expect(forInvestor!.html).not.toMatch(/\/api\/documents|\/file\b|\.pdf/);
    expect(forInvestor!.html).toContain(`<strong>${approved.reference} `);

    for (const hidden of [hiddenRisk.title, hiddenDecision.title, (hiddenChange as { description?: string }).description, (proposed as { description?: string }).description, hiddenDoc.title, old.title, (oldChange as { description?: string }).description]) {
      expect(text).not.toContain(hidden);
      expect(forInvestor!.html).not.toContain(hidden);
    }

    // The web copy behind "view in the browser" has the same sections.
    const web = text.match(/https:\/\/progress\.kestrel\.example(\/api\/digests\/web\/[A-Za-z0-9_.-]+)/)![1]!;
    const page = await (await newClient(t)).agent.get(web).expect(200);
    expect(page.text).toContain(`${rising.title}</strong>: rose from low to critical`);
    expect(page.text).not.toContain(hiddenRisk.title);

    // A visitor's digest carries none of the record: with nothing else in the window, none is sent.
    expect(await digestsTo(t, publicEmail, before)).toEqual([]);
    const publicDelivery = await t.db("digest_deliveries as d").join("subscribers as s", "s.id", "d.subscriber_id").where({ "d.run_id": run.id, "s.email": publicEmail }).first("d.status", "d.error");
    expect(publicDelivery).toEqual({ status: "skipped", error: "nothing to say" });
  });

  it("says nothing when only internal items and items from before the window moved: no investor digest is sent", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const old = await w.risk(p.slug, { title: titled("Earlier risk") });
    await writtenBeforeTheWindow("risks", "risk_events", "risk_id", old.id);
    const investorEmail = await digestSubscriber(t, p.id, "investor", "quiet");
    await w.risk(p.slug, { title: titled("Internal only"), audience: "internal" });
    await w.change(p.slug, { description: titled("Internal only change"), amount: 100, audience: "internal" });
    const before = await lastMailId(t);
    const run = await thisWeeksDigests(p.slug);
    expect(await digestsTo(t, investorEmail, before)).toEqual([]);
    expect(await t.db("digest_deliveries").where({ run_id: run.id }).first("status", "error")).toEqual({ status: "skipped", error: "nothing to say" });
  });

  it("asks the record's services once per window in a run, however many investors read it, and never for a visitor", async () => {
    const p = await createProject(t);
    await recordWriter(as.lead).risk(p.slug, { title: titled("Shared news") });
    for (let i = 0; i < 9; i += 1) await digestSubscriber(t, p.id, i % 3 ? "investor" : "public", `shared-${i}`);
    const asked: string[] = [];
    const services = t.plumbline as unknown as Record<"risks" | "decisions" | "budget" | "documents", { movesIn: (...a: unknown[]) => Promise<unknown> }>;
    const saved = (["risks", "decisions", "budget", "documents"] as const).map((name) => [name, services[name].movesIn] as const);
    for (const [name, movesIn] of saved) {
      services[name].movesIn = (projectId: unknown, ...rest: unknown[]) => {
        if (projectId === p.id) asked.push(`${name} ${String(rest[2])}`);
        return movesIn(projectId, ...rest);
      };
    }
    try {
      const run = await thisWeeksDigests(p.slug);
      expect(await t.db("digest_deliveries").where({ run_id: run.id, status: "sent" }).count({ n: "*" }).first()).toEqual({ n: 6 });
    } finally {
      for (const [name, movesIn] of saved) services[name].movesIn = movesIn;
    }
    expect(asked.sort()).toEqual(["budget investor", "decisions investor", "documents investor", "risks investor"]);
  });
});

describe("the record's words in a digest", () => {
  it("gives approved amounts exact and signed, in the project's currency", () => {
    expect(formatAmount(25_000_000, "GBP")).toBe("+£250,000");
    expect(formatAmount(-4_000_050, "GBP")).toBe("−£40,000.50");
    expect(formatAmount(1_200, "EUR")).toBe("+€12");
    // No minor unit: the amount is whole yen.
    expect(formatAmount(5_000, "JPY")).toBe("+JP¥5,000");
  });

  it("tells a risk that happened once, with its issue, and not the issue again as new", () => {
    const item = (id: number, reference: string) => ({ id, reference, title: `T${id}`, audience: "investor" as const });
    const lines = riskLines({ new: [item(9, "I-001"), item(3, "R-003")], roseBand: [{ ...item(2, "R-002"), fromBand: "low", toBand: "high" }], closed: [item(1, "R-001")], becameIssues: [{ ...item(1, "R-001"), issue: { id: 9, reference: "I-001" } }] });
    expect(lines.map((l) => `${l.reference} ${l.kind}`)).toEqual(["R-001 became_issue", "R-002 rose", "R-003 new"]);
  });
});
