import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { DecisionAnswer } from "../../src/shared/schemas/decisions.ts";
import type { DigestUpcoming } from "../../src/shared/schemas/digests.ts";
import type { FacilityAnswer } from "../../src/shared/schemas/facility.ts";
import { DIGESTS_DUE_WITHIN_DAYS, OfficeWaitingSchema, type WaitingItem, type WaitingKind } from "../../src/shared/schemas/office.ts";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

const SLUG = "aldermere-phase-2";
type Client = { agent: Agent; csrf: string };
let t: TestApp;
let lead: Client;

beforeAll(async () => {
  t = await startTestApp();
  lead = await signIn(t, DEMO.lead);
});
afterAll(async () => {
  await t.close();
});

async function waitingOf(c: Client): Promise<WaitingItem[]> {
  const r = await c.agent.get("/api/office/waiting").expect(200);
  expect(r.headers["cache-control"]).toBe("private, no-store");
  return OfficeWaitingSchema.parse(r.body).items;
}
const countOf = (items: WaitingItem[], kind: WaitingKind) => items.find((i) => i.kind === kind && i.project.slug === SLUG)?.count ?? 0;

/** Each count as the module's own office route reports it, read as a lead. */
async function expectedCounts(): Promise<Record<WaitingKind, number>> {
  const review = await lead.agent.get(`/api/projects/${SLUG}/posts`).query({ status: "in_review" }).expect(200);
  const photos = await lead.agent.get("/api/media").query({ project: SLUG, sensitivity: "unreviewed", pageSize: 1 }).expect(200);
  const enquiries = await lead.agent.get("/api/enquiries").query({ status: "new", projectSlug: SLUG }).expect(200);
  const upcoming = (await lead.agent.get("/api/digests/upcoming").query({ project: SLUG }).expect(200)).body as DigestUpcoming[];
  const decisions = (await lead.agent.get(`/api/projects/${SLUG}/decisions`).expect(200)).body as DecisionAnswer[];
  const facility = (await lead.agent.get(`/api/projects/${SLUG}/facility`).expect(200)).body as FacilityAnswer;
  const until = Date.now() + DIGESTS_DUE_WITHIN_DAYS * 86_400_000;
  const onSite = new Set(["installed", "L1", "L2", "L3", "L4", "L5"]);
  return {
    updates_to_review: Number(review.headers["x-total-count"]),
    photos_to_clear: photos.body.total as number,
    new_enquiries: (enquiries.body as unknown[]).length,
    digests_due: upcoming.filter((d) => d.recipients > 0 && Date.parse(d.at) <= until).length,
    decisions_overdue: decisions.filter((d) => d.status === "open" && d.overdue).length,
    units_awaiting_commissioning: facility.systems.flatMap((s) => s.units).filter((u) => onSite.has(u.stage) && !u.available).length,
  };
}

describe("GET /api/office/waiting", () => {
  it("gives a lead every kind of waiting work on the demo, each as its own module counts it", async () => {
    const expected = await expectedCounts();
    const items = await waitingOf(lead);
    for (const kind of Object.keys(expected) as WaitingKind[]) expect(countOf(items, kind), kind).toBe(expected[kind]);
    // The demo has work of these kinds waiting, so the counts above are not all trivially zero.
    expect(expected.updates_to_review).toBeGreaterThan(0);
    expect(expected.photos_to_clear).toBeGreaterThan(0);
    expect(expected.units_awaiting_commissioning).toBeGreaterThan(0);
    // Nothing waiting is not listed.
    expect(items.every((i) => i.count >= 1)).toBe(true);
    const digests = items.find((i) => i.kind === "digests_due");
    if (digests) expect(Date.parse(digests.nextAt ?? "")).not.toBeNaN();
  });

  it("asks marketing only for the work marketing does: enquiries and digests", async () => {
    const marketing = await signIn(t, DEMO.marketing);
    const expected = await expectedCounts();
    const items = await waitingOf(marketing);
    expect(new Set(items.map((i) => i.kind))).toEqual(new Set((["new_enquiries", "digests_due"] as const).filter((k) => expected[k] > 0)));
    expect(countOf(items, "new_enquiries")).toBe(expected.new_enquiries);
  });

  it("gives an admin the lead's work too", async () => {
    const admin = await signIn(t, DEMO.admin);
    const [a, l] = [await waitingOf(admin), await waitingOf(lead)];
    expect(a).toEqual(l);
  });

  it("moves when the work is done: clearing a photo takes one off the count", async () => {
    const before = countOf(await waitingOf(lead), "photos_to_clear");
    const queue = (await lead.agent.get("/api/media").query({ project: SLUG, sensitivity: "unreviewed", pageSize: 1 }).expect(200)).body as { items: Array<{ id: number }> };
    const id = queue.items[0]!.id;
    await lead.agent.post(`/api/media/${id}/review`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "cleared" }).expect(200);
    expect(countOf(await waitingOf(lead), "photos_to_clear")).toBe(before - 1);
  });

  it("is for staff: an investor is refused and a visitor asked to sign in", async () => {
    const investor = await signIn(t, DEMO.investor);
    await investor.agent.get("/api/office/waiting").expect(403);
    await (await newClient(t)).agent.get("/api/office/waiting").expect(401);
  });
});
