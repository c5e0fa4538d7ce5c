import type { DehydratedState } from "@tanstack/react-query";
import type { HydrationState } from "react-router-dom";

/**
 * What a server-rendered page carries for the browser to take over without asking again: the
 * query cache its loaders filled and the router's state. It travels as a JSON data block, not a
 * script (the content security policy runs no inline script), with the characters that could end
 * the element or the line escaped, so text from the page (a title with `</script>`) stays data.
 */
export interface PageState {
  queries: DehydratedState;
  router: HydrationState;
}

export const PAGE_STATE_ID = "plumbline-state";

const UNSAFE: Record<string, string> = { "<": "\\u003c", ">": "\\u003e", "&": "\\u0026", "\u2028": "\\u2028", "\u2029": "\\u2029" };

/** The page's state as the `<script type="application/json">` element the browser reads back. */
export function pageStateElement(state: PageState): string {
  const json = JSON.stringify(state).replace(/[<>&\u2028\u2029]/g, (c) => UNSAFE[c]!);
  return `<script type="application/json" id="${PAGE_STATE_ID}">${json}</script>`;
}

/** The state the server left in the page, or null when the browser renders the page itself. */
export function readPageState(doc: Document): PageState | null {
  const text = doc.getElementById(PAGE_STATE_ID)?.textContent;
  return text ? (JSON.parse(text) as PageState) : null;
}
