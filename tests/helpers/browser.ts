import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll } from "vitest";
import { DEMO_PASSWORD, startTestApp, type TestApp } from "./app.ts";

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
    // A failed load names its address (Chromium's text does not), so the failure says which.
    if (m.type() === "error") errors.push(`console: ${m.text()}${m.text().startsWith("Failed to load resource") ? ` (${m.location().url})` : ""}`);
  });
  return errors;
}

export async function screenshot(page: Page, name: string): Promise<string> {
  const file = path.join(ARTIFACTS, `${name}.png`);
  mkdirSync(path.dirname(file), { recursive: true });
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/**
 * Signs `page` in through the sign-in form as a demo person (the seeded password) and waits
 * until it lands in their area (`/office` for staff, `/investors` for investors).
 */
export async function signInAs(page: Page, baseUrl: string | null, email: string, landing: RegExp = /\/(office|investors)$/): Promise<Page> {
  if (!baseUrl) throw new Error("The browser needs the app listening: startTestApp({}, { listen: true }).");
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(landing);
  return page;
}

/** A new page in `context`, signed in as `email`: the browser opened as that person's role. */
export async function openAs(context: BrowserContext, baseUrl: string | null, email: string, landing?: RegExp): Promise<Page> {
  return signInAs(await context.newPage(), baseUrl, email, landing);
}

export type Browser = Awaited<ReturnType<typeof launchBrowser>>;

/** The browsers a test file opens, each at its own width, closed together in `afterAll`. */
export function browserPool() {
  const open: Browser[] = [];
  return {
    async launch(width = 1280, height = 900): Promise<Browser> {
      const b = await launchBrowser({ width, height });
      open.push(b);
      return b;
    },
    async closeAll(): Promise<void> {
      for (const b of open.splice(0)) await b.close();
    },
  };
}

/**
 * A test file's listening app (the seeded demo) and its browsers: the app starts before the
 * file's tests, and both are closed after them. `app()` is the app once started.
 */
export function useBrowserApp(): { app: () => TestApp; browsers: ReturnType<typeof browserPool> } {
  let t: TestApp | undefined;
  const browsers = browserPool();
  beforeAll(async () => {
    t = await startTestApp({}, { listen: true });
  });
  afterAll(async () => {
    await browsers.closeAll();
    await t?.close();
  });
  return {
    app: () => {
      if (!t) throw new Error("The app starts in beforeAll: call app() inside a test.");
      return t;
    },
    browsers,
  };
}
