import { useEffect } from "react";

/** Sets the document title while a page is shown ("Updates · Aldermere Campus · Plumbline"), and puts the last one back after. */
export function useTitle(title: string | undefined) {
  useEffect(() => {
    if (!title) return;
    const before = document.title;
    document.title = `${title} · Plumbline`;
    return () => {
      document.title = before;
    };
  }, [title]);
}
