import { readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import { promisify } from "node:util";
import { brotliCompress, constants } from "node:zlib";
import { defineConfig, type Plugin } from "vite";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";

const brotli = promisify(brotliCompress);

/**
 * Writes `<file>.br` beside each script, style sheet and SVG of the client build, at brotli's
 * highest quality: the server sends it to callers that take brotli (server/core/precompressed-assets.ts,
 * docs/decisions/065-public-page-budget.md). Too slow to do per request, about 13 % smaller than
 * what the server can afford on the fly.
 */
function precompress(): Plugin {
  return {
    name: "plumbline-precompress",
    apply: "build",
    async writeBundle(options, bundle) {
      const dir = options.dir ?? "dist";
      const files = Object.keys(bundle).filter((f) => /\.(m?js|css|svg)$/.test(f));
      await Promise.all(
        files.map(async (f) => {
          const bytes = await readFile(path.join(dir, f));
          if (bytes.length < 1024) return;
          const br = await brotli(bytes, { params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY, [constants.BROTLI_PARAM_SIZE_HINT]: bytes.length } });
          await writeFile(path.join(dir, `${f}.br`), br);
        }),
      );
    },
  };
}

export default defineConfig(({ isSsrBuild }) => ({
  // The server entry (decision 059) is loaded by Node from disk: nothing to compress there.
  plugins: [react(), tailwindcss(), ...(isSsrBuild ? [] : [precompress()])],
  server: {
    proxy: {
      "/api": `http://127.0.0.1:${process.env.API_PORT ?? "3001"}`,
      "/feed": `http://127.0.0.1:${process.env.API_PORT ?? "3001"}`,
      "/media": `http://127.0.0.1:${process.env.API_PORT ?? "3001"}`,
    },
  },
  build: {
    outDir: "dist",
    sourcemap: true,
    // dist/.vite/manifest.json: the server reads it to write each page's modulepreload hints.
    // The server entry (decision 059) is code only: no public files, no manifest of its own.
    manifest: !isSsrBuild,
    copyPublicDir: !isSsrBuild,
    chunkSizeWarningLimit: 900,
    rollupOptions: isSsrBuild
      ? {}
      : {
          output: {
            codeSplitting: {
              groups: [{ name: "initial", tags: ["$initial"] }],
            },
          },
        },
  },
}));
