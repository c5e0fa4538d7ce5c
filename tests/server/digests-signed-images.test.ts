import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import { MEDIA_LINK_TTL_DAYS } from "../../server/digests/digests.assemble.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { lastMailId, newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { scheduledRun } from "../helpers/digests.ts";
import { makeGradientImage } from "../helpers/images.ts";
import { createProject, postInput, signInAll, type Client } from "./posts-fixtures.ts";

const PUBLIC = "https://progress.kestrel.example";
const DAY = 86_400_000;
const escaped = PUBLIC.replace(/\./g, "\\.");

let t: TestApp;
let mediaDir: string;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  mediaDir = mkdtempSync(path.join(tmpdir(), "plumbline-digest-images-"));
  // The test client speaks plain HTTP: with an https PUBLIC_URL, Secure cookies would never come back.
  t = await startTestApp({ PUBLIC_URL: PUBLIC, MEDIA_DIR: mediaDir, COOKIE_SECURE: "false" });
  as = await signInAll(t);
});
afterAll(async () => {
  await t?.close();
  rmSync(mediaDir, { recursive: true, force: true });
});

/** A photo uploaded by marketing, processed by the real pipeline, given alt text and cleared by a lead. */
async function clearedPhoto(p: { slug: string }, colour: string): Promise<MediaItem> {
  const bytes = await makeGradientImage({ width: 900, height: 600, from: colour, to: "#1d4e89" });
  const up = await as.marketing.agent.post("/api/media").set("X-CSRF-Token", as.marketing.csrf).field("project", p.slug).attach("files", bytes, "cover.jpg").expect(201);
  await t.drainMediaJobs();
  const id = up.body[0].id as number;
  await as.marketing.agent.patch(`/api/media/${id}`).set("X-CSRF-Token", as.marketing.csrf).send({ altText: "Generator sets on their plinths (illustration)" }).expect(200);
  await as.lead.agent.post(`/api/media/${id}/review`).set("X-CSRF-Token", as.lead.csrf).send({ sensitivity: "cleared" }).expect(200);
  const item = (await as.lead.agent.get(`/api/media/${id}`).expect(200)).body as MediaItem;
  expect(item.status).toBe("ready");
  return item;
}

async function publishPost(p: { slug: string }, by: Client, coverId: number, over: Record<string, unknown>) {
  const res = await by.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(coverId, over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  await by.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", by.csrf).expect(200);
  return res.body.id as number;
}

async function subscriber(projectId: number, audience: "public" | "investor") {
  const email = `${audience}-${randomBytes(4).toString("hex")}@example.org`;
  await t.db("subscribers").insert({
    project_id: projectId,
    email,
    email_hash: hashAddress(email),
    name: `Reader ${audience}`,
    interest: audience === "investor" ? "investor" : "prospect",
    audience,
    frequency: "weekly",
    topics_key: "all",
    status: "confirmed",
    confirmed_at: new Date(),
  });
  return email;
}

async function digestTo(email: string, after: number) {
  const rows = await t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", email).andWhere("m.id", ">", after).andWhere("m.message_id", "like", "<digest.%").select("m.html", "m.text");
  expect(rows, `digests to ${email}`).toHaveLength(1);
  return { html: String(rows[0]!.html), text: String(rows[0]!.text) };
}

/** Image sources in an HTML part, entities decoded, relative to PUBLIC_URL. */
function imageSources(html: string): string[] {
  return [...html.matchAll(/<img[^>]*\ssrc="([^"]+)"/g)].map((m) => m[1]!.replaceAll("&amp;", "&"));
}
const pathOf = (absolute: string) => {
  expect(absolute.startsWith(`${PUBLIC}/`), absolute).toBe(true);
  return absolute.slice(PUBLIC.length);
};

describe("investor-only pictures in digests, through signed and expiring links", () => {
  it("an investor digest shows an investor post's cover by a signed link any mail client can fetch; the public digest of the same run has none", async () => {
    const p = await createProject(t);
    const investorCover = await clearedPhoto(p, "#6a3d1f");
    const publicCover = await clearedPhoto(p, "#2f6a1f");
    const investorTitle = `Lender walk of the generator yard ${randomBytes(2).toString("hex")}`;
    const publicTitle = `Fuel tank set on its base ${randomBytes(2).toString("hex")}`;
    await publishPost(p, as.lead, investorCover.id, { audience: "investor", title: investorTitle });
    await publishPost(p, as.lead, publicCover.id, { audience: "public", title: publicTitle });
    const investorEmail = await subscriber(p.id, "investor");
    const publicEmail = await subscriber(p.id, "public");

    const before = await lastMailId(t);
    const runAt = Date.now();
    const run = await scheduledRun(t, p.slug, "weekly", new Date(runAt + 7 * DAY));
    expect(run.created).toBe(true);
    await t.plumbline.digestJobs.drain();

    // The investor's e-mail: the investor cover signed, the public cover plain.
    const inv = await digestTo(investorEmail, before);
    expect(inv.html).toContain(investorTitle);
    expect(inv.html).toMatch(new RegExp(`src="${escaped}/media/s/[0-9a-f]{16}-\\d+w\\.jpg\\?exp=\\d+&amp;sig=[A-Za-z0-9_-]{43}"`));
    const sources = imageSources(inv.html);
    const investorNames = new Set(investorCover.variants.map((v) => v.url.replace("/media/v/", "")));
    const signed = sources.filter((s) => s.includes("/media/s/"));
    expect(signed).toHaveLength(1);
    const signedPath = pathOf(signed[0]!);
    const link = new URL(signedPath, PUBLIC);
    const name = link.pathname.replace("/media/s/", "");
    expect(investorNames.has(name)).toBe(true);
    const variant = investorCover.variants.find((v) => v.url === `/media/v/${name}`)!;
    expect(variant.format).toBe("jpeg");
    // Expires MEDIA_LINK_TTL_DAYS after the render, rounded up to the next UTC midnight.
    const exp = Number(link.searchParams.get("exp")) * 1000;
    expect(exp).toBeGreaterThanOrEqual(runAt + MEDIA_LINK_TTL_DAYS * DAY);
    expect(exp).toBeLessThanOrEqual(Date.now() + (MEDIA_LINK_TTL_DAYS + 1) * DAY);
    expect(exp % DAY).toBe(0);
    expect(sources.some((s) => s.startsWith(`${PUBLIC}/media/v/`) && publicCover.variants.some((v) => s.endsWith(v.url)))).toBe(true);

    // Fetched signed out, as a mail client would: the image itself.
    const visitor = await newClient(t);
    const img = await visitor.agent.get(signedPath).buffer(true).expect(200);
    expect(img.headers["content-type"]).toBe("image/jpeg");
    expect(img.headers["cache-control"]).toMatch(/^private, max-age=\d+$/);
    const meta = await sharp(img.body as Buffer).metadata();
    expect(meta).toMatchObject({ format: "jpeg", width: variant.width, height: variant.height });
    // The same derivative's plain URL is still hidden from a visitor.
    const plain = await visitor.agent.get(`/media/v/${name}`);
    expect(plain.status).toBe(404);
    expect(plain.body.error.code).toBe("not_found");

    // Tampered signature; another derivative's name with this signature; an expired link; a bad query.
    const sig = link.searchParams.get("sig")!;
    const tampered = signedPath.replace(`sig=${sig}`, `sig=${sig.slice(0, 5)}${sig[5] === "x" ? "y" : "x"}${sig.slice(6)}`);
    expect((await visitor.agent.get(tampered)).status).toBe(404);
    const otherName = [...investorNames].find((x) => x !== name && x.endsWith(".jpg"))!;
    expect((await visitor.agent.get(signedPath.replace(name, otherName))).status).toBe(404);
    const expired = await visitor.agent.get(t.plumbline.media.signedVariantUrl(name, new Date(Date.now() - DAY)));
    expect(expired.status).toBe(410);
    expect(expired.body.error).toMatchObject({ code: "link_expired", message: expect.any(String) });
    const bad = await visitor.agent.get(`/media/s/${name}?exp=next-month&sig=${sig}`);
    expect(bad.status).toBe(400);
    expect(bad.body.error).toMatchObject({ code: "validation", fields: { exp: expect.any(String) } });

    // The public digest of the same run: no signed link and nothing of the investor post.
    const pub = await digestTo(publicEmail, before);
    expect(pub.html).toContain(publicTitle);
    expect(pub.html).not.toContain("/media/s/");
    expect(pub.text).not.toContain("/media/s/");
    expect(pub.html).not.toContain(investorTitle);
    const hash = name.slice(0, 16);
    expect(pub.html).not.toContain(hash);
    expect(imageSources(pub.html).every((s) => s.startsWith(`${PUBLIC}/media/v/`))).toBe(true);
    for (const s of imageSources(pub.html)) await visitor.agent.get(pathOf(s)).expect(200);
    const contents = await t.db("digest_contents").where({ run_id: run.id }).select("audience", "html");
    expect(contents.map((c) => c.audience).sort()).toEqual(["investor", "public"]);
    expect(contents.find((c) => c.audience === "public")!.html).not.toContain("/media/s/");

    // The web copy ("view in the browser") shows the picture too, through a link that answers.
    const web = inv.text.match(new RegExp(`${escaped}(/api/digests/web/[A-Za-z0-9_.-]+)`))![1]!;
    const page = await visitor.agent.get(web).expect(200);
    expect(page.text).toContain(investorTitle);
    const webSigned = imageSources(page.text).filter((s) => s.includes("/media/s/"));
    expect(webSigned).toHaveLength(1);
    expect(webSigned[0]).toContain(`/media/s/${name}?exp=`);
    const webImg = await visitor.agent.get(pathOf(webSigned[0]!)).buffer(true).expect(200);
    expect((await sharp(webImg.body as Buffer).metadata()).format).toBe("jpeg");
    const pubWeb = pub.text.match(new RegExp(`${escaped}(/api/digests/web/[A-Za-z0-9_.-]+)`))![1]!;
    const pubPage = await visitor.agent.get(pubWeb).expect(200);
    expect(pubPage.text).not.toContain("/media/s/");
  });

  it("the web copy signs its pictures afresh, so an investor's picture outlives the e-mail's link", async () => {
    const p = await createProject(t);
    const cover = await clearedPhoto(p, "#5a1f6a");
    const title = `Switchgear room handed over ${randomBytes(2).toString("hex")}`;
    await publishPost(p, as.lead, cover.id, { audience: "investor", title });
    const email = await subscriber(p.id, "investor");
    const before = await lastMailId(t);
    expect((await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * DAY))).created).toBe(true);
    await t.plumbline.digestJobs.drain();
    const mail = await digestTo(email, before);
    const name = new URL(imageSources(mail.html).find((s) => s.includes("/media/s/"))!).pathname.replace("/media/s/", "");

    // Stand in for an old rendering: the stored copy's picture link expired yesterday.
    const stale = t.plumbline.media.signedVariantUrl(name, new Date(Date.now() - DAY));
    expect((await (await newClient(t)).agent.get(stale)).status).toBe(410);
    const content = await t.db("digest_contents").where({ audience: "investor" }).andWhere("html", "like", `%${title}%`).first("id", "html");
    const staleHtml = String(content.html).replace(/\/media\/s\/[^"]+/, stale.replace("&", "&amp;"));
    expect(staleHtml).toContain(stale.replace("&", "&amp;"));
    await t.db("digest_contents").where({ id: content.id }).update({ html: staleHtml });

    const visitor = await newClient(t);
    const web = mail.text.match(new RegExp(`${escaped}(/api/digests/web/[A-Za-z0-9_.-]+)`))![1]!;
    const page = await visitor.agent.get(web).expect(200);
    const fresh = imageSources(page.text).find((s) => s.includes("/media/s/"))!;
    expect(fresh).not.toContain(stale);
    const exp = Number(new URL(fresh).searchParams.get("exp")) * 1000;
    expect(exp).toBeGreaterThan(Date.now());
    expect(exp).toBeLessThanOrEqual(Date.now() + 2 * DAY);
    await visitor.agent.get(pathOf(fresh)).expect(200);
  });
});
