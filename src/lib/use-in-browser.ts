import { useSyncExternalStore } from "react";

const never = () => () => undefined;

/**
 * False on the server and while the browser hydrates a server-rendered page, true afterwards and
 * on every page the browser renders itself: for a part that can only be drawn in a browser (it
 * needs the DOM), so the first render matches the server's HTML and hydration finds no difference.
 */
export function useInBrowser(): boolean {
  return useSyncExternalStore(
    never,
    () => true,
    () => false,
  );
}
