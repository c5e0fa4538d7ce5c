import { useEffect } from "react";

/**
 * Sets the document title while a page is shown, as "<page> · <where>" ("HD-1 containment goes up ·
 * Aldermere Campus, Phase 2", "Enquiries · Site office"), and puts the last one back after. A page
 * that is its place (the project page) gives no `where`, so its name is not said twice.
 */
export function useTitle(page: string | undefined, where?: string) {
  const title = page === undefined ? undefined : where && where !== page ? `${page} · ${where}` : page;
  useEffect(() => {
    if (!title) return;
    const before = document.title;
    document.title = title;
    return () => {
      document.title = before;
    };
  }, [title]);
}
