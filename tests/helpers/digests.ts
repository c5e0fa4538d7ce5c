import type { TestApp } from "./app.ts";

/**
 * The run the digest scheduler would start at `at`. A test that publishes now and wants this
 * week's (or month's) digest stands the run just after the period ends, as the scheduler will:
 * staff cannot ask for that over HTTP, where POST /api/digests/runs refuses an `at` in the future.
 */
export async function scheduledRun(t: TestApp, projectSlug: string, frequency: "weekly" | "monthly", at: Date): Promise<{ id: number; status: string; created: boolean }> {
  const project = await t.db("projects").where({ slug: projectSlug }).first("id", "time_zone");
  if (!project) throw new Error(`no project ${projectSlug}`);
  const { id, created } = await t.plumbline.digests.createRun({ projectId: Number(project.id), frequency, at, timeZone: String(project.time_zone) });
  if (created) await t.plumbline.digests.planRun(id);
  const run = await t.db("digest_runs").where({ id }).first("status");
  return { id, status: String(run.status), created };
}
