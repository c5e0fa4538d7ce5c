import { useSyncExternalStore } from "react";

/** Below Tailwind's `sm` (640 px): a phone held upright, where a wide table becomes cards. */
const NARROW = "(max-width: 639.98px)";

function subscribe(onChange: () => void): () => void {
  if (typeof window.matchMedia !== "function") return () => undefined;
  const query = window.matchMedia(NARROW);
  query.addEventListener("change", onChange);
  return () => query.removeEventListener("change", onChange);
}

/**
 * Whether the page is phone-width now, following the window as it turns or resizes. Without
 * `matchMedia` (a test's DOM) the page counts as wide.
 */
export function useNarrow(): boolean {
  return useSyncExternalStore(
    subscribe,
    () => typeof window.matchMedia === "function" && window.matchMedia(NARROW).matches,
    () => false,
  );
}
