import { randomBytes } from "node:crypto";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readerRows } from "../helpers/subscriber-rows.ts";
import { DEMO, lastMailId, signIn, startTestApp, waitForMail, type Agent, type TestApp } from "../helpers/app.ts";

// The site office's long lists (subscribers, outbox, audit log) come a page at a time: `?page=` and
// `?pageSize=` (at most 100), the total beside them, and a bad value refused in the fixed shape.

let t: TestApp;
let admin: { agent: Agent; csrf: string };
let slug: string;
let projectId: number;
const tag = randomBytes(3).toString("hex");

beforeAll(async () => {
  t = await startTestApp();
  admin = await signIn(t, DEMO.admin);
  slug = `paging-${tag}`;
  const [id] = await t.db("projects").insert({ slug, name: "Paging Test Campus", operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
  projectId = Number(id);
  // Seven subscribers, created one second apart so "newest first" is a fixed order.
  await t.db("subscribers").insert(readerRows(projectId, 7, `${tag}.example.com`, Date.UTC(2026, 10, 1, 9, 0, 0)));
});
afterAll(async () => {
  await t.close();
});

const HOSTILE: Array<[string, string]> = [
  ["page=-1", "page"],
  ["page=0", "page"],
  ["page=abc", "page"],
  ["page=1.5", "page"],
  ["pageSize=100000", "pageSize"],
  ["pageSize=0", "pageSize"],
  ["pageSize=ten", "pageSize"],
];

describe("GET /api/subscribers?page=&pageSize=", () => {
  it("answers one page, newest first, with the total and where it is", async () => {
    const first = await admin.agent.get(`/api/subscribers?projectSlug=${slug}&pageSize=3`).expect(200);
    expect(first.body).toMatchObject({ total: 7, page: 1, pageSize: 3 });
    expect(first.body.rows.map((r: { name: string }) => r.name)).toEqual(["Paging Reader 7", "Paging Reader 6", "Paging Reader 5"]);
    const third = await admin.agent.get(`/api/subscribers?projectSlug=${slug}&pageSize=3&page=3`).expect(200);
    expect(third.body).toMatchObject({ total: 7, page: 3, pageSize: 3 });
    expect(third.body.rows.map((r: { name: string }) => r.name)).toEqual(["Paging Reader 1"]);
  });

  it("a page past the end is empty and still gives the total", async () => {
    const res = await admin.agent.get(`/api/subscribers?projectSlug=${slug}&pageSize=3&page=9`).expect(200);
    expect(res.body).toMatchObject({ rows: [], total: 7, page: 9 });
  });

  it("without paging asks for the first 50", async () => {
    const res = await admin.agent.get(`/api/subscribers?projectSlug=${slug}`).expect(200);
    expect(res.body).toMatchObject({ total: 7, page: 1, pageSize: 50 });
    expect(res.body.rows).toHaveLength(7);
  });

  it.each(HOSTILE)("refuses %s with 400 naming the field", async (q, field) => {
    const res = await admin.agent.get(`/api/subscribers?projectSlug=${slug}&${q}`);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation");
    expect(res.body.error.fields).toHaveProperty(field);
  });

  it("the CSV export is never paged: every match, and `page` is not one of its filters", async () => {
    const csv = await admin.agent.get(`/api/subscribers/export.csv?projectSlug=${slug}`).expect(200);
    expect(csv.text.trim().split("\n")).toHaveLength(1 + 7);
    const paged = await admin.agent.get(`/api/subscribers/export.csv?projectSlug=${slug}&page=2`);
    expect(paged.status).toBe(400);
  });
});

describe("GET /api/audit?page=&pageSize=", () => {
  const action = `paging_check_${tag}`;
  beforeAll(async () => {
    await t.db("audit_events").insert(Array.from({ length: 5 }, (_, i) => ({ action, actor_email: `n${i + 1}@kestrel.example`, at: new Date(Date.UTC(2026, 10, 1, 9, i)) })));
  });

  it("answers a page of events newest first, the total in X-Total-Count", async () => {
    const first = await admin.agent.get(`/api/audit?action=${action}&pageSize=2`).expect(200);
    expect(first.headers["x-total-count"]).toBe("5");
    expect(first.headers["cache-control"]).toBe("private, no-store");
    expect(first.body.map((e: { actorEmail: string }) => e.actorEmail)).toEqual(["n5@kestrel.example", "n4@kestrel.example"]);
    const last = await admin.agent.get(`/api/audit?action=${action}&pageSize=2&page=3`).expect(200);
    expect(last.headers["x-total-count"]).toBe("5");
    expect(last.body.map((e: { actorEmail: string }) => e.actorEmail)).toEqual(["n1@kestrel.example"]);
  });

  it.each(HOSTILE)("refuses %s with 400 naming the field", async (q, field) => {
    const res = await admin.agent.get(`/api/audit?${q}`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty(field);
  });
});

describe("GET /api/outbox?page=&pageSize=", () => {
  const to = `paged-${tag}@example.org`;
  beforeAll(async () => {
    const sink = nodemailer.createTransport({ host: t.sink.host, port: t.sink.port, ignoreTLS: true, secure: false });
    try {
      for (let i = 1; i <= 4; i++) {
        const before = await lastMailId(t);
        await sink.sendMail({ from: "progress@kestrel.example", to, subject: `Week ${i}`, text: `Week ${i} on site.` });
        await waitForMail(t, to, before);
      }
    } finally {
      sink.close();
    }
  });

  it("answers a page of messages newest first, the total in X-Total-Count", async () => {
    const first = await admin.agent.get(`/api/outbox?to=${to}&pageSize=3`).expect(200);
    expect(first.headers["x-total-count"]).toBe("4");
    expect(first.body.map((m: { subject: string }) => m.subject)).toEqual(["Week 4", "Week 3", "Week 2"]);
    const second = await admin.agent.get(`/api/outbox?to=${to}&pageSize=3&page=2`).expect(200);
    expect(second.body.map((m: { subject: string }) => m.subject)).toEqual(["Week 1"]);
  });

  it.each(HOSTILE)("refuses %s with 400 naming the field", async (q, field) => {
    const res = await admin.agent.get(`/api/outbox?${q}`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty(field);
  });
});
