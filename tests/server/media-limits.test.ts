import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { DerivativeLimitError, MAX_SIDE, derivativeLimitProblem, makeDerivatives } from "../../server/media/media.pipeline.ts";
import type { Agent, TestApp } from "../helpers/app.ts";
import { useMediaFixture } from "../helpers/media-fixture.ts";

const f = useMediaFixture("media-limits");
let t: TestApp;
let project: { id: number; slug: string };
let marketing: { agent: Agent; csrf: string };

beforeAll(() => {
  ({ t, project, marketing } = f);
});

/** A real image of the given stored size, cheap to make: two colour bands. */
function banded(width: number, height: number, format: "png" | "jpeg", orientation?: number): Promise<Buffer> {
  const half = Math.floor(height / 2);
  let img = sharp({ create: { width, height, channels: 3, background: "#2f5d8a" } }).composite([
    { input: { create: { width, height: half, channels: 3, background: "#c8a25a" } }, top: 0, left: 0 },
  ]);
  if (orientation) img = img.withMetadata({ orientation });
  return (format === "png" ? img.png({ compressionLevel: 9 }) : img.jpeg({ quality: 80 })).toBuffer();
}

const upload = (bytes: Buffer, name: string) => marketing.agent.post("/api/media").set("X-CSRF-Token", marketing.csrf).field("project", project.slug).attach("files", bytes, name);

describe("POST /api/media — refused up front when a derivative cannot be written", () => {
  // Source: sharp 0.35.5 src/common.cc AssertImageTypeDimensions (WebP 16,383, HEIF/AVIF 16,384,
  // JPEG 65,535 px per side), measured with this build (one pixel more is refused).
  it("uses the encoders' limits", () => {
    expect(MAX_SIDE).toEqual({ webp: 16_383, avif: 16_384, jpeg: 65_535 });
  });

  it("a 400 × 40,000 PNG is refused with 422 naming the WebP limit and the side, and nothing is kept", async () => {
    const before = Number((await t.db("media_items").where({ project_id: project.id }).count({ n: "*" }).first())?.n);
    // Other files share this database and may leave jobs of their own: count from here.
    const jobsBefore = Number((await t.db("media_jobs").count({ n: "*" }).first())?.n);
    const res = await upload(await banded(400, 40_000, "png"), "tall.png");
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe("derivative_too_large");
    expect(res.body.error.message).toMatch(/^tall\.png: /);
    expect(res.body.error.message).toMatch(/400 × 40000 px/);
    expect(res.body.error.message).toMatch(/height is over the limit of WebP \(at most 16,383 px per side\) and AVIF \(at most 16,384 px per side\)/);
    expect(res.body.error.fields).toEqual({ "files.0": expect.stringMatching(/WebP/) });
    expect(Number((await t.db("media_items").where({ project_id: project.id }).count({ n: "*" }).first())?.n)).toBe(before);
    expect(Number((await t.db("media_jobs").count({ n: "*" }).first())?.n)).toBe(jobsBefore);
  });

  it("judges the picture as displayed: 40,000 × 400 stored with orientation 6 (turned upright, 400 × 40,000) is refused", async () => {
    const res = await upload(await banded(40_000, 400, "jpeg", 6), "turned.jpg");
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(/400 × 40000 px.*height is over the limit of WebP/);
  });

  it("one pixel inside: 400 × 16,383 passes the check; 400 × 16,384 does not (WebP)", () => {
    expect(derivativeLimitProblem(400, 16_383)).toBeNull();
    expect(derivativeLimitProblem(400, 16_384)).toMatch(/WebP \(at most 16,383 px per side\)/);
    // A wide original's largest derivative is 2,400 px wide: 3,000 × 20,000 becomes 2,400 × 16,000.
    expect(derivativeLimitProblem(3_000, 20_000)).toBeNull();
  });

  it("a 400 × 16,000 image is accepted and processed to ready, every derivative written", async () => {
    const res = await upload(await banded(400, 16_000, "png"), "tall-but-fine.png");
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    await t.drainMediaJobs();
    const item = await marketing.agent.get(`/api/media/${res.body[0].id}`).expect(200);
    expect(item.body).toMatchObject({ status: "ready", width: 400, height: 16_000 });
    const variants = item.body.variants as Array<{ width: number; height: number; format: string }>;
    expect(variants.map((v) => `${v.width}x${v.height}.${v.format}`).sort()).toEqual(
      ["320x12800.avif", "320x12800.jpeg", "320x12800.webp", "400x16000.avif", "400x16000.jpeg", "400x16000.webp"].sort(),
    );
  });

  it("the worker fails such a photo once, for good, with the same reason (a job queued before the check)", async () => {
    await expect(makeDerivatives(await banded(400, 40_000, "png"))).rejects.toBeInstanceOf(DerivativeLimitError);
  });
});
