import { randomUUID } from "node:crypto";
import type { OutgoingHttpHeaders } from "node:http";
import type { RequestHandler } from "express";

/**
 * A short-lived copy of the public API answers the public pages ask for, kept in this process
 * for visitors (requests without any cookie: a signed-in caller always carries one), so that a
 * busy public page costs one database round per answer per few seconds instead of one per
 * visitor. It plays the part a CDN plays in front of several processes, for the one-machine
 * default.
 *
 * - Only GET answers with status 200 to cookie-less requests on the listed paths are kept,
 *   keyed by the full URL; their headers (security headers, ETag, Cache-Control) are replayed
 *   with a fresh request id, and If-None-Match gets 304.
 * - Any successful write through this process's API drops every copy at once, as does
 *   `clear()` (the scheduler's publications). Writes in other processes are seen within
 *   `ttlMs`.
 */

/** The public project page's answers (and the pages under it) that may be kept. */
const CACHEABLE = [
  /^\/api\/projects\/?$/,
  /^\/api\/projects\/[a-z0-9-]+\/?$/,
  /^\/api\/projects\/[a-z0-9-]+\/(health|milestones|posts|stories)\/?$/,
  /^\/api\/projects\/[a-z0-9-]+\/(posts|stories)\/[a-z0-9-]+\/?$/,
];

const SKIPPED_HEADERS = new Set(["set-cookie", "x-request-id", "date", "connection", "keep-alive", "transfer-encoding"]);
const MAX_ENTRIES = 2_000;
const MAX_BODY_BYTES = 512 * 1024;

interface Entry {
  /** Name, value, name, value …: what `writeHead` takes fastest. */
  headers: Array<string>;
  /** The same without the body's headers, for 304s. */
  notModifiedHeaders: Array<string>;
  body: Buffer;
  etag: string | null;
  expires: number;
  /** One request is fetching a fresh copy; the others are given this one meanwhile. */
  refreshing: boolean;
}

export interface PublicCache {
  middleware: RequestHandler;
  clear(): void;
  readonly size: number;
}

function flatten(headers: OutgoingHttpHeaders, skip: ReadonlySet<string>): string[] {
  const flat: string[] = [];
  for (const [name, value] of Object.entries(headers)) {
    if (value === undefined || skip.has(name)) continue;
    for (const v of Array.isArray(value) ? value : [value]) flat.push(name, String(v));
  }
  return flat;
}

const BODY_HEADERS = new Set([...SKIPPED_HEADERS, "content-length", "content-type"]);

export function createPublicCache(opts: { ttlMs: number; enabled: boolean; now?: () => number }): PublicCache {
  const now = opts.now ?? (() => Date.now());
  const entries = new Map<string, Entry>();
  // A copy started before a write must not be kept after it: each write bumps the generation.
  let generation = 0;
  const clear = () => {
    generation += 1;
    entries.clear();
  };

  const middleware: RequestHandler = (req, res, next) => {
    if (!opts.enabled) return next();
    if (req.method !== "GET" && req.method !== "HEAD") {
      if (req.path.startsWith("/api/")) res.on("finish", () => res.statusCode < 400 && clear());
      return next();
    }
    if (req.method !== "GET" || req.headers.cookie || req.headers.authorization) return next();
    const path = req.path;
    if (!CACHEABLE.some((re) => re.test(path))) return next();
    const key = req.originalUrl;
    const ifNoneMatch = req.headers["if-none-match"];
    const hit = entries.get(key);
    const t = now();
    // Fresh, or stale (up to one more TTL) while another request fetches the fresh copy.
    if (hit && (hit.expires > t || (hit.refreshing && hit.expires + opts.ttlMs > t))) {
      if (hit.etag && ifNoneMatch === hit.etag) res.writeHead(304, [...hit.notModifiedHeaders, "x-request-id", randomUUID()]).end();
      else res.writeHead(200, [...hit.headers, "x-request-id", randomUUID()]).end(hit.body);
      return;
    }
    if (hit) hit.refreshing = true;
    res.on("finish", () => {
      if (hit && entries.get(key) === hit) hit.refreshing = false;
    });
    // Fetch the whole answer to keep it; the revalidation is answered here from its ETag.
    delete req.headers["if-none-match"];
    const started = generation;
    const end = res.end.bind(res) as (...a: unknown[]) => typeof res;
    res.end = ((chunk?: unknown, ...rest: unknown[]) => {
      if (res.statusCode !== 200 || !(typeof chunk === "string" || Buffer.isBuffer(chunk))) return end(chunk, ...rest);
      const body = Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk, typeof rest[0] === "string" ? (rest[0] as BufferEncoding) : "utf8");
      const headers = res.getHeaders();
      const etag = typeof headers.etag === "string" ? headers.etag : null;
      if (started === generation && body.length <= MAX_BODY_BYTES) {
        if (!entries.has(key) && entries.size >= MAX_ENTRIES) entries.delete(entries.keys().next().value!);
        entries.set(key, { headers: flatten(headers, SKIPPED_HEADERS), notModifiedHeaders: flatten(headers, BODY_HEADERS), body, etag, expires: now() + opts.ttlMs, refreshing: false });
      }
      if (etag && ifNoneMatch === etag) {
        res.statusCode = 304;
        res.removeHeader("content-length");
        res.removeHeader("content-type");
        return end();
      }
      return end(chunk, ...rest);
    }) as typeof res.end;
    next();
  };

  return {
    middleware,
    clear,
    get size() {
      return entries.size;
    },
  };
}
