import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";

export const ARTIFACTS = path.resolve("tests/artifacts");

/** Debian's Chromium through playwright-core, with the flags that work in these containers. */
export async function launchBrowser(opts: { width?: number; height?: number } = {}): Promise<{ context: BrowserContext; close(): Promise<void> }> {
  const dir = mkdtempSync(path.join(os.tmpdir(), "chromium-profile-"));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    viewport: { width: opts.width ?? 1280, height: opts.height ?? 860 },
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  return {
    context,
    async close() {
      await context.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Collects page errors and console errors so a test can assert there were none. */
export function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on("pageerror", (e) => errors.push(`pageerror: ${e.message}`));
  page.on("console", (m) => {
    // Asking /api/auth/me while signed out answers 401 by design; Chromium logs that as a failed load.
    if (m.type() === "error" && !(m.text().includes("401") && m.location().url.endsWith("/api/auth/me"))) errors.push(`console: ${m.text()}`);
  });
  return errors;
}

export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(ARTIFACTS, { recursive: true });
  const file = path.join(ARTIFACTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
