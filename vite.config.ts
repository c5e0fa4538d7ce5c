import { defineConfig } from "vite";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";

export default defineConfig(({ isSsrBuild }) => ({
  plugins: [react(), tailwindcss()],
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
  },
}));
