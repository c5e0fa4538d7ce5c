import { StrictMode } from "react";
import { renderToString } from "react-dom/server";
import { prerender } from "react-dom/static";
import { dehydrate } from "@tanstack/react-query";
import { createStaticHandler, createStaticRouter, StaticRouterProvider } from "react-router-dom";
import { Providers } from "./app/providers.tsx";
import { routes } from "./app/router.tsx";
import { setApiFetch } from "./lib/api-client.ts";
import { pageStateElement } from "./lib/page-state.ts";
import { createQueryClient } from "./lib/query-client.ts";

/**
 * The public pages rendered on the server (docs/decisions/059-server-rendering-public-pages.md):
 * the browser's routes and loaders, run here for a visitor, so the page's text arrives with the
 * HTML instead of after the scripts. Built by `vite build --ssr` into dist/.server; the server
 * (server/ssr/ssr.render.ts) loads it.
 */

/**
 * Where the loaders' API requests go on the server: the server passes a fetch that reaches the app
 * itself as the visitor (no cookie), so the loaders get exactly what the visitor's browser would
 * and the audience rules stay the API's.
 */
export const setServerApiFetch = setApiFetch;

/** React's mark of a part left to the browser: it suspended, or failed, while rendering to a string. */
const SUSPENDED = /<!--\$!-->/;

export interface RenderedPage {
  /** The app's markup, for inside `<div id="root">`. */
  html: string;
  /** The `<script type="application/json">` element with the state the browser hydrates from. */
  state: string;
}

/**
 * Renders `url` as a visitor sees it. Null when the page is better left to the browser: a loader
 * failed or redirected (the browser shows today's error page or follows the redirect), or a part
 * of the page could not be rendered here.
 */
export async function renderPage(url: string, signal: AbortSignal): Promise<RenderedPage | null> {
  const qc = createQueryClient();
  // One try: a slow or failing API leaves the page to the browser rather than holding the HTML.
  qc.setDefaultOptions({ queries: { ...qc.getDefaultOptions().queries, retry: false } });
  const tree = routes(qc);
  const handler = createStaticHandler(tree);
  const context = await handler.query(new Request(url, { signal }));
  if (context instanceof Response || context.errors) return null;
  const router = createStaticRouter(handler.dataRoutes, context);
  const page = (
    <StrictMode>
      <Providers client={qc}>
        <StaticRouterProvider router={router} context={context} hydrate={false} />
      </Providers>
    </StrictMode>
  );
  let html = renderToString(page);
  if (SUSPENDED.test(html)) {
    // Something read data its loader did not fetch, or a part loads on its own: wait for all of
    // it once, then render again from the filled cache. The first render's markup is not sent: it
    // would reveal the waiting parts with inline scripts, which the content security policy stops.
    await (await prerender(page, { signal })).prelude.cancel();
    html = renderToString(page);
    if (SUSPENDED.test(html)) return null;
  }
  return { html, state: pageStateElement({ queries: dehydrate(qc), router: { loaderData: context.loaderData, actionData: null, errors: null } }) };
}
