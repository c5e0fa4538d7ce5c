import { pino } from "pino";
import { beforeAll, describe, expect, it } from "vitest";
import { createDigestJobs } from "../../server/digests/digests.jobs.ts";
import type { Mailer } from "../../server/mail/mail.service.ts";
import { lastMailId, type TestApp } from "../helpers/app.ts";
import { digestSubscriber, digestsTo, scheduledRun } from "../helpers/digests.ts";
import { createMilestone, createProject, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const DAY = 86_400_000;

/** A project with one public reader and something to tell them: a public milestone's forecast moved. */
async function projectWithNews(tag: string) {
  const p = await createProject(t);
  const m = await createMilestone(t, p.slug, { name: "Hall 2A roof watertight", audience: "public", baselineFinish: "2027-03-01", percentComplete: 20 });
  await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: m.version, forecastFinish: "2027-03-15", note: "Roof sheets delivered late" }).expect(200);
  return { ...p, email: await digestSubscriber(t, p.id, "public", tag) };
}

describe("a digest run created while a worker is busy sending another", () => {
  it("is left for planning, not closed with nobody in it, and goes out on the worker's next pass", async () => {
    const a = await projectWithNews("race-a");
    const b = await projectWithNews("race-b");
    const at = new Date(Date.now() + 7 * DAY);
    const before = await lastMailId(t);
    await scheduledRun(t, a.slug, "weekly", at);

    // While the worker sends A's digest — after its pass that plans queued runs, before its pass
    // that closes drained ones — B's run is created (another process, or the office, asks for it).
    let runB: { id: number; created: boolean } | null = null;
    const mailer: Mailer = {
      ...t.mailer,
      async send(mail) {
        runB ??= await t.plumbline.digests.createRun({ projectId: b.id, frequency: "weekly", at, timeZone: "Europe/London" });
        return t.mailer.send(mail);
      },
    };
    const jobs = createDigestJobs({ db: t.db, mailer, logger: pino({ level: "silent" }), digests: t.plumbline.digests, subscribers: t.plumbline.subscribers, outbox: t.plumbline.outbox }, { ratePerSecond: 0 });
    await jobs.drain();
    expect(runB).not.toBeNull();
    const created = runB as unknown as { id: number; created: boolean };
    expect(created.created).toBe(true);
    expect(await digestsTo(t, a.email, before)).toHaveLength(1);
    const statusOf = async () => String((await t.db("digest_runs").where({ id: created.id }).first("status")).status);
    expect(await statusOf()).toBe("queued");

    await jobs.drain();
    expect(await statusOf()).toBe("done");
    expect(await t.db("digest_deliveries").where({ run_id: created.id, status: "sent" }).count({ n: "*" }).first()).toMatchObject({ n: 1 });
    expect(await digestsTo(t, b.email, before)).toHaveLength(1);
  });
});
