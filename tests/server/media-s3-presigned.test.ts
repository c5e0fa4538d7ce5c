import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import { startFakeS3, type FakeS3 } from "../../scripts/layout/fake-s3.ts";
import type { TestApp } from "../helpers/app.ts";
import { useMediaFixture, type MediaFixture } from "../helpers/media-fixture.ts";

// Private files handed out as the store's own short-lived URLs (MEDIA_PRIVATE_DELIVERY=presigned).
const env: Record<string, string> = {};
let s3: FakeS3;
beforeAll(async () => {
  s3 = await startFakeS3();
  Object.assign(env, s3.env, { MEDIA_PRIVATE_DELIVERY: "presigned", MEDIA_PRESIGN_SECONDS: "120" });
});
const f = useMediaFixture("media-s3-presigned", env);
afterAll(async () => {
  await s3?.close();
});

let t: TestApp;
let marketing: MediaFixture["marketing"];
let investor: MediaFixture["investor"];
let visitor: MediaFixture["visitor"];
let owner = 920_000;
beforeAll(() => {
  ({ t, marketing, investor, visitor } = f);
});

/** The redirect's target: on the fake store, signed, expiring within the setting. */
function checkPresigned(location: string) {
  const url = new URL(location);
  expect(url.origin).toBe(s3.endpoint);
  expect(url.searchParams.get("X-Amz-Signature")).toMatch(/^[0-9a-f]{64}$/);
  // Source: AWS Signature Version 4, query-string authentication: X-Amz-Expires is the URL's lifetime in seconds (at most 604800).
  expect(Number(url.searchParams.get("X-Amz-Expires"))).toBeGreaterThan(0);
  expect(Number(url.searchParams.get("X-Amz-Expires"))).toBeLessThanOrEqual(120);
  return url;
}

describe("presigned delivery of private files from the S3 store", () => {
  it("an investor's derivative: 302 to a presigned URL (never cached) that fetches the same bytes; a visitor gets 404, no redirect", async () => {
    const p: MediaItem = await f.readyPhoto();
    await f.review(p.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [p.id], "investor", true);
    const v = p.variants.find((x) => x.format === "jpeg")!;
    const res = await investor.agent.get(v.url).redirects(0).expect(302);
    expect(res.headers["cache-control"]).toBe("private, no-store");
    const url = checkPresigned(res.headers.location as string);
    const fetched = await fetch(url);
    expect(fetched.status).toBe(200);
    expect(fetched.headers.get("content-type")).toBe("image/jpeg");
    const bytes = Buffer.from(await fetched.arrayBuffer());
    expect(bytes.length).toBe(v.bytes);
    expect(bytes.equals((await t.plumbline.mediaStorage.get(`variants/${v.url.split("/").pop()}`))!)).toBe(true);
    // The audience check comes before any redirect: a visitor learns nothing, not even a URL.
    const refused = await visitor.agent.get(v.url).redirects(0).expect(404);
    expect(refused.headers.location).toBeUndefined();
  });

  it("an unreviewed photo: 404 for visitors and investors; staff are redirected", async () => {
    const p = await f.readyPhoto();
    const v = p.variants[0]!;
    for (const c of [visitor, investor]) expect((await c.agent.get(v.url).redirects(0).expect(404)).headers.location).toBeUndefined();
    checkPresigned((await marketing.agent.get(v.url).redirects(0).expect(302)).headers.location as string);
  });

  it("the original: staff are redirected with the file name kept; others are refused before any redirect", async () => {
    const p = await f.readyPhoto();
    const res = await marketing.agent.get(`/api/media/${p.id}/original`).redirects(0).expect(302);
    expect(res.headers["cache-control"]).toBe("private, no-store");
    const fetched = await fetch(checkPresigned(res.headers.location as string));
    expect(fetched.status).toBe(200);
    expect(fetched.headers.get("content-disposition")).toContain(encodeURIComponent(p.name));
    expect(fetched.headers.get("cache-control")).toBe("private, no-store");
    expect(Buffer.from(await fetched.arrayBuffer()).length).toBe(p.bytes);
    for (const c of [visitor, investor]) {
      const refused = await c.agent.get(`/api/media/${p.id}/original`).redirects(0);
      expect([401, 403]).toContain(refused.status);
      expect(refused.headers.location).toBeUndefined();
    }
  });

  it("public derivatives are never redirected: the app sends them, immutable and public", async () => {
    const p = await f.readyPhoto();
    await f.review(p.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [p.id], "public", true);
    for (const c of [visitor, investor, marketing]) {
      const v = p.variants[0]!;
      const res = await c.agent.get(v.url).redirects(0).buffer(true).expect(200);
      // A signed-in reader's answers are never public (the app's cache policy for sessions); the name stays immutable.
      expect(res.headers["cache-control"]).toBe(`${c === visitor ? "public" : "private"}, max-age=31536000, immutable`);
      expect((res.body as Buffer).length).toBe(v.bytes);
    }
  });
});
