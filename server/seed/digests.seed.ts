import { createHash, randomBytes } from "node:crypto";
import type { Knex } from "knex";
import { itemRefsOf, renderDigest, type DigestDocument } from "../digests/digests.render.ts";
import { listPublishedBetween } from "../posts/posts.repository.ts";
import { previousIsoWeek, previousMonth, type DigestWindow } from "../digests/digests.windows.ts";

/**
 * The demo's digest history: the weekly runs of the last eight weeks and the monthly runs of
 * the last two months, each with its content and one sent delivery per confirmed subscriber
 * of that frequency who had confirmed by then. Runs already present are left alone.
 */
export async function seedDigests(db: Knex, projectSlug: string, now: Date = new Date()): Promise<{ created: string[] }> {
  const project = await db("projects").where({ slug: projectSlug }).first("id", "slug", "name", "operator_name", "postal_address", "time_zone");
  if (!project) return { created: [] };
  const zone = String(project.time_zone);
  const periods: Array<{ frequency: "weekly" | "monthly"; w: DigestWindow }> = [];
  let at = previousIsoWeek(now, zone).end; // this week's Monday: its run covered last week
  for (let i = 0; i < 8; i += 1) {
    const w = previousIsoWeek(at, zone);
    periods.push({ frequency: "weekly", w });
    at = w.start;
  }
  at = previousMonth(now, zone).end;
  for (let i = 0; i < 2; i += 1) {
    const w = previousMonth(at, zone);
    periods.push({ frequency: "monthly", w });
    at = w.start;
  }
  let runs = 0;
  let deliveries = 0;
  // Oldest first, so each subscriber's last digest is the newest one.
  for (const { frequency, w } of periods.sort((a, b) => a.w.end.getTime() - b.w.end.getTime())) {
    const runKey = `${frequency}:${w.label}`;
    if (await db("digest_runs").where({ project_id: project.id, run_key: runKey }).first("id")) continue;
    const recipients = await db("subscribers").where({ project_id: project.id, frequency, status: "confirmed" }).andWhere("confirmed_at", "<", w.end).select("id", "audience", "topics_key");
    const sendAt = new Date(w.end.getTime() + 8 * 3_600_000);
    const [runId] = await db("digest_runs").insert({
      project_id: project.id,
      frequency,
      run_key: runKey,
      window_start: w.start,
      window_end: w.end,
      status: "done",
      created_at: sendAt,
      started_at: sendAt,
      finished_at: new Date(sendAt.getTime() + 2_000 + recipients.length * 150),
    });
    runs += 1;
    const contentIds = new Map<string, number | null>();
    const rows: Array<Record<string, unknown>> = [];
    for (const s of recipients) {
      const audience = s.audience === "investor" ? "investor" : "public";
      // Topic-filtered readers share the all-topics content here: the demo history is illustrative.
      let contentId = contentIds.get(audience);
      if (contentId === undefined) {
        const posts = await listPublishedBetween(db, Number(project.id), audience === "investor" ? ["public", "investor"] : ["public"], w.start, w.end);
        if (posts.length === 0) contentId = null;
        else {
          const doc: DigestDocument = {
            project: { name: String(project.name), slug: String(project.slug), operatorName: String(project.operator_name), postalAddress: project.postal_address ?? null, timeZone: zone },
            frequency,
            windowStart: w.start,
            windowEnd: w.end,
            projectUrl: `/projects/${project.slug}`,
            posts: posts.map((p) => ({ postId: p.id, title: p.title, summary: p.summary, url: `/projects/${project.slug}/updates/${p.slug}`, publishedAt: p.publishedAt, image: null })),
            moves: [],
            facility: [],
            dueSoon: [],
            figures: { percentComplete: null, forecastReady: null, previousPercent: null, previousForecast: null },
          };
          const r = await renderDigest(doc);
          const key = createHash("sha256").update(`${runKey}:${audience}`).digest("hex");
          const [id] = await db("digest_contents").insert({ run_id: runId, content_key: key, audience, topics_key: "all", empty: false, ...r, item_refs: JSON.stringify(itemRefsOf(doc)), percent_complete: null, forecast_ready: null });
          contentId = Number(id);
        }
        contentIds.set(audience, contentId);
      }
      rows.push({
        run_id: runId,
        subscriber_id: s.id,
        content_id: contentId,
        window_start: w.start,
        status: contentId === null ? "skipped" : "sent",
        attempts: contentId === null ? 0 : 1,
        message_id: `<digest.${runId}.${s.id}.${randomBytes(6).toString("hex")}@progress.kestrel.example>`,
        error: contentId === null ? "nothing to say" : null,
        sent_at: contentId === null ? null : new Date(sendAt.getTime() + 1_000),
        next_attempt_at: sendAt,
      });
    }
    if (rows.length) await db("digest_deliveries").insert(rows);
    deliveries += rows.length;
    const sent = rows.filter((r) => r.status === "sent");
    await db("digest_runs").where({ id: runId }).update({ queued_count: rows.length, sent_count: sent.length, skipped_count: rows.length - sent.length });
    if (sent.length) await db("subscribers").whereIn("id", sent.map((r) => Number(r.subscriber_id))).update({ last_digest_at: w.end });
  }
  return { created: runs ? [`${runs} past digest runs with ${deliveries} deliveries`] : [] };
}
