import { existsSync } from "node:fs";
import path from "node:path";
import type { RequestHandler } from "express";

/**
 * The build's scripts and styles as brotli files written beside them at build time (vite.config.ts,
 * docs/decisions/065-public-page-budget.md): compressed once at brotli's highest quality, about 13 %
 * smaller than the on-the-fly compression (quality 4, decision 049) can afford per request, and no
 * CPU spent per request. A caller that does not take brotli, or a file without one, falls through
 * to the static files and the on-the-fly compression.
 */
export function precompressedAssets(assetsDir: string): RequestHandler {
  return (req, res, next) => {
    if (req.method !== "GET" && req.method !== "HEAD") return next();
    // Only a caller that names brotli (and does not refuse it) gets it: a missing header means identity here.
    if (!req.headers["accept-encoding"] || req.acceptsEncodings("br", "identity") !== "br") return next();
    const name = decodeURIComponent(req.path).replace(/^\/+/, "");
    // Hashed names only: one level, no dot-files, nothing outside the folder.
    if (!/^[\w.-]+\.(m?js|css|svg)$/.test(name) || name.startsWith(".")) return next();
    const file = `${name}.br`;
    if (!existsSync(path.join(assetsDir, file))) return next();
    res.vary("Accept-Encoding");
    res.set("Content-Encoding", "br");
    // The type of the file it stands for (send keeps a Content-Type already set).
    res.type(path.extname(name));
    res.sendFile(file, { root: assetsDir, maxAge: "365d", immutable: true, dotfiles: "deny" }, (err) => {
      if (err && !res.headersSent) {
        res.removeHeader("Content-Encoding");
        next();
      }
    });
  };
}
