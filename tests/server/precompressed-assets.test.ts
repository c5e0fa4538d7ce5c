import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { createServer, request as httpRequest, type IncomingHttpHeaders, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import os from "node:os";
import path from "node:path";
import { brotliCompressSync, brotliDecompressSync, constants, gunzipSync } from "node:zlib";
import { pino } from "pino";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createHttpApp } from "../../server/app.ts";
import { createServices, type Services } from "../../server/services.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";

/*
 * The build's brotli files (docs/decisions/065-public-page-budget.md): vite.config.ts writes
 * `<asset>.br` at brotli's highest quality; the server sends it to callers that take brotli and
 * falls back to on-the-fly compression for everyone else and for files without one.
 */

const env = useAppAsEveryRole();
let outer: string;
let dir: string;
let server: Server;
let services: Services;
let base: string;

const ENTRY_JS = `${"export const readiness = 'Hall 2A ready for service, HD-1 next, Hall 2B after';\n".repeat(300)}`;
const STYLE = `${".readiness-bar { block-size: 0.75rem; inline-size: 100%; }\n".repeat(200)}`;
const NO_BR_JS = `${"export const gallery = 'Plant yard, energy centre, Hall 2A';\n".repeat(200)}`;
const ENTRY_BR = brotliCompressSync(Buffer.from(ENTRY_JS), { params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY } });
const STYLE_BR = brotliCompressSync(Buffer.from(STYLE), { params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY } });

beforeAll(async () => {
  const { t } = env;
  outer = mkdtempSync(path.join(os.tmpdir(), "plumbline-precompressed-"));
  dir = path.join(outer, "client");
  mkdirSync(path.join(dir, "assets"), { recursive: true });
  writeFileSync(path.join(dir, "index.html"), `<!doctype html><html lang="en-GB"><head><title>Plumbline</title></head><body><div id="root"></div></body></html>`);
  writeFileSync(path.join(dir, "assets", "index-abc123.js"), ENTRY_JS);
  writeFileSync(path.join(dir, "assets", "index-abc123.js.br"), ENTRY_BR);
  writeFileSync(path.join(dir, "assets", "index-def456.css"), STYLE);
  writeFileSync(path.join(dir, "assets", "index-def456.css.br"), STYLE_BR);
  writeFileSync(path.join(dir, "assets", "gallery-ghi789.js"), NO_BR_JS);
  // A file outside the client folder that no asset path may reach.
  writeFileSync(path.join(outer, "secret.js"), "export const secret = 1;\n".repeat(100));
  writeFileSync(path.join(outer, "secret.js.br"), brotliCompressSync(Buffer.from("export const secret = 1;\n".repeat(100))));
  const deps = { db: t.db, config: t.config, logger: pino({ level: "silent" }), mailer: t.mailer };
  services = createServices(deps);
  server = createServer(createHttpApp(services, { ...deps, clientDir: dir }));
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
  services.close();
  rmSync(outer, { recursive: true, force: true });
});

/** The raw answer as it came over the wire (supertest would decode it); `target` is sent as written, dot segments and all. */
function raw(target: string, headers: Record<string, string>, method = "GET"): Promise<{ status: number; headers: IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    const { hostname, port } = new URL(base);
    const req = httpRequest({ hostname, port, path: target, method, headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    });
    req.on("error", reject);
    req.end();
  });
}

describe("precompressed assets", () => {
  it("a caller that takes brotli gets the build's own .br file, typed as the script, immutable and varying by encoding", async () => {
    const res = await raw("/assets/index-abc123.js", { "accept-encoding": "gzip, deflate, br" });
    expect(res.status).toBe(200);
    expect(res.headers["content-encoding"]).toBe("br");
    expect(res.headers["content-type"]).toMatch(/javascript/);
    expect(res.headers.vary).toMatch(/Accept-Encoding/i);
    expect(res.headers["cache-control"]).toMatch(/immutable/);
    // The very bytes written at build time, not a fresh on-the-fly compression.
    expect(res.body.equals(ENTRY_BR)).toBe(true);
    expect(brotliDecompressSync(res.body).toString("utf8")).toBe(ENTRY_JS);

    const css = await raw("/assets/index-def456.css", { "accept-encoding": "br" });
    expect(css.headers["content-encoding"]).toBe("br");
    expect(css.headers["content-type"]).toMatch(/^text\/css/);
    expect(css.body.equals(STYLE_BR)).toBe(true);
  });

  it("the .br file is smaller than what the server compresses on the fly", async () => {
    const built = await raw("/assets/index-abc123.js", { "accept-encoding": "br" });
    const onTheFly = await raw("/assets/index-abc123.js", { "accept-encoding": "gzip" });
    expect(onTheFly.headers["content-encoding"]).toBe("gzip");
    expect(gunzipSync(onTheFly.body).toString("utf8")).toBe(ENTRY_JS);
    expect(built.body.length).toBeLessThan(onTheFly.body.length);
  });

  it("a caller that refuses brotli, takes no encoding, or sends no Accept-Encoding gets gzip or the plain file", async () => {
    const refused = await raw("/assets/index-abc123.js", { "accept-encoding": "br;q=0, gzip" });
    expect(refused.headers["content-encoding"]).toBe("gzip");
    expect(gunzipSync(refused.body).toString("utf8")).toBe(ENTRY_JS);

    const identity = await raw("/assets/index-abc123.js", { "accept-encoding": "identity" });
    expect(identity.headers["content-encoding"]).toBeUndefined();
    expect(identity.body.toString("utf8")).toBe(ENTRY_JS);

    const none = await raw("/assets/index-abc123.js", {});
    expect(none.headers["content-encoding"]).toBeUndefined();
    expect(none.body.toString("utf8")).toBe(ENTRY_JS);
  });

  it("a file the build left without a .br is compressed on the fly as before", async () => {
    const res = await raw("/assets/gallery-ghi789.js", { "accept-encoding": "br" });
    expect(res.status).toBe(200);
    expect(res.headers["content-encoding"]).toBe("br");
    expect(brotliDecompressSync(res.body).toString("utf8")).toBe(NO_BR_JS);
  });

  it("HEAD answers the brotli headers without a body", async () => {
    const res = await raw("/assets/index-abc123.js", { "accept-encoding": "br" }, "HEAD");
    expect(res.status).toBe(200);
    expect(res.headers["content-encoding"]).toBe("br");
    expect(Number(res.headers["content-length"])).toBe(ENTRY_BR.length);
    expect(res.body.length).toBe(0);
  });

  it("hostile paths reach nothing outside the assets folder, and an unknown asset is not found", async () => {
    for (const target of ["/assets/../../secret.js", "/assets/..%2F..%2Fsecret.js", "/assets/%2e%2e/%2e%2e/secret.js", "/assets/..%5C..%5Csecret.js", "/assets/.%2E/.%2E/secret.js", "/assets/missing-000000.js"]) {
      const res = await raw(target, { "accept-encoding": "br" });
      // Refused (403, the static files' answer to a path that climbs) or not found: never the file.
      expect([403, 404], target).toContain(res.status);
      expect(res.headers["content-encoding"], target).not.toBe("br");
      expect(res.body.toString("utf8"), target).not.toContain("export const secret");
    }
    // The folder itself still holds the file the hostile paths aimed at: they were refused, not missing.
    expect(readFileSync(path.join(outer, "secret.js"), "utf8")).toContain("secret");
  });
});
