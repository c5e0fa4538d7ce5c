import { createHash } from "node:crypto";
import ICAL from "ical.js";
import { beforeAll, describe, expect, it } from "vitest";
import { createUser, newClient, signIn, type TestApp } from "../helpers/app.ts";
import { facilityWriter } from "./facility-fixtures.ts";
import { createProject, useAppAsEveryRole, type Client, type EveryRole } from "./posts-fixtures.ts";
import { recordWriter } from "./record-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => {
  ({ t, as } = app);
});

interface ParsedEvent {
  uid: string;
  summary: string;
  description: string;
  start: string;
  isDate: boolean;
  sequence: number;
}

/** Parses a feed with ical.js (a well-kept iCalendar parser): it throws on text that is not iCalendar. */
function parseFeed(text: string): ParsedEvent[] {
  const calendar = new ICAL.Component(ICAL.parse(text));
  return calendar.getAllSubcomponents("vevent").map((v) => {
    const e = new ICAL.Event(v);
    return { uid: e.uid, summary: e.summary, description: e.description, start: e.startDate.toString(), isDate: e.startDate.isDate, sequence: e.sequence ?? 0 };
  });
}

/** The raw text with folds undone (RFC 5545 §3.1: CRLF followed by one space or tab). */
const unfold = (text: string) => text.replace(/\r\n[ \t]/g, "");

/** The rules of RFC 5545 every feed must keep, checked on the raw text. */
function expectWellFormed(text: string): void {
  // Source: RFC 5545 §3.1 — content lines are delimited by CRLF.
  expect(text.endsWith("\r\n")).toBe(true);
  expect(/[^\r]\n|\r[^\n]/.test(text)).toBe(false);
  // Source: RFC 5545 §3.1 — lines SHOULD NOT be longer than 75 octets, excluding the line break.
  const lines = text.split("\r\n").slice(0, -1);
  for (const line of lines) expect(Buffer.byteLength(line, "utf8"), line).toBeLessThanOrEqual(75);
  // Source: RFC 5545 §3.1 — a fold never splits a multi-octet UTF-8 character (each line is valid UTF-8 on its own).
  for (const line of lines) expect(line.includes("\uFFFD")).toBe(false);
  const whole = unfold(text);
  // Source: RFC 5545 §3.7.4 (VERSION) and §3.7.3 (PRODID) — both required in a VCALENDAR.
  expect(whole).toMatch(/^BEGIN:VCALENDAR\r\n(?:.*\r\n)*VERSION:2\.0\r\n/);
  expect(whole).toMatch(/\r\nPRODID:[^\r\n]+\r\n/);
  // Source: RFC 5545 §3.6.1 — each VEVENT has exactly one UID and one DTSTAMP.
  const events = whole.split("BEGIN:VEVENT\r\n").slice(1).map((e) => e.slice(0, e.indexOf("END:VEVENT")));
  for (const e of events) {
    expect(e.match(/^UID:/gm)?.length, e).toBe(1);
    expect(e.match(/^DTSTAMP:\d{8}T\d{6}Z$/gm)?.length, e).toBe(1);
    // Source: RFC 5545 §3.3.4, §3.6.1 — an all-day event's DTSTART is a DATE value; DTEND (exclusive) the next day.
    expect(e).toMatch(/^DTSTART;VALUE=DATE:\d{8}$/m);
    expect(e).toMatch(/^DTEND;VALUE=DATE:\d{8}$/m);
    // Source: RFC 5545 §3.8.7.3 — LAST-MODIFIED is a UTC DATE-TIME.
    expect(e).toMatch(/^LAST-MODIFIED:\d{8}T\d{6}Z$/m);
  }
}

async function getCalendar(path: string, c?: { agent: Client["agent"] }): Promise<{ status: number; text: string; headers: Record<string, string> }> {
  const res = await (c ?? (await newClient(t))).agent.get(path).buffer(true).parse((r, done) => {
    let body = "";
    r.setEncoding("utf8");
    r.on("data", (chunk: string) => (body += chunk));
    r.on("end", () => done(null, body));
  });
  return { status: res.status, text: res.body as string, headers: res.headers as Record<string, string> };
}

const byUid = (events: ParsedEvent[], prefix: string, id: number) => events.find((e) => e.uid.startsWith(`${prefix}-${id}@`));

async function newFeed(c: Client, slug: string): Promise<string> {
  const res = await c.agent.post(`/api/projects/${slug}/calendar-feed`).set("X-CSRF-Token", c.csrf).send({});
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  expect(Date.parse(res.body.createdAt)).not.toBeNaN();
  return new URL(res.body.url as string).pathname;
}

describe("GET /projects/:slug/calendar.ics (public)", () => {
  it("public milestones and blocks as all-day events under the RFC's rules; internal and investor ones never appear", async () => {
    const p = await createProject(t);
    const f = facilityWriter(as.lead);
    // Multi-byte names make the folds fall between octets of one character unless folding counts octets.
    const name = "Générateurs — 電源設備の試運転と統合試験; Hall 2A, cooling \\ L4 commissioning";
    const shown = await f.milestone(p.slug, { name, baselineFinish: "2027-03-01", forecastFinish: "2027-03-15" });
    const investorOnly = await f.milestone(p.slug, { name: "Investor-only finance close", audience: "investor" });
    const internal = await f.milestone(p.slug, { name: "Internal crane hire ends", audience: "internal" });
    const block = await f.block(p.slug, { name: "Hall 2A", dependsOn: [shown.id] });

    const res = await getCalendar(`/projects/${p.slug}/calendar.ics`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("text/calendar; charset=utf-8");
    expect(res.headers["cache-control"]).toMatch(/^public, max-age=\d+/);
    expectWellFormed(res.text);

    const events = parseFeed(res.text);
    const m = byUid(events, "milestone", shown.id)!;
    expect(m.summary).toBe(name);
    expect(m.isDate).toBe(true);
    expect(m.start).toBe("2027-03-15");
    expect(m.description).toContain("1 March 2027");
    expect(m.description).toContain("14 calendar days later than planned");
    expect(m.description).toContain(`/projects/${p.slug}/timeline`);
    // Source: RFC 5545 §3.3.11 — TEXT escapes ";" "," "\" as "\;" "\," "\\" and a line break as "\n".
    const raw = unfold(res.text);
    expect(raw).toContain("SUMMARY:Générateurs — 電源設備の試運転と統合試験\\; Hall 2A\\, cooling \\\\ L4 commissioning\r\n");
    expect(raw).toMatch(/^DESCRIPTION:[^\r\n]*\\n[^\r\n]*$/m);
    expect(m.description).toContain("\n");
    // Source: RFC 5545 §3.1 — the SUMMARY line really was folded (over 75 octets unfolded).
    expect(Buffer.byteLength(`SUMMARY:${name}`)).toBeGreaterThan(75);

    const b = byUid(events, "block", block.id)!;
    expect(b.start).toBe("2027-03-15");
    expect(b.summary).toContain("Hall 2A");
    expect(byUid(events, "milestone", investorOnly.id)).toBeUndefined();
    expect(byUid(events, "milestone", internal.id)).toBeUndefined();
    expect(res.text).not.toContain("Internal crane hire");
    expect(res.text).not.toContain("Investor-only");
  });

  it("when a forecast moves, the event keeps its UID, its SEQUENCE rises and its date moves (the block's too)", async () => {
    const p = await createProject(t);
    const f = facilityWriter(as.lead);
    const m = await f.milestone(p.slug, { name: "Chillers commissioned (L4)", baselineFinish: "2027-05-01", forecastFinish: "2027-05-01" });
    const block = await f.block(p.slug, { name: "Hall 3", dependsOn: [m.id] });
    const before = parseFeed((await getCalendar(`/projects/${p.slug}/calendar.ics`)).text);

    const moved = await f.send("patch", `/api/milestones/${m.id}`, { version: m.version, forecastFinish: "2027-06-12" });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    const after = parseFeed((await getCalendar(`/projects/${p.slug}/calendar.ics`)).text);

    const [m0, m1] = [byUid(before, "milestone", m.id)!, byUid(after, "milestone", m.id)!];
    expect(m1.uid).toBe(m0.uid);
    // Source: RFC 5545 §3.8.7.4 — SEQUENCE is incremented each time the organizer revises the event's date.
    expect(m1.sequence).toBeGreaterThan(m0.sequence);
    expect([m0.start, m1.start]).toEqual(["2027-05-01", "2027-06-12"]);
    expect(m1.description).toContain("42 calendar days later than planned");

    const [b0, b1] = [byUid(before, "block", block.id)!, byUid(after, "block", block.id)!];
    expect(b1.uid).toBe(b0.uid);
    expect(b1.sequence).toBeGreaterThan(b0.sequence);
    expect([b0.start, b1.start]).toEqual(["2027-05-01", "2027-06-12"]);
  });

  it("an unknown project is 404", async () => {
    expect((await getCalendar("/projects/no-such-project-here/calendar.ics")).status).toBe(404);
  });
});

describe("personal feeds: POST/DELETE /api/projects/:slug/calendar-feed, GET /calendars/:token.ics", () => {
  it("an investor's feed adds investor milestones and open investor decisions, never internal items; staff's adds internal ones", async () => {
    const p = await createProject(t);
    const f = facilityWriter(as.lead);
    const w = recordWriter(as.lead);
    const pub = await f.milestone(p.slug, { name: "Energisation of the campus substation" });
    const inv = await f.milestone(p.slug, { name: "Hall 2A ready for service (investors)", audience: "investor", baselineFinish: "2027-04-01" });
    const internal = await f.milestone(p.slug, { name: "Internal witness test of generator 2", audience: "internal" });
    const decision = await w.decision(p.slug, { title: "Second generator set, Hall 2", neededBy: "2099-01-15" });
    const internalDecision = await w.decision(p.slug, { title: "Site canteen contractor", audience: "internal" });

    const path = await newFeed(as.investor, p.slug);
    expect(path).toMatch(/^\/calendars\/[A-Za-z0-9_-]{43}\.ics$/);
    const res = await getCalendar(path);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("text/calendar; charset=utf-8");
    expect(res.headers["cache-control"]).toBe("private, no-store");
    expect(res.headers["referrer-policy"]).toBe("no-referrer");
    expectWellFormed(res.text);
    const events = parseFeed(res.text);
    expect(byUid(events, "milestone", pub.id)).toBeDefined();
    expect(byUid(events, "milestone", inv.id)?.start).toBe("2027-04-01");
    const d = byUid(events, "decision", decision.id)!;
    expect(d.start).toBe("2099-01-15");
    expect(d.summary).toContain("Second generator set, Hall 2");
    expect(byUid(events, "milestone", internal.id)).toBeUndefined();
    expect(byUid(events, "decision", internalDecision.id)).toBeUndefined();

    const staff = parseFeed((await getCalendar(await newFeed(as.lead, p.slug))).text);
    expect(byUid(staff, "milestone", internal.id)).toBeDefined();
    expect(byUid(staff, "decision", internalDecision.id)).toBeDefined();
  });

  it("an investor's feed carries the issue date of each issued monthly report (in the project's time zone); a draft never appears", async () => {
    const p = await createProject(t);
    // Report rows as the reports module leaves them (its own tests cover drafting and issuing).
    const [issued] = await t.db("reports").insert({ project_id: p.id, month: "2026-10", state: "issued", audience: "investor", commentary: "{}", figures: "{}", issued_at: new Date("2026-11-04T23:30:00Z") });
    const [draft] = await t.db("reports").insert({ project_id: p.id, month: "2026-11", state: "draft", audience: "investor", commentary: "{}" });
    const text = (await getCalendar(await newFeed(as.investor, p.slug))).text;
    expectWellFormed(text);
    const events = parseFeed(text);
    const r = byUid(events, "report", Number(issued))!;
    // 23:30 UTC on 4 November is 4 November in London (GMT): the date on site.
    expect(r.start).toBe("2026-11-04");
    expect(r.summary).toContain("2026-10");
    expect(byUid(events, "report", Number(draft))).toBeUndefined();
    expect(byUid(parseFeed((await getCalendar(`/projects/${p.slug}/calendar.ics`)).text), "report", Number(issued))).toBeUndefined();
  });

  it("only a hash of the token is kept; a new feed, a revoke, an altered or unknown token, and a disabled owner all give 404", async () => {
    const p = await createProject(t);
    await facilityWriter(as.lead).milestone(p.slug, { name: "Fibre route complete" });
    const first = await newFeed(as.investor, p.slug);
    const token = first.slice("/calendars/".length, -".ics".length);
    const rows = await t.db("calendar_feeds").where({ project_id: p.id });
    expect(rows).toHaveLength(1);
    expect(rows[0].token_hash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(JSON.stringify(rows)).not.toContain(token);
    expect((await getCalendar(first)).status).toBe(200);

    // An altered token (one character changed) names no feed.
    const altered = `/calendars/${token.slice(0, -1)}${token.endsWith("A") ? "B" : "A"}.ics`;
    expect((await getCalendar(altered)).status).toBe(404);
    expect((await getCalendar("/calendars/not-a-token.ics")).status).toBe(404);

    // A new feed revokes the earlier one.
    const second = await newFeed(as.investor, p.slug);
    expect(second).not.toBe(first);
    expect((await getCalendar(first)).status).toBe(404);
    expect((await getCalendar(second)).status).toBe(200);

    const revoked = await as.investor.agent.delete(`/api/projects/${p.slug}/calendar-feed`).set("X-CSRF-Token", as.investor.csrf);
    expect(revoked.status).toBe(204);
    expect((await getCalendar(second)).status).toBe(404);

    // A disabled owner's feed stops at once.
    const u = await createUser(t, "investor");
    const own = await signIn(t, u.email, u.password);
    const theirs = await newFeed(own, p.slug);
    expect((await getCalendar(theirs)).status).toBe(200);
    const disabled = await as.admin.agent.patch(`/api/users/${u.id}`).set("X-CSRF-Token", as.admin.csrf).send({ disabled: true });
    expect(disabled.status, JSON.stringify(disabled.body)).toBe(200);
    expect((await getCalendar(theirs)).status).toBe(404);
  });

  it("a visitor may not make a feed (401); the URL is shown only in the answer that made it", async () => {
    const p = await createProject(t);
    const visitor = await newClient(t);
    expect((await visitor.agent.post(`/api/projects/${p.slug}/calendar-feed`).set("X-CSRF-Token", visitor.csrf).send({})).status).toBe(401);
    expect((await visitor.agent.delete(`/api/projects/${p.slug}/calendar-feed`).set("X-CSRF-Token", visitor.csrf)).status).toBe(401);
    const made = await as.investor.agent.post(`/api/projects/${p.slug}/calendar-feed`).set("X-CSRF-Token", as.investor.csrf).send({});
    expect(made.headers["cache-control"]).toBe("private, no-store");
  });
});
