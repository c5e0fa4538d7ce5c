import { beforeAll, describe, expect, it } from "vitest";
import { WHOLE_PROGRAMME_NOTE } from "../../src/shared/domain/programme-health.ts";
import { lastMailId, type TestApp } from "../helpers/app.ts";
import { digestSubscriber, digestsTo as digestMail, scheduledRun } from "../helpers/digests.ts";
import { createMilestone, createProject, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const DAY = 86_400_000;

describe("a digest's headline figures", () => {
  it("are the whole programme's for every audience, with the line saying so, and never name an internal milestone", async () => {
    const p = await createProject(t);
    const pub = await createMilestone(t, p.slug, { name: "Hall 2A roof watertight", audience: "public", baselineFinish: "2027-03-01", percentComplete: 20 });
    await createMilestone(t, p.slug, { name: "Internal fire stopping survey", audience: "internal", baselineFinish: "2027-05-03", forecastFinish: "2027-06-01", percentComplete: 60 });
    // News for both readers: the public milestone's forecast moves later.
    await as.lead.agent.patch(`/api/milestones/${pub.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: pub.version, forecastFinish: "2027-03-15", note: "Roof sheets delivered late" }).expect(200);
    const publicEmail = await digestSubscriber(t, p.id, "public", "onefigure");
    const investorEmail = await digestSubscriber(t, p.id, "investor", "onefigure");
    const before = await lastMailId(t);
    await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * DAY));
    await t.plumbline.digestJobs.drain();

    for (const email of [publicEmail, investorEmail]) {
      const [mail] = (await digestMail(t, email, before)).map((m) => m.text);
      expect(mail, email).toBeDefined();
      // Equal weights: (20 + 60) / 2, not the public milestone's 20 % alone.
      expect(mail).toContain("Complete: 40.0%");
      // The forecast completion is the internal milestone's date, shown as a figure, not by its name.
      // Named as the pages name it (the office's "Forecast completion"): "ready for service" is a capacity block's date.
      expect(mail).toContain("Forecast completion: 1 June 2027");
      expect(mail).toContain(WHOLE_PROGRAMME_NOTE);
      expect(mail).not.toContain("fire stopping");
    }
  });
});
