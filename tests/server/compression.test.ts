import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { brotliDecompressSync, gunzipSync } from "node:zlib";
import express, { type Express } from "express";
import { createServer, get as httpGet, type IncomingHttpHeaders, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { pino } from "pino";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createHttpApp } from "../../server/app.ts";
import { createServices, type Services } from "../../server/services.ts";
import { compressAnswers, isCompressibleType } from "../../server/core/compression.ts";
import { createPublicCache } from "../../server/feeds/public-cache.ts";
import { moduleHintsFor, type ViteManifest } from "../../server/feeds/preload-hints.ts";
import { POST_COVER_SIZES } from "../../src/shared/domain/picture-sizes.ts";
import type { TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, postInput, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const env = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
let app: Express;
let dir: string;
let server: Server;
let services: Services;
let base: string;

// A built client of our own (what `vite build` writes), so the test knows every byte served.
const ENTRY_JS = `${"export const projectPage = 'Aldermere Campus, Phase 2';\n".repeat(200)}`;
const PAGE_JS = `${"export const gallery = 'Hall 2A, HD-1, Hall 2B';\n".repeat(100)}`;
const MANIFEST: ViteManifest = {
  "index.html": { file: "assets/index-abc123.js", isEntry: true, imports: ["_api-client-def456.js"] },
  "_api-client-def456.js": { file: "assets/api-client-def456.js" },
  "_picture-ghi789.js": { file: "assets/picture-ghi789.js" },
  "src/app/pages/project-home-page.tsx": { file: "assets/project-home-page-jkl012.js", imports: ["_api-client-def456.js", "_picture-ghi789.js"], css: ["assets/project-home-page-mno345.css"] },
  "src/features/public-site/routes.tsx": { file: "assets/routes-pqr678.js", imports: ["_picture-ghi789.js"] },
};
const SHELL = `<!doctype html><html lang="en-GB"><head><meta charset="UTF-8" /><title>Plumbline</title><script type="module" crossorigin src="/assets/index-abc123.js"></script></head><body><div id="root"></div>${"<!-- padding so the shell is worth compressing -->".repeat(40)}</body></html>`;
// Bytes that look like a JPEG to anyone reading the name and type; never worth compressing again.
const IMAGE = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.alloc(4_000, 7)]);

beforeAll(async () => {
  ({ t, as } = env);
  dir = mkdtempSync(path.join(os.tmpdir(), "plumbline-client-"));
  mkdirSync(path.join(dir, "assets"));
  mkdirSync(path.join(dir, ".vite"));
  writeFileSync(path.join(dir, "index.html"), SHELL);
  writeFileSync(path.join(dir, ".vite", "manifest.json"), JSON.stringify(MANIFEST));
  writeFileSync(path.join(dir, "assets", "index-abc123.js"), ENTRY_JS);
  writeFileSync(path.join(dir, "assets", "routes-pqr678.js"), PAGE_JS);
  writeFileSync(path.join(dir, "assets", "hero-stu901.jpg"), IMAGE);
  writeFileSync(path.join(dir, "favicon.svg"), `<svg xmlns="http://www.w3.org/2000/svg">${'<rect width="1" height="1"/>'.repeat(100)}</svg>`);
  // Services of their own over the test database (rate limiters may not share stores), served with this client.
  const deps = { db: t.db, config: t.config, logger: pino({ level: "silent" }), mailer: t.mailer };
  services = createServices(deps);
  app = createHttpApp(services, { ...deps, clientDir: dir });
  server = createServer(app);
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
  services.close();
  rmSync(dir, { recursive: true, force: true });
});

/** The raw bytes and headers of an answer, as they came over the wire (supertest would decode them). */
function raw(target: string, headers: Record<string, string>): Promise<{ status: number; headers: IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    const req = httpGet(`${base}${target}`, { headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    });
    req.on("error", reject);
  });
}

function decode(encoding: string | undefined, bytes: Buffer): string {
  if (encoding === "br") return brotliDecompressSync(bytes).toString("utf8");
  if (encoding === "gzip") return gunzipSync(bytes).toString("utf8");
  return bytes.toString("utf8");
}

/** A published public update with a cover photo, by the demo lead. */
async function publishedPost() {
  const p = await createProject(t);
  const cover = await createPhoto(t, p.id);
  const created = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, { title: "Chillers set on plinths" })).expect(201);
  await as.lead.agent.post(`/api/posts/${created.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
  return { p, cover, slug: created.body.slug as string };
}

describe("compressed answers", () => {
  it("a hashed script leaves as brotli or gzip by Accept-Encoding, decodes to the same file, varies by encoding and keeps its immutable caching", async () => {
    for (const [accept, expected] of [
      ["gzip, deflate, br", "br"],
      ["gzip", "gzip"],
    ] as const) {
      const res = await raw("/assets/index-abc123.js", { "accept-encoding": accept });
      expect(res.status).toBe(200);
      expect(res.headers["content-encoding"]).toBe(expected);
      expect(res.headers.vary).toMatch(/Accept-Encoding/i);
      expect(res.headers["cache-control"]).toMatch(/immutable/);
      expect(res.body.length).toBeLessThan(Buffer.byteLength(ENTRY_JS) / 5);
      expect(decode(res.headers["content-encoding"], res.body)).toBe(ENTRY_JS);
    }
  });

  it("a caller that accepts no encoding gets the plain file", async () => {
    const res = await raw("/assets/index-abc123.js", { "accept-encoding": "identity" });
    expect(res.headers["content-encoding"]).toBeUndefined();
    expect(res.body.toString("utf8")).toBe(ENTRY_JS);
  });

  it("the HTML shell, the JSON API and SVG are compressed too", async () => {
    const p = await createProject(t);
    const html = await raw(`/projects/${p.slug}/gallery`, { "accept-encoding": "br" });
    expect(html.headers["content-encoding"]).toBe("br");
    expect(html.headers.vary).toMatch(/Accept-Encoding/i);
    expect(html.headers["cache-control"]).toBe("no-cache");
    expect(decode("br", html.body)).toContain('<div id="root">');

    const { p: withPost } = await publishedPost();
    const json = await raw(`/api/projects/${withPost.slug}/posts?status=published`, { "accept-encoding": "gzip" });
    expect(json.status).toBe(200);
    expect(json.headers["content-encoding"]).toBe("gzip");
    expect(JSON.parse(decode("gzip", json.body))).toHaveProperty("length", 1);

    const svg = await raw("/favicon.svg", { "accept-encoding": "gzip" });
    expect(svg.headers["content-encoding"]).toBe("gzip");
  });

  it("the public cache's replay of an answer (production) is compressed like the first copy", async () => {
    const cache = createPublicCache({ ttlMs: 60_000, enabled: true });
    const answer = { posts: Array.from({ length: 50 }, (_, i) => ({ title: `Site walk ${i}: Hall 2A and HD-1` })) };
    let served = 0;
    const mini = express();
    mini.use(compressAnswers());
    mini.use(cache.middleware);
    mini.get("/api/projects/aldermere-phase-2/posts", (_req, res) => {
      served += 1;
      res.json(answer);
    });
    const first = await request(mini).get("/api/projects/aldermere-phase-2/posts").set("Accept-Encoding", "gzip").expect(200);
    const second = await request(mini).get("/api/projects/aldermere-phase-2/posts").set("Accept-Encoding", "br").expect(200);
    expect(served).toBe(1);
    expect(first.headers["content-encoding"]).toBe("gzip");
    expect(second.headers["content-encoding"]).toBe("br");
    expect(second.headers.vary).toMatch(/Accept-Encoding/i);
    // supertest decodes both: the same JSON either way.
    expect(second.body).toEqual(answer);
    expect(first.body).toEqual(answer);
  });

  it("images are never compressed again: a static JPEG and a photo derivative go as they are", async () => {
    const file = await raw("/assets/hero-stu901.jpg", { "accept-encoding": "gzip, br" });
    expect(file.status).toBe(200);
    expect(file.headers["content-encoding"]).toBeUndefined();
    expect(file.body.equals(IMAGE)).toBe(true);

    const { cover } = await publishedPost();
    const variant = cover.urls.find((u) => u.endsWith(".jpg"))!;
    const res = await raw(variant, { "accept-encoding": "gzip, br" });
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^image\/jpeg/);
    expect(res.headers["content-encoding"]).toBeUndefined();
  });

  it("the choice of what to compress: text yes, photos and PDFs no", () => {
    for (const type of ["text/html; charset=utf-8", "text/javascript", "text/css", "application/json; charset=utf-8", "image/svg+xml", "text/calendar; charset=utf-8", "application/atom+xml"]) {
      expect(isCompressibleType(type), type).toBe(true);
    }
    for (const type of ["image/jpeg", "image/avif", "image/webp", "application/pdf", "video/mp4", "application/octet-stream"]) {
      expect(isCompressibleType(type), type).toBe(false);
    }
  });
});

describe("preload hints in the HTML the server sends", () => {
  it("the project page names its own chunks (not the entry's) and its stylesheet", async () => {
    const p = await createProject(t);
    const res = await request(app).get(`/projects/${p.slug}`).expect(200);
    expect(res.text).toContain('<link rel="modulepreload" crossorigin href="/assets/project-home-page-jkl012.js">');
    expect(res.text).toContain('<link rel="modulepreload" crossorigin href="/assets/picture-ghi789.js">');
    expect(res.text).toContain('<link rel="preload" as="style" href="/assets/project-home-page-mno345.css">');
    // Already brought by the entry script: no second hint.
    expect(res.text).not.toContain('href="/assets/api-client-def456.js"');
    // Inside the head.
    expect(res.text.indexOf("modulepreload")).toBeLessThan(res.text.indexOf("</head>"));
  });

  it("a post page preloads its chunk and its cover with the srcset and sizes the page draws it with", async () => {
    const { p, cover, slug } = await publishedPost();
    const res = await request(app).get(`/projects/${p.slug}/updates/${slug}`).expect(200);
    expect(res.text).toContain('<link rel="modulepreload" crossorigin href="/assets/routes-pqr678.js">');
    const hint = /<link rel="preload" as="image" type="image\/avif" imagesrcset="([^"]+)" imagesizes="([^"]+)" fetchpriority="high">/.exec(res.text);
    expect(hint).not.toBeNull();
    const avif = cover.urls.filter((u) => u.endsWith(".avif"));
    expect(avif.length).toBeGreaterThan(0);
    for (const u of avif) expect(hint![1]).toContain(u);
    expect(hint![2]).toBe(POST_COVER_SIZES);
  });

  it("a page the table does not know, or a build without a manifest, gets no hints", () => {
    expect(moduleHintsFor(MANIFEST, "/sign-in")).toBe("");
    expect(moduleHintsFor(null, "/projects/aldermere-phase-2")).toBe("");
  });
});
