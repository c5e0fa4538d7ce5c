import { beforeAll, describe, expect, it } from "vitest";
import { lastMailId, type TestApp } from "../helpers/app.ts";
import { digestSubscriber, digestsTo as digestMail, scheduledRun } from "../helpers/digests.ts";
import { createMilestone, createProject, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const DAY = 86_400_000;
const subscriber = (projectId: number, audience: "public" | "investor") => digestSubscriber(t, projectId, audience, "removal");
const digestsTo = async (email: string, after: number) => (await digestMail(t, email, after)).map((m) => m.text);

describe("a weekly digest reports milestones removed from the programme", () => {
  it("to the audiences that could see each one, with the reason, and to no one else", async () => {
    const p = await createProject(t);
    // Due within 30 days, so only its removal keeps it off the "due" list.
    const soon = new Date(Date.now() + 10 * DAY).toISOString().slice(0, 10);
    const pub = await createMilestone(t, p.slug, { name: "Visitor centre opened", audience: "public", baselineFinish: soon });
    const inv = await createMilestone(t, p.slug, { name: "Lender's technical adviser sign-off", audience: "investor" });
    const int = await createMilestone(t, p.slug, { name: "Internal snag walk closed", audience: "internal" });
    const reasons = new Map([
      [pub.id, "The visitor centre moves to Phase 3"],
      [inv.id, "Sign-off now sits with the Phase 3 facility"],
      [int.id, "Snagging is tracked on the punch list"],
    ]);
    for (const [id, reason] of reasons) {
      await as.lead.agent.post(`/api/milestones/${id}/remove`).set("X-CSRF-Token", as.lead.csrf).send({ reason }).expect(200);
    }
    const publicEmail = await subscriber(p.id, "public");
    const investorEmail = await subscriber(p.id, "investor");
    const before = await lastMailId(t);

    const run = await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * DAY));
    expect(run.created).toBe(true);
    await t.plumbline.digestJobs.drain();

    const [forPublic] = await digestsTo(publicEmail, before);
    expect(forPublic).toBeDefined();
    expect(forPublic).toContain("Visitor centre opened: removed from the programme (The visitor centre moves to Phase 3)");
    expect(forPublic).not.toContain("Lender's technical adviser");
    expect(forPublic).not.toContain("Phase 3 facility");
    expect(forPublic).not.toContain("Internal snag walk");
    expect(forPublic).not.toContain("punch list");

    const [forInvestor] = await digestsTo(investorEmail, before);
    expect(forInvestor).toContain("Visitor centre opened: removed from the programme");
    expect(forInvestor).toContain("Lender's technical adviser sign-off: removed from the programme (Sign-off now sits with the Phase 3 facility)");
    expect(forInvestor).not.toContain("Internal snag walk");
    // A removed milestone is not "due in the next 30 days", whatever its dates.
    expect(forInvestor).not.toMatch(/Due in the next 30 days[\s\S]*Visitor centre opened/);
  });

  it("sends nothing to a reader whose only news would be the removal of a milestone they could not see", async () => {
    const p = await createProject(t);
    const int = await createMilestone(t, p.slug, { name: "Internal cable tray audit", audience: "internal" });
    await as.lead.agent.post(`/api/milestones/${int.id}/remove`).set("X-CSRF-Token", as.lead.csrf).send({ reason: "Audit merged into the L3 checks" }).expect(200);
    const publicEmail = await subscriber(p.id, "public");
    const investorEmail = await subscriber(p.id, "investor");
    const before = await lastMailId(t);
    await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * DAY));
    await t.plumbline.digestJobs.drain();
    expect(await digestsTo(publicEmail, before)).toEqual([]);
    expect(await digestsTo(investorEmail, before)).toEqual([]);
  });
});
