/**
 * What the kill test and `npm run scale` do to the layout: each scenario drives it through the
 * load balancer as users and operators would, kills what it is meant to kill, and returns its
 * figures (the test asserts on them; both print them).
 */
import { randomBytes } from "node:crypto";
import sharp from "sharp";
import { CATCH_UP_MS } from "../../server/digests/digests.schedule.ts";
import { sendTimes } from "../../server/digests/digests.windows.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { LAYOUT_PASSWORD, LAYOUT_PROJECT, type Layout } from "./layout.ts";

/** A cookie-keeping HTTP client with the CSRF token, as a browser would be. */
export interface Client {
  fetch(path: string, init?: RequestInit & { json?: unknown }): Promise<Response>;
  csrf: string;
}

export async function newClient(baseUrl: string): Promise<Client> {
  const jar = new Map<string, string>();
  const remember = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair!.indexOf("=");
      jar.set(pair!.slice(0, eq).trim(), pair!.slice(eq + 1).trim());
    }
  };
  const client: Client = {
    csrf: "",
    async fetch(path, init = {}) {
      const headers = new Headers(init.headers);
      if (jar.size) headers.set("Cookie", [...jar].map(([k, v]) => `${k}=${v}`).join("; "));
      if (client.csrf) headers.set("X-CSRF-Token", client.csrf);
      let body = init.body;
      if (init.json !== undefined) {
        headers.set("Content-Type", "application/json");
        body = JSON.stringify(init.json);
      }
      const res = await fetch(`${baseUrl}${path}`, { ...init, headers, body, redirect: "manual", signal: init.signal ?? AbortSignal.timeout(30_000) });
      remember(res);
      return res;
    },
  };
  const res = await client.fetch("/api/auth/csrf");
  if (res.status !== 200) throw new Error(`GET /api/auth/csrf answered ${res.status}`);
  client.csrf = ((await res.json()) as { token: string }).token;
  return client;
}

export async function signIn(baseUrl: string, email: string): Promise<Client> {
  const c = await newClient(baseUrl);
  const res = await c.fetch("/api/auth/login", { method: "POST", json: { email, password: LAYOUT_PASSWORD } });
  if (res.status !== 200) throw new Error(`sign-in of ${email} answered ${res.status}: ${await res.text()}`);
  return c;
}

async function expectStatus(res: Response, status: number, what: string): Promise<unknown> {
  const text = await res.text();
  if (res.status !== status) throw new Error(`${what} answered ${res.status}, not ${status}: ${text.slice(0, 300)}`);
  return text ? JSON.parse(text) : null;
}

export async function until<T>(what: string, probe: () => Promise<T | null | false | undefined>, timeoutMs = 60_000, everyMs = 100): Promise<T> {
  const started = Date.now();
  let lastError: unknown = null;
  for (;;) {
    const v = await probe().catch((e: unknown) => ((lastError = e), null));
    if (v) return v;
    if (Date.now() - started > timeoutMs) {
      const why = lastError ? ` (the last check failed: ${lastError instanceof Error ? lastError.message : String(lastError)})` : "";
      throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}${why}`);
    }
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

const paragraph = (text: string) => ({ type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text }] }] });

/** Requests each web process answered, from HAProxy's own counters (a deployment's view). */
async function requestsPerWeb(layout: Layout): Promise<Record<string, number>> {
  const rows = await layout.haproxy.servers();
  return Object.fromEntries(rows.filter((r) => r.backend === "web" && r.server !== "BACKEND" && r.server !== "FRONTEND").map((r) => [r.server, r.requests]));
}

export interface SessionSpreadFigures {
  requests: number;
  ok: number;
  perProcess: Record<string, number>;
}

/** Signs in through the load balancer, then sends `requests` requests with the one session. */
export async function sessionAcrossProcesses(layout: Layout, requests = 200): Promise<SessionSpreadFigures> {
  const lead = await signIn(layout.url, "lead@kestrel.example");
  const before = await requestsPerWeb(layout);
  let ok = 0;
  for (let i = 0; i < requests; i += 1) {
    const res = await lead.fetch("/api/auth/me");
    const me = (await res.json().catch(() => null)) as { user?: { email?: string } } | null;
    if (res.status === 200 && me?.user?.email === "lead@kestrel.example") ok += 1;
  }
  const after = await requestsPerWeb(layout);
  const perProcess = Object.fromEntries(Object.keys(after).map((k) => [k, after[k]! - (before[k] ?? 0)]));
  return { requests, ok, perProcess };
}

/** A JPEG of the given size in one colour (a stand-in for a site photo). */
const photo = (width: number, shade: number) =>
  sharp({ create: { width, height: 480, channels: 3, background: { r: 40 + shade, g: 90, b: 140 } } })
    .jpeg()
    .toBuffer();

async function upload(client: Client, slug: string, bytes: Buffer, name: string): Promise<number[]> {
  const form = new FormData();
  form.append("project", slug);
  form.append("files", new Blob([new Uint8Array(bytes)], { type: "image/jpeg" }), name);
  const items = (await expectStatus(await client.fetch("/api/media", { method: "POST", body: form }), 201, "a photo upload")) as Array<{ id: number }>;
  return items.map((m) => Number(m.id));
}

/** A photo of the project made ready by the workers, described and cleared: what an update's cover must be. */
async function clearedCover(layout: Layout, lead: Client, slug: string): Promise<number> {
  const [id] = await upload(lead, slug, await photo(800, randomBytes(1)[0]! % 100), "cover.jpg");
  await until("the cover photo processed", async () => (await layout.db("media_items").where({ id, status: "ready" }).first("id")) ?? null, 60_000);
  await expectStatus(await lead.fetch(`/api/media/${id}`, { method: "PATCH", json: { altText: "Aisle containment frames standing in HD-1" } }), 200, "describing the cover");
  await expectStatus(await lead.fetch(`/api/media/${id}/review`, { method: "POST", json: { sensitivity: "cleared" } }), 200, "clearing the cover");
  return id!;
}

export interface UploadFigures {
  uploads: number;
  processedOnce: number;
  processedTwice: number;
  perWorker: Record<string, number>;
  inS3: number;
  servedFromS3: number;
  seconds: number;
  /** Photos read as ready before their worker's log line had arrived (the wait below covers them). */
  linesLate: number;
}

/** Uploads `count` photos through the load balancer; the workers make their derivatives in S3. */
export async function uploadsProcessedOnce(layout: Layout, count = 20): Promise<UploadFigures> {
  const lead = await signIn(layout.url, "lead@kestrel.example");
  const t0 = Date.now();
  const ids: number[] = [];
  for (let i = 0; i < count; i += 1) ids.push(...(await upload(lead, LAYOUT_PROJECT, await photo(640 + i, i * 9), `hall-2a-${i}.jpg`)));
  await until("every upload processed", async () => {
    const n = await layout.db("media_items").whereIn("id", ids).andWhere({ status: "ready" }).count({ n: "*" }).first();
    return Number(n?.n) === ids.length;
  }, 120_000);
  const seconds = (Date.now() - t0) / 1000;
  // Each worker logs "media processed" once per photo it made derivatives of. The line is
  // written after the row is committed and reaches this process through a pipe, so the row
  // can be read as ready a moment before its line arrives: wait (a bounded while) for every
  // photo's line before counting. A photo whose line never comes is counted as not processed.
  const logged = () => new Set(layout.workers.flatMap((w) => w.log.filter((l) => l.msg === "media processed").map((l) => Number(l.mediaId))));
  const linesLate = ids.filter((id) => !logged().has(id)).length;
  await until("every processed photo's log line", async () => ids.every((id) => logged().has(id)), 10_000).catch(() => undefined);
  const perWorker: Record<string, number> = {};
  const times = new Map<number, number>();
  for (const w of layout.workers) {
    const mine = w.log.filter((l) => l.msg === "media processed" && ids.includes(Number(l.mediaId)));
    perWorker[w.name] = mine.length;
    for (const l of mine) times.set(Number(l.mediaId), (times.get(Number(l.mediaId)) ?? 0) + 1);
  }
  // Every derivative is an object in the S3 bucket, and is served from there.
  const keys = (await layout.db("media_variants").whereIn("media_id", ids).select("storage_key")).map((r: { storage_key: string }) => r.storage_key);
  const stored = new Set<string>();
  for await (const { key } of layout.s3Storage.list("variants/")) stored.add(key);
  const inS3 = keys.filter((k) => stored.has(k)).length;
  let servedFromS3 = 0;
  for (const key of keys.slice(0, 12)) {
    const res = await lead.fetch(`/media/v/${key.replace(/^variants\//, "")}`);
    const bytes = Buffer.from(await res.arrayBuffer());
    const inStore = await layout.s3Storage.get(key);
    if (res.status === 200 && inStore && bytes.equals(inStore)) servedFromS3 += 1;
  }
  return {
    uploads: ids.length,
    processedOnce: ids.filter((id) => times.get(id) === 1).length,
    processedTwice: ids.filter((id) => (times.get(id) ?? 0) > 1).length,
    perWorker,
    inS3,
    servedFromS3: Math.round((servedFromS3 / Math.min(12, keys.length)) * keys.length),
    seconds,
    linesLate,
  };
}

export interface ScheduledFigures {
  publishedEvents: number;
  publishedBy: Record<string, number>;
  /** Seconds from publication until each web process lists it to a visitor (through its own port, past its cache). */
  visibleAfter: Record<string, number>;
}

/** A post scheduled two seconds ahead is published once by one of the workers, and every web process shows it within the cache bound. */
export async function scheduledPostOnce(layout: Layout): Promise<ScheduledFigures> {
  const lead = await signIn(layout.url, "lead@kestrel.example");
  const title = `HD-1 containment goes up ${randomBytes(3).toString("hex")}`;
  const coverMediaId = await clearedCover(layout, lead, LAYOUT_PROJECT);
  const created = (await expectStatus(
    await lead.fetch(`/api/projects/${LAYOUT_PROJECT}/posts`, { method: "POST", json: { title, summary: "The aisle containment of HD-1 is going up.", body: paragraph("The first run of aisle containment is in."), audience: "public", coverMediaId } }),
    201,
    "creating an update",
  )) as { id: number; slug: string };
  // Warm every process's public cache with the list as it is before.
  const list = (port: number) => fetch(`http://127.0.0.1:${port}/api/projects/${LAYOUT_PROJECT}/posts`, { signal: AbortSignal.timeout(5_000) }).then((r) => r.json() as Promise<Array<{ title: string }>>);
  for (const w of layout.webs) await list(w.port!);
  const at = new Date(Date.now() + 2_000);
  await expectStatus(await lead.fetch(`/api/posts/${created.id}/schedule`, { method: "POST", json: { at: at.toISOString() } }), 200, "scheduling the update");
  const publishedAt = await until("the scheduled update published", async () => {
    const row = await layout.db("posts").where({ id: created.id, status: "published" }).first("published_at");
    return row ? Date.now() : null;
  }, 30_000, 50);
  const visibleAfter: Record<string, number> = {};
  await Promise.all(
    layout.webs.map(async (w) => {
      await until(`${w.name} listing the update`, async () => (await list(w.port!)).some((p) => p.title === title), 30_000, 100);
      visibleAfter[w.name] = (Date.now() - publishedAt) / 1000;
    }),
  );
  // The worker's log line follows its commit through a pipe: wait (bounded) for it before counting.
  const publishedLines = (w: (typeof layout.workers)[number]) => w.log.filter((l) => l.msg === "scheduled publication" && Array.isArray(l.published) && (l.published as unknown[]).map(Number).includes(created.id)).length;
  await until("the publication's log line", async () => layout.workers.some((w) => publishedLines(w) > 0), 10_000).catch(() => undefined);
  const publishedBy: Record<string, number> = {};
  for (const w of layout.workers) publishedBy[w.name] = publishedLines(w);
  const events = await layout.db("publishing_events").where({ owner_type: "post", owner_id: created.id, to_status: "published" }).count({ n: "*" }).first();
  return { publishedEvents: Number(events?.n), publishedBy, visibleAfter };
}

export interface WebKillFigures {
  requests: number;
  /** Failed answers (not 200) in the five seconds after the kill: the window HAProxy may take. */
  failedInWindow: number;
  /** Failed answers after that window: must be none. */
  failedAfterWindow: number;
  /** Seconds from the kill until HAProxy had marked the process down. */
  markedDownAfter: number | null;
  perProcess: Record<string, number>;
}

/** Visitors' load through the load balancer; `kill -9` of one web process in the middle of it. */
export async function webKilledUnderLoad(layout: Layout, opts: { seconds?: number; concurrency?: number; victim?: number } = {}): Promise<WebKillFigures> {
  const seconds = opts.seconds ?? 10;
  const victim = layout.webs[opts.victim ?? 0]!;
  const results: Array<{ at: number; ok: boolean }> = [];
  const before = await requestsPerWeb(layout);
  const start = Date.now();
  const end = start + seconds * 1000;
  let killedAt = 0;
  const loops = Array.from({ length: opts.concurrency ?? 6 }, async (_, i) => {
    while (Date.now() < end) {
      const path = i % 2 ? `/api/projects/${LAYOUT_PROJECT}` : `/api/projects/${LAYOUT_PROJECT}/posts`;
      // A connection cut mid-answer by the kill rejects while the body is read, not only at
      // fetch(): both count as a failed answer, never as an error of the test.
      const ok = await fetch(`${layout.url}${path}`, { signal: AbortSignal.timeout(5_000) })
        .then(async (r) => (await r.arrayBuffer(), r.status === 200))
        .catch(() => false);
      results.push({ at: Date.now(), ok });
    }
  });
  const killer = (async () => {
    await new Promise((r) => setTimeout(r, Math.min(2_000, (seconds * 1000) / 4)));
    killedAt = Date.now();
    await victim.kill("SIGKILL");
    const down = await until(
      `HAProxy marking ${victim.name} down`,
      async () => ((await layout.haproxy.servers()).some((s) => s.backend === "web" && s.server === victim.name && !s.status.startsWith("UP")) ? Date.now() : null),
      15_000,
      50,
    ).catch(() => null);
    return down === null ? null : (down - killedAt) / 1000;
  })();
  await Promise.all(loops);
  const markedDownAfter = await killer;
  const after = await requestsPerWeb(layout);
  return {
    requests: results.length,
    failedInWindow: results.filter((r) => !r.ok && r.at >= killedAt && r.at < killedAt + 5_000).length,
    failedAfterWindow: results.filter((r) => !r.ok && r.at >= killedAt + 5_000).length + results.filter((r) => !r.ok && r.at < killedAt).length,
    markedDownAfter,
    perProcess: Object.fromEntries(Object.keys(after).map((k) => [k, after[k]! - (before[k] ?? 0)])),
  };
}

export interface DigestFigures {
  subscribers: number;
  /** Addresses the sink took the digest for exactly once, more than once, and not at all. */
  once: number;
  twice: number;
  missing: number;
  deliveriesSent: number;
  runStatus: string;
  seconds: number;
  /** Deliveries sent when the worker was killed, and when the writing node was stopped. */
  sentAtWorkerKill: number | null;
  sentAtWriterStop: number | null;
  /** The database port HAProxy wrote to before and after the writer was stopped. */
  writerBefore: number | null;
  writerAfter: number | null;
  /** Seconds from the writer's stop until deliveries were being recorded again (the app recovering by itself). */
  recoveredAfter: number | null;
  /** Seconds for the stopped node to rejoin (Synced, cluster of three again). */
  rejoinedAfter: number | null;
}

async function writerPort(layout: Layout): Promise<number> {
  const [rows] = (await layout.db.raw("SELECT @@port AS port")) as unknown as [Array<{ port: number }>];
  return Number(rows[0]!.port);
}

/**
 * A time zone for a project made now in which the workers' scheduler will not make that
 * project's weekly run of its own in the next minutes. From Monday 08:00 local to the next
 * day's, the scheduler catches up on the week's run (`CATCH_UP_MS`); a project made then would
 * get that run — the same period as the one this scenario asks for — planned before its readers
 * are added, and the scenario's request would find it done with nobody in it. Kiritimati
 * (UTC+14) and Pago Pago (UTC−11) are 25 hours apart, so one of them is always out of that window.
 */
export function zoneWithoutWeeklyRunDue(at: Date, withinMs = 10 * 60_000): string {
  const zones = ["Europe/London", "Pacific/Kiritimati", "Pacific/Pago_Pago"];
  const clear = (zone: string) =>
    [0, withinMs].every((ms) => {
      const t = new Date(at.getTime() + ms);
      return t.getTime() - sendTimes("weekly", t, zone).due.getTime() > CATCH_UP_MS;
    });
  return zones.find(clear) ?? "Europe/London";
}

/**
 * A weekly digest to `subscribers` confirmed readers, sent by the worker processes; optionally a
 * worker is killed (`kill -9`) a quarter of the way and the writing database node is stopped half
 * way. Counted per recipient in the sink's record.
 */
export async function digestOnce(layout: Layout, opts: { subscribers?: number; killWorker?: boolean; stopWriter?: boolean } = {}): Promise<DigestFigures> {
  const total = opts.subscribers ?? 2_000;
  const lead = await signIn(layout.url, "lead@kestrel.example");
  // A project of its own: one weekly run per project and week, so each digest here is a new one.
  const slug = `digest-${randomBytes(4).toString("hex")}`;
  const [pid] = await layout.db("projects").insert({ slug, name: `Aldermere Campus, Phase 2 (${slug})`, operator_name: "Kestrel Colocation", time_zone: zoneWithoutWeeklyRunDue(new Date()), description: "A build for one digest run.", currency: "GBP" });
  // Something public to say: an update published last week (the run stands for the week before now).
  const coverMediaId = await clearedCover(layout, lead, slug);
  const created = (await expectStatus(
    await lead.fetch(`/api/projects/${slug}/posts`, { method: "POST", json: { title: `Hall 2A energised ${randomBytes(3).toString("hex")}`, summary: "Hall 2A's switchboards are live.", body: paragraph("Hall 2A's switchboards were energised this week."), audience: "public", coverMediaId } }),
    201,
    "creating an update",
  )) as { id: number };
  await expectStatus(await lead.fetch(`/api/posts/${created.id}/publish`, { method: "POST", json: {} }), 200, "publishing the update");
  const lastWeek = new Date(Date.now() - 7 * 86_400_000);
  await layout.db("posts").where({ id: created.id }).update({ published_at: lastWeek });
  const tag = randomBytes(3).toString("hex");
  const emails = Array.from({ length: total }, (_, i) => `reader-${tag}-${i}@example.org`);
  for (let i = 0; i < emails.length; i += 1_000) {
    await layout.db("subscribers").insert(
      emails.slice(i, i + 1_000).map((email, j) => ({ project_id: pid, email, email_hash: hashAddress(email), name: `Reader ${i + j}`, interest: "prospect", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date(lastWeek.getTime() - 86_400_000) })),
    );
  }
  const t0 = Date.now();
  const run = (await expectStatus(await lead.fetch("/api/digests/runs", { method: "POST", json: { projectSlug: slug, frequency: "weekly" } }), 201, "starting the digest run")) as { id: number };
  const sent = async () => Number((await layout.db("digest_deliveries").where({ run_id: run.id, status: "sent" }).count({ n: "*" }).first())?.n);

  let sentAtWorkerKill: number | null = null;
  let sentAtWriterStop: number | null = null;
  let writerBefore: number | null = null;
  let writerAfter: number | null = null;
  let recoveredAfter: number | null = null;
  let rejoinedAfter: number | null = null;
  let stopped: { index: number } | null = null;
  const progress = async () => {
    const run_ = await layout.db("digest_runs").where({ id: run.id }).first("status").catch(() => null);
    const byStatus = await layout.db("digest_deliveries").where({ run_id: run.id }).groupBy("status").select("status").count({ n: "*" }).catch(() => []);
    const tails = layout.workers.map((w) => `${w.name} (${w.alive() ? "running" : "stopped"}):\n${w.log.slice(-8).map((l) => JSON.stringify(l)).join("\n")}`);
    const db = (await layout.haproxy.servers().catch(() => [])).map((x) => `${x.backend}/${x.server} ${x.status}`).join(", ");
    return `run ${JSON.stringify(run_)}; deliveries ${JSON.stringify(byStatus)}; HAProxy ${db}\nsink: ${layout.sink.log.slice(-5).join("\n") || "no warnings"}\n${tails.join("\n")}`;
  };
  const waitFor = <T,>(what: string, probe: () => Promise<T | null | false | undefined>, timeoutMs: number, everyMs: number) =>
    until(what, probe, timeoutMs, everyMs).catch(async (e: unknown) => {
      throw new Error(`${e instanceof Error ? e.message : String(e)}\n${await progress()}`);
    });
  if (opts.killWorker) {
    await waitFor("a quarter of the digest sent", async () => (await sent()) >= total / 4, 120_000, 50);
    sentAtWorkerKill = await sent();
    await layout.workers[0]!.kill("SIGKILL");
  }
  if (opts.stopWriter) {
    await waitFor("half of the digest sent", async () => (await sent()) >= total / 2, 120_000, 50);
    writerBefore = await writerPort(layout);
    const node = layout.cluster.nodes.find((n) => n.port === writerBefore)!;
    sentAtWriterStop = await sent();
    const stoppedAt = Date.now();
    stopped = { index: node.index };
    await node.stop();
    // Recovered: the test's own pool (like the app's) reaches the next node, and deliveries are recorded again.
    await waitFor("deliveries recorded again after the writer stopped", async () => (await sent()) > sentAtWriterStop!, 120_000, 100);
    recoveredAfter = (Date.now() - stoppedAt) / 1000;
    writerAfter = await writerPort(layout);
  }
  const done = await waitFor("the digest run finished", async () => {
    const r = await layout.db("digest_runs").where({ id: run.id }).first("status");
    return r?.status === "done" ? r : null;
  }, 240_000, 200);
  const seconds = (Date.now() - t0) / 1000;
  const perRecipient = (await layout.db("mail_recipients as r")
    .join("mail_messages as m", "m.id", "r.message_id")
    .where("r.address", "like", `reader-${tag}-%`)
    .groupBy("r.address")
    .select("r.address")
    .count({ n: "*" })) as Array<{ address: string; n: number | string }>;
  const counts = new Map(perRecipient.map((r) => [r.address, Number(r.n)]));
  if (stopped) {
    const t1 = Date.now();
    await layout.cluster.nodes[stopped.index]!.start();
    await layout.cluster.waitSynced(3, 120_000);
    rejoinedAfter = (Date.now() - t1) / 1000;
  }
  if (opts.killWorker) await layout.startWorker(0);
  return {
    subscribers: total,
    once: emails.filter((e) => counts.get(e) === 1).length,
    twice: emails.filter((e) => (counts.get(e) ?? 0) > 1).length,
    missing: emails.filter((e) => !counts.has(e)).length,
    deliveriesSent: await sent(),
    runStatus: String(done.status),
    seconds,
    sentAtWorkerKill,
    sentAtWriterStop,
    writerBefore,
    writerAfter,
    recoveredAfter,
    rejoinedAfter,
  };
}
