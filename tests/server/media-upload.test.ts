import { mkdtempSync, readdirSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import exifr from "exifr";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";
import { useMediaFixture } from "../helpers/media-fixture.ts";
import { makeGradientImage, makeJpegWithGps, makePatternedImage, makePngDeclaring } from "../helpers/images.ts";

const f = useMediaFixture("media-upload");
let t: TestApp;
let mediaDir: string;
let project: { id: number; slug: string };
let marketing: { agent: Agent; csrf: string };

beforeAll(() => {
  ({ t, project, marketing } = f);
  mediaDir = f.t.config.MEDIA_DIR;
});

/** Every file under the media folder, temporary ones included. */
function filesUnder(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    let names: string[];
    try {
      names = readdirSync(d);
    } catch {
      return;
    }
    for (const name of names) {
      const p = path.join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else out.push(path.relative(dir, p));
    }
  };
  walk(dir);
  return out.sort();
}

async function snapshot() {
  const count = async (table: string, where: Record<string, unknown> = {}) => Number((await t.db(table).where(where).count({ n: "*" }).first())?.n ?? 0);
  return {
    items: await count("media_items", { project_id: project.id }),
    variants: await count("media_variants"),
    jobs: await count("media_jobs"),
    tags: await count("media_tags"),
    files: filesUnder(mediaDir),
  };
}

function upload(files: Array<{ bytes: Buffer | string; name: string; type?: string }>, as = marketing) {
  let req = as.agent.post("/api/media").set("X-CSRF-Token", as.csrf).field("project", project.slug);
  for (const f of files) req = req.attach("files", Buffer.isBuffer(f.bytes) ? f.bytes : Buffer.from(f.bytes), { filename: f.name, contentType: f.type ?? "image/jpeg" });
  return req;
}

describe("POST /api/media → processing → ready, through the real worker and MariaDB", () => {
  it("answers at once with processing; the job makes AVIF, WebP and JPEG at every width up to the original's", async () => {
    const bytes = await makePatternedImage({ width: 1200, height: 800, noise: 4 });
    const res = await upload([{ bytes, name: "plant-yard.jpg" }]).expect(201);
    expect(res.body).toHaveLength(1);
    expect(res.body[0]).toMatchObject({ status: "processing", name: "plant-yard.jpg", width: 1200, height: 800, duplicateOf: null });
    const id = res.body[0].id as number;

    const before = await marketing.agent.get(`/api/media/${id}`).expect(200);
    expect(before.body).toMatchObject({ id, status: "processing", sensitivity: "unreviewed", variants: [] });

    expect(await t.drainMediaJobs()).toBe(1);
    const after = await marketing.agent.get(`/api/media/${id}`).expect(200);
    expect(after.body.status).toBe("ready");
    expect(after.body.placeholder).toMatch(/^data:image\/webp;base64,/);
    expect(after.body.dominantColor).toMatch(/^#[0-9a-f]{6}$/);
    // planWidths: 320, 640, 960 and 1200, the ladder up to the original's own width (decision 058).
    const widths = [...new Set((after.body.variants as Array<{ width: number }>).map((v) => v.width))].sort((a, b) => a - b);
    expect(widths).toEqual([320, 640, 960, 1200]);
    expect(after.body.variants).toHaveLength(12);
    for (const v of after.body.variants as Array<{ url: string; width: number; height: number; format: string }>) {
      expect(v.url).toMatch(/^\/media\/v\/[0-9a-f]{16}-\d+w\.(avif|webp|jpg)$/);
      expect(v.height).toBe(Math.round((v.width * 800) / 1200));
    }
    const jpeg = (after.body.variants as Array<{ url: string; format: string; width: number }>).find((v) => v.format === "jpeg" && v.width === 640)!;
    const file = await marketing.agent.get(jpeg.url).buffer(true).expect(200);
    expect(file.headers["content-type"]).toBe("image/jpeg");
    expect((await sharp(file.body as Buffer).metadata()).width).toBe(640);
    expect(await t.db("media_jobs").count({ n: "*" }).first()).toMatchObject({ n: 0 });
  });

  it("keeps the capture time and, for staff only, that the original had GPS — never the coordinates", async () => {
    // Invented coordinates; the derivative is read back with exifr (an EXIF reader from npm).
    const bytes = await makeJpegWithGps({ latitude: 52.123456, longitude: -1.654321, dateTimeOriginal: "2026:03:14 10:20:30", offsetTimeOriginal: "+00:00", width: 800, height: 600 });
    const res = await upload([{ bytes, name: "gps.jpg" }]).expect(201);
    const id = res.body[0].id as number;
    await t.drainMediaJobs();
    const item = await marketing.agent.get(`/api/media/${id}`).expect(200);
    expect(item.body).toMatchObject({ takenAt: "2026-03-14T10:20:30+00:00", hadGps: true, width: 800, height: 600 });
    expect(JSON.stringify(item.body)).not.toMatch(/52\.12|1\.65|GPSLatitude/);
    const row = await t.db("media_items").where({ id }).first();
    expect(Object.values(row).map(String).join(" ")).not.toMatch(/52\.12|1\.65/);
    for (const v of item.body.variants as Array<{ url: string; format: string }>) {
      if (v.format !== "jpeg") continue;
      const file = await marketing.agent.get(v.url).buffer(true).expect(200);
      expect(await exifr.gps(file.body as Buffer).catch(() => undefined)).toBeUndefined();
    }
    // The original is kept for staff without its location, its pixels as uploaded (issue 9).
    const original = await marketing.agent.get(`/api/media/${id}/original`).buffer(true).expect(200);
    expect(await exifr.gps(original.body as Buffer).catch(() => undefined)).toBeUndefined();
    expect((await sharp(original.body as Buffer).raw().toBuffer()).equals(await sharp(bytes).raw().toBuffer())).toBe(true);
    expect(original.headers["cache-control"]).toBe("private, no-store");
  });

  it("a file named with Unicode keeps its name", async () => {
    const bytes = await makeGradientImage({ width: 64, height: 48, from: "#223344", to: "#998877" });
    const res = await upload([{ bytes, name: "Pièce 2A – façade.jpg" }]).expect(201);
    expect(res.body[0].name).toBe("Pièce 2A – façade.jpg");
  });
});

describe("POST /api/media: an identical upload offers the existing item", () => {
  it("the same bytes again answer duplicateOf the first item, and no second row or file is made", async () => {
    const bytes = await makeGradientImage({ width: 300, height: 200, from: "#102030", to: "#c0a080" });
    const first = await upload([{ bytes, name: "hall.jpg" }]).expect(201);
    const id = first.body[0].id as number;
    const before = await snapshot();
    const again = await upload([{ bytes, name: "hall-copy.jpg" }]).expect(201);
    expect(again.body[0]).toMatchObject({ id, duplicateOf: id, name: "hall-copy.jpg" });
    expect(await snapshot()).toEqual(before);
  });

  it("two copies in one request become one item, the second offered as a duplicate of the first", async () => {
    const bytes = await makeGradientImage({ width: 300, height: 200, from: "#301020", to: "#80c0a0" });
    const before = await snapshot();
    const res = await upload([{ bytes, name: "a.jpg" }, { bytes, name: "b.jpg" }]).expect(201);
    expect(res.body[0]).toMatchObject({ status: "processing", duplicateOf: null });
    expect(res.body[1]).toMatchObject({ id: res.body[0].id, duplicateOf: res.body[0].id, name: "b.jpg" });
    const after = await snapshot();
    expect(after.items).toBe(before.items + 1);
    expect(after.jobs).toBe(before.jobs + 1);
    await t.drainMediaJobs();
  });
});

describe("POST /api/media: bad input is refused with the right status and message, and nothing is written", () => {
  const good = () => makeGradientImage({ width: 120, height: 80 });
  const truncatedJpeg = async () => {
    const whole = await makePatternedImage({ width: 640, height: 480, noise: 6 });
    return whole.subarray(0, Math.floor(whole.length * 0.6));
  };
  const cases: Array<{ what: string; file: () => Promise<{ bytes: Buffer | string; name: string; type?: string }>; status: number; code: string; message: RegExp }> = [
    { what: "a text file named .jpg", file: async () => ({ bytes: "Site diary, week 12: chillers delivered.\n", name: "diary.jpg" }), status: 415, code: "unsupported_type", message: /plain text/ },
    {
      what: "an SVG with a script",
      file: async () => ({ bytes: `<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script><rect width="10" height="10"/></svg>`, name: "logo.jpg", type: "image/svg+xml" }),
      status: 415,
      code: "unsupported_type",
      message: /SVG/,
    },
    // Source: PNG specification §11.2.2 IHDR (a header that declares 30000 × 30000 = 900 MP).
    { what: "a PNG that declares 30000 × 30000", file: async () => ({ bytes: makePngDeclaring(30000, 30000), name: "bomb.png", type: "image/png" }), status: 413, code: "too_many_pixels", message: /30000 × 30000/ },
    { what: "a truncated JPEG", file: async () => ({ bytes: await truncatedJpeg(), name: "cut.jpg" }), status: 422, code: "corrupt", message: /truncated or damaged/ },
    { what: "an empty file", file: async () => ({ bytes: Buffer.alloc(0), name: "empty.jpg" }), status: 400, code: "empty", message: /empty/ },
  ];

  for (const c of cases) {
    it(`${c.what}: ${c.status} ${c.code}, named on the file, nothing written`, async () => {
      const before = await snapshot();
      const file = await c.file();
      const res = await upload([file]).expect(c.status);
      expect(res.body.error.code).toBe(c.code);
      expect(res.body.error.message).toMatch(c.message);
      expect(res.body.error.message).toContain(file.name);
      expect(res.body.error.fields["files.0"]).toMatch(c.message);
      expect(res.body.error.files).toEqual([expect.objectContaining({ index: 0, name: file.name, status: c.status, code: c.code })]);
      expect(await snapshot()).toEqual(before);
    });
  }

  it("one bad file among good ones refuses the whole request, names the bad one, and keeps none", async () => {
    const before = await snapshot();
    const res = await upload([
      { bytes: await good(), name: "good-1.jpg" },
      { bytes: "not a photo", name: "notes.jpg" },
      { bytes: await makeGradientImage({ width: 90, height: 60, from: "#445566" }), name: "good-2.jpg" },
    ]).expect(415);
    expect(res.body.error.message).toMatch(/1 of 3 files were refused, so none of the 3 was kept/);
    expect(Object.keys(res.body.error.fields)).toEqual(["files.1"]);
    expect(res.body.error.fields["files.1"]).toMatch(/^notes\.jpg: /);
    expect(await snapshot()).toEqual(before);
  });

  it("21 files in one request (the limit is 20): 413 with the limit in the message, nothing written", async () => {
    const before = await snapshot();
    const bytes = await good();
    const files = Array.from({ length: 21 }, (_, i) => ({ bytes, name: `photo-${i + 1}.jpg` }));
    const res = await upload(files).expect(413);
    expect(res.body.error.code).toBe("too_many_files");
    expect(res.body.error.message).toMatch(/At most 20 files/);
    expect(await snapshot()).toEqual(before);
  });

  it("a file over the size limit: 413 naming the limit, nothing written", async () => {
    const small = mkdtempSync(path.join(tmpdir(), "plumbline-media-small-"));
    const limited = await startTestApp({ MEDIA_DIR: small, MEDIA_MAX_FILE_MB: "0.01" });
    try {
      const c = await signIn(limited, DEMO.marketing);
      const bytes = await makePatternedImage({ width: 400, height: 300, noise: 20 });
      expect(bytes.length).toBeGreaterThan(0.01 * 1024 * 1024);
      const res = await c.agent.post("/api/media").set("X-CSRF-Token", c.csrf).field("project", project.slug).attach("files", bytes, "big.jpg").expect(413);
      expect(res.body.error.code).toBe("too_large");
      expect(res.body.error.message).toMatch(/^big\.jpg is larger than 10 KB, the limit for one photo/);
      expect(filesUnder(small)).toEqual([]);
    } finally {
      await limited.close();
      rmSync(small, { recursive: true, force: true });
    }
  });

  it("no files at all: 400 saying where the photos go", async () => {
    const res = await marketing.agent.post("/api/media").set("X-CSRF-Token", marketing.csrf).send({}).expect(400);
    expect(res.body.error).toMatchObject({ code: "no_files", fields: { files: "is required" } });
    expect(res.body.error.message).toMatch(/field `files`/);
  });

  it("files in another field: 400 naming the field", async () => {
    const before = await snapshot();
    const res = await marketing.agent
      .post("/api/media")
      .set("X-CSRF-Token", marketing.csrf)
      .attach("photo", await good(), "x.jpg")
      .expect(400);
    expect(res.body.error.code).toBe("unexpected_field");
    expect(await snapshot()).toEqual(before);
  });

  it("an investor or a visitor calling the upload is refused (403, 401) and nothing is written", async () => {
    const before = await snapshot();
    const investor = await signIn(t, DEMO.investor);
    const r1 = await upload([{ bytes: await good(), name: "i.jpg" }], investor).expect(403);
    expect(r1.body.error.code).toBe("forbidden");
    const visitor = await newClient(t);
    const r2 = await upload([{ bytes: await good(), name: "v.jpg" }], visitor).expect(401);
    expect(r2.body.error.code).toBe("unauthenticated");
    expect(await snapshot()).toEqual(before);
  });
});
