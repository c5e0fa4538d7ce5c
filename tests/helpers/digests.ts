import { randomBytes } from "node:crypto";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
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

/** A confirmed weekly subscriber of every topic, straight into the database, reading as a visitor or an investor. */
export async function digestSubscriber(t: TestApp, projectId: number, audience: "public" | "investor", tag = "reader"): Promise<string> {
  const email = `${tag}-${audience}-${randomBytes(3).toString("hex")}@example.org`;
  await t.db("subscribers").insert({ project_id: projectId, email, email_hash: hashAddress(email), name: audience, interest: audience === "investor" ? "investor" : "prospect", audience, frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() });
  return email;
}

/** The digests (not other mail) the sink took for an address after mail `after`, oldest first. */
export async function digestsTo(t: TestApp, email: string, after: number): Promise<Array<{ text: string; html: string }>> {
  return t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", email).andWhere("m.id", ">", after).andWhere("m.message_id", "like", "<digest.%").orderBy("m.id").select("m.text", "m.html");
}
