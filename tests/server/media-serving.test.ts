import { beforeAll, describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import type { Agent, TestApp } from "../helpers/app.ts";
import { useMediaFixture, type MediaFixture } from "../helpers/media-fixture.ts";

const f = useMediaFixture("media-serving");
const { readyPhoto, review } = f;
let t: TestApp;
let project: MediaFixture["project"];
let marketing: MediaFixture["marketing"];
let lead: MediaFixture["lead"];
let investor: MediaFixture["investor"];
let visitor: MediaFixture["visitor"];
beforeAll(() => {
  ({ t, project, marketing, lead, investor, visitor } = f);
});

const fetchAs = (c: { agent: Agent }, url: string) => c.agent.get(url).buffer(true);
// Owner ids far from any real post, so these rows stand for posts of their own.
let owner = 900_000;

describe("GET /media/v/:key — the audience check on every request", () => {
  it("a derivative of an unused, uncleared photo: 404 for a visitor and an investor, 200 (private) for staff", async () => {
    const p = await readyPhoto();
    const url = p.variants.find((v) => v.format === "webp")!.url;
    for (const c of [visitor, investor]) {
      const res = await fetchAs(c, url).expect(404);
      expect(res.headers["cache-control"]).toBe("no-store");
      expect(res.body.error.code).toBe("not_found");
    }
    for (const c of [marketing, lead]) {
      const res = await fetchAs(c, url).expect(200);
      expect(res.headers["content-type"]).toBe("image/webp");
      expect(res.headers["cache-control"]).toBe("private, max-age=31536000, immutable");
      expect(Number(res.headers["content-length"])).toBe(p.variants.find((v) => v.url === url)!.bytes);
    }
  });

  it("cleared but unused: still 404 for a visitor", async () => {
    const p = await readyPhoto();
    await review(p.id, "cleared");
    await fetchAs(visitor, p.variants[0]!.url).expect(404);
  });

  it("used in published investor content: served to investors (private), not to visitors", async () => {
    const p = await readyPhoto();
    await review(p.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [p.id], "investor", true);
    const url = p.variants[0]!.url;
    const res = await fetchAs(investor, url).expect(200);
    expect(res.headers["cache-control"]).toBe("private, max-age=31536000, immutable");
    await fetchAs(visitor, url).expect(404);
  });

  it("used in published public content: served to everyone, cached for ever by anyone; the URL does not change", async () => {
    const p = await readyPhoto();
    await review(p.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [p.id], "public", true);
    for (const v of p.variants) {
      const res = await fetchAs(visitor, v.url).expect(200);
      expect(res.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
      expect(res.headers["cross-origin-resource-policy"]).toBe("cross-origin");
      expect(res.headers["content-type"]).toBe(`image/${v.format}`);
      expect((res.body as Buffer).length).toBe(v.bytes);
    }
    // The same URLs as before publication: content-hashed, never renamed.
    const again = (await marketing.agent.get(`/api/media/${p.id}`).expect(200)).body as MediaItem;
    expect(again.variants.map((v) => v.url)).toEqual(p.variants.map((v) => v.url));
    const picture = (await t.plumbline.media.pictureFor([p.id])).get(p.id)!;
    expect(new Set(Object.values(picture.sources).flat().map((v) => v.url))).toEqual(new Set(p.variants.map((v) => v.url)));
  });

  it("answers 304 to a revalidation with the same ETag", async () => {
    const p = await readyPhoto();
    const url = p.variants[0]!.url;
    const first = await fetchAs(marketing, url).expect(200);
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[0-9a-f]{16}"$/);
    await marketing.agent.get(url).set("If-None-Match", etag).expect(304);
    // The audience check comes first: a visitor learns nothing from an ETag either.
    await visitor.agent.get(url).set("If-None-Match", etag).expect(404);
  });

  it("withdrawn (unpublished) or restricted later: 404 for a visitor again", async () => {
    const p = await readyPhoto();
    await review(p.id, "cleared");
    owner += 1;
    const post = owner;
    await t.plumbline.media.setUsages("post", post, [p.id], "public", true);
    const url = p.variants[0]!.url;
    await fetchAs(visitor, url).expect(200);
    await t.plumbline.media.setUsages("post", post, [p.id], "public", false);
    await fetchAs(visitor, url).expect(404);
    await t.plumbline.media.setUsages("post", post, [p.id], "public", true);
    await fetchAs(visitor, url).expect(200);
    await review(p.id, "restricted");
    await fetchAs(visitor, url).expect(404);
    await fetchAs(investor, url).expect(404);
    await fetchAs(lead, url).expect(200);
  });

  it("a name that is not a derivative (or tries to leave the folder) is 404", async () => {
    for (const url of ["/media/v/0000000000000000-320w.webp", "/media/v/..%2F..%2Fpackage.json", "/media/v/originals", "/media/v/0123456789abcdef-320w.gif"]) {
      await fetchAs(marketing, url).expect(404);
    }
  });
});

describe("GET /api/media/:id/original", () => {
  it("is for staff only: investors 403, visitors 401", async () => {
    const p = await readyPhoto();
    await fetchAs(marketing, p.originalUrl).expect(200);
    await fetchAs(investor, p.originalUrl).expect(403);
    await fetchAs(visitor, p.originalUrl).expect(401);
    await fetchAs(marketing, "/api/media/999999999/original").expect(404);
  });
});

describe("the media service for posts, stories and the public site", () => {
  it("describeForPublishing answers in the order asked, with exists false for an unknown id", async () => {
    const a = await readyPhoto();
    await marketing.agent.patch(`/api/media/${a.id}`).set("X-CSRF-Token", marketing.csrf).send({ altText: "Gradient" }).expect(200);
    const described = await t.plumbline.media.describeForPublishing([999999999, a.id]);
    expect(described).toEqual([
      expect.objectContaining({ id: 999999999, exists: false, status: null, altText: null, sensitivity: null }),
      expect.objectContaining({ id: a.id, exists: true, status: "ready", altText: "Gradient", sensitivity: "unreviewed", projectId: project.id }),
    ]);
  });

  it("setUsages replaces an owner's rows and refuses an unknown photo, writing nothing", async () => {
    const a = await readyPhoto();
    const b = await readyPhoto();
    owner += 1;
    await t.plumbline.media.setUsages("story", owner, [a.id, b.id, a.id], "public", false);
    const rows = async () => (await t.db("media_usages").where({ owner_type: "story", owner_id: owner }).orderBy("media_id").select("media_id", "audience", "published")).map((r) => ({ ...r, published: Boolean(r.published) }));
    expect(await rows()).toEqual([
      { media_id: a.id, audience: "public", published: false },
      { media_id: b.id, audience: "public", published: false },
    ]);
    await t.plumbline.media.setUsages("story", owner, [b.id], "investor", true);
    expect(await rows()).toEqual([{ media_id: b.id, audience: "investor", published: true }]);
    await expect(t.plumbline.media.setUsages("story", owner, [b.id, 999999999], "public", true)).rejects.toMatchObject({ status: 422, code: "unknown_media" });
    expect(await rows()).toEqual([{ media_id: b.id, audience: "investor", published: true }]);
  });

  it("pictureFor gives each format's sources in ascending width, with size, focal point and placeholder", async () => {
    const p = await readyPhoto();
    await marketing.agent.patch(`/api/media/${p.id}`).set("X-CSRF-Token", marketing.csrf).send({ focal: { x: 0.2, y: 0.7 }, caption: "Yard" }).expect(200);
    const picture = (await t.plumbline.media.pictureFor([p.id, 999999999])).get(p.id)!;
    expect(picture).toMatchObject({ id: p.id, width: 400, height: 300, caption: "Yard", focal: { x: 0.2, y: 0.7 }, isIllustration: false });
    expect(picture.placeholder).toMatch(/^data:image\/webp;base64,/);
    for (const format of ["avif", "webp", "jpeg"] as const) {
      // 400 px wide: 320 and the original's own 400.
      expect(picture.sources[format].map((v) => v.width)).toEqual([320, 400]);
      expect(picture.sources[format].every((v) => v.format === format && v.url.startsWith("/media/v/"))).toBe(true);
    }
  });
});
