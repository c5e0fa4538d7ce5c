import { existsSync } from "node:fs";
import { AsyncLocalStorage } from "node:async_hooks";
import path from "node:path";
import { pathToFileURL } from "node:url";
import type { Request } from "express";
import type { Logger } from "../core/logger.ts";

/**
 * Server rendering of the public pages (docs/decisions/059-server-rendering-public-pages.md).
 * The renderer is the client's own code built for the server (`vite build --ssr`, see
 * src/entry-server.tsx): the same routes and loaders, which fetch this app's API as a visitor.
 */

/** What src/entry-server.tsx exports (its build, dist/.server/entry-server.js: a dot folder, so the static files never serve it). */
interface ServerEntry {
  setServerApiFetch(how: typeof fetch): void;
  renderPage(url: string, signal: AbortSignal): Promise<{ html: string; state: string } | null>;
}

/**
 * The public pages a visitor's HTML carries rendered: the project's pages that only read. The
 * forms and the pages of a link with a token (confirmations, resets) stay in the browser, where
 * their loaders act for the person who opened them; so do the signed-in areas.
 */
const SERVER_RENDERED: readonly RegExp[] = [
  /^\/$/,
  /^\/projects\/[^/]+\/?$/,
  /^\/projects\/[^/]+\/(updates|gallery|timeline|facility|search)\/?$/,
  /^\/projects\/[^/]+\/(updates|stories)\/[^/]+\/?$/,
];

export function isServerRendered(pathname: string): boolean {
  return SERVER_RENDERED.some((re) => re.test(pathname));
}

/** A page that takes longer leaves the work to the browser instead of holding the HTML back. */
const RENDER_LIMIT_MS = 3_000;

export interface PageRenderer {
  /** The page's markup and state for a visitor, or null when the browser should render it. */
  render(req: Request): Promise<{ html: string; state: string } | null>;
}

/**
 * The renderer over the build in `clientDir/.server`, or null when there is none (the client is
 * not built, or built without its server entry): pages are then rendered in the browser only.
 */
export function pageRenderer(clientDir: string, logger: Logger): PageRenderer | null {
  const file = path.join(clientDir, ".server", "entry-server.js");
  if (!existsSync(file)) return null;
  // Each render's API origin: the address this request reached, so the loaders' requests come
  // back to this same app (a test's server, or the one behind the proxy) over loopback.
  const origin = new AsyncLocalStorage<string>();
  let entry: Promise<ServerEntry> | null = null;
  const load = () =>
    (entry ??= (import(pathToFileURL(file).href) as Promise<ServerEntry>).then((m) => {
      m.setServerApiFetch((input, init) => fetch(new URL(String(input), origin.getStore()), { ...init, redirect: "follow" }));
      return m;
    }));

  return {
    async render(req) {
      if (req.method !== "GET" || req.user || !isServerRendered(req.path)) return null;
      const { localAddress, localPort } = req.socket;
      if (!localAddress || !localPort) return null;
      const host = localAddress.includes(":") ? `[${localAddress}]` : localAddress;
      const base = `http://${host}:${localPort}`;
      try {
        const { renderPage } = await load();
        return await origin.run(base, () => renderPage(new URL(req.originalUrl, base).href, AbortSignal.timeout(RENDER_LIMIT_MS)));
      } catch (err) {
        logger.warn({ err, path: req.path }, "server rendering failed; the page is rendered in the browser");
        return null;
      }
    },
  };
}

/** The shell with the rendered page inside its root element and the page's state after it. */
export function fillShell(shell: string, page: { html: string; state: string }): string {
  return shell.replace(/<div id="root">\s*<\/div>/, () => `<div id="root">${page.html}</div>${page.state}`);
}
