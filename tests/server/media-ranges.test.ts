import { beforeAll, describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import type { TestApp } from "../helpers/app.ts";
import { useMediaFixture, type MediaFixture } from "../helpers/media-fixture.ts";

// Runs in the server project (local disk) and in server-s3 (the fake S3 store): the same answers from both.
const f = useMediaFixture("media-ranges");
let t: TestApp;
let marketing: MediaFixture["marketing"];
let investor: MediaFixture["investor"];
let visitor: MediaFixture["visitor"];
let photo: MediaItem;
let original: Buffer;
let owner = 910_000;
beforeAll(async () => {
  ({ t, marketing, investor, visitor } = f);
  photo = await f.readyPhoto();
  original = (await marketing.agent.get(`/api/media/${photo.id}/original`).buffer(true).expect(200)).body as Buffer;
});

describe("byte ranges of private files, streamed by the app", () => {
  // Source: RFC 9110 §14.1.2 (byte ranges, first-last inclusive), §14.4 (Content-Range), §15.3.7 (206 Partial Content).
  it("the original: Accept-Ranges, 206 with Content-Range and exactly the slice asked for", async () => {
    const whole = await marketing.agent.get(`/api/media/${photo.id}/original`).buffer(true).expect(200);
    expect(whole.headers["accept-ranges"]).toBe("bytes");
    expect(whole.headers["cache-control"]).toBe("private, no-store");
    expect(original.length).toBeGreaterThan(1000);
    const res = await marketing.agent.get(`/api/media/${photo.id}/original`).set("Range", "bytes=100-599").buffer(true).expect(206);
    expect(res.headers["content-range"]).toBe(`bytes 100-599/${original.length}`);
    expect(Number(res.headers["content-length"])).toBe(500);
    expect((res.body as Buffer).equals(original.subarray(100, 600))).toBe(true);
    expect(res.headers["cache-control"]).toBe("private, no-store");
  });

  // Source: RFC 9110 §14.1.2: "bytes=-N" is the last N bytes; "bytes=N-" runs to the end.
  it("a suffix range and an open-ended one", async () => {
    const tail = await marketing.agent.get(`/api/media/${photo.id}/original`).set("Range", "bytes=-64").buffer(true).expect(206);
    expect((tail.body as Buffer).equals(original.subarray(original.length - 64))).toBe(true);
    expect(tail.headers["content-range"]).toBe(`bytes ${original.length - 64}-${original.length - 1}/${original.length}`);
    const rest = await marketing.agent.get(`/api/media/${photo.id}/original`).set("Range", `bytes=${original.length - 10}-`).buffer(true).expect(206);
    expect((rest.body as Buffer).equals(original.subarray(original.length - 10))).toBe(true);
  });

  // Source: RFC 9110 §15.5.17 (416 with "Content-Range: bytes */length") and §14.2 (a Range header that is not understood is ignored).
  it("416 with the size for a range wholly outside the file; the whole file for a malformed header", async () => {
    const res = await marketing.agent.get(`/api/media/${photo.id}/original`).set("Range", `bytes=${original.length + 10}-${original.length + 20}`).expect(416);
    expect(res.headers["content-range"]).toBe(`bytes */${original.length}`);
    const whole = await marketing.agent.get(`/api/media/${photo.id}/original`).set("Range", "pages=1-2").buffer(true).expect(200);
    expect((whole.body as Buffer).equals(original)).toBe(true);
  });

  it("an investor's derivative: 206 for the investor, and still 404 for a visitor whatever the Range", async () => {
    await f.review(photo.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [photo.id], "investor", true);
    const v = photo.variants.find((x) => x.format === "jpeg")!;
    const whole = (await investor.agent.get(v.url).buffer(true).expect(200)).body as Buffer;
    expect(whole.length).toBe(v.bytes);
    const res = await investor.agent.get(v.url).set("Range", "bytes=0-99").buffer(true).expect(206);
    expect((res.body as Buffer).equals(whole.subarray(0, 100))).toBe(true);
    expect(res.headers["cache-control"]).toBe("private, max-age=31536000, immutable");
    await visitor.agent.get(v.url).set("Range", "bytes=0-99").expect(404);
  });

  // Source: RFC 9110 §13.1.5: If-Range that does not match the current ETag makes the server send the whole representation.
  it("If-Range with another ETag sends the whole file", async () => {
    const v = photo.variants.find((x) => x.format === "webp")!;
    const res = await marketing.agent.get(v.url).set("Range", "bytes=0-9").set("If-Range", '"0000000000000000"').buffer(true).expect(200);
    expect((res.body as Buffer).length).toBe(v.bytes);
    const etag = res.headers.etag as string;
    await marketing.agent.get(v.url).set("Range", "bytes=0-9").set("If-Range", etag).expect(206);
  });
});
