import type { KeyboardEvent } from "react";

/**
 * Keeps Tab inside a modal: from its last focusable element Tab wraps to the first, and
 * Shift+Tab from the first to the last. `selector` names what counts as focusable there.
 */
export function keepTabInside(e: KeyboardEvent, container: HTMLElement | null, selector: string): void {
  const focusable = container?.querySelectorAll<HTMLElement>(selector);
  if (!focusable || focusable.length === 0) return;
  const first = focusable[0] as HTMLElement;
  const last = focusable[focusable.length - 1] as HTMLElement;
  if (e.shiftKey && document.activeElement === first) {
    e.preventDefault();
    last.focus();
  } else if (!e.shiftKey && document.activeElement === last) {
    e.preventDefault();
    first.focus();
  }
}
