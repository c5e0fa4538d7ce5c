import { QueryClientProvider, type QueryClient } from "@tanstack/react-query";
import { lazy, Suspense, useEffect, useState, type ReactNode } from "react";

// The toasts' library is not part of a page's first load (decision 065): a toast answers something
// the person did, so the Toaster loads with their first tap, key or input. A toast raised before
// it arrives is shown when it does (sonner replays the toasts still active when it subscribes).
const Toaster = lazy(async () => ({ default: (await import("sonner")).Toaster }));
const FIRST_ACTS = ["pointerdown", "keydown", "input", "submit"] as const;

/** The toasts, mounted in the browser on the first interaction: the server's HTML and hydration never include them. */
function Toasts() {
  const [wanted, setWanted] = useState(false);
  useEffect(() => {
    if (wanted) return;
    const want = () => setWanted(true);
    for (const type of FIRST_ACTS) window.addEventListener(type, want, { capture: true, once: true });
    return () => {
      for (const type of FIRST_ACTS) window.removeEventListener(type, want, { capture: true });
    };
  }, [wanted]);
  if (!wanted) return null;
  return (
    <Suspense fallback={null}>
      <Toaster position="bottom-right" toastOptions={{ className: "!rounded-sm !border-ink !font-sans" }} />
    </Suspense>
  );
}

/** The app's query cache (shared with the router's loaders, which prime it) and the toasts. */
export function Providers({ client, children }: { client: QueryClient; children: ReactNode }) {
  return (
    <QueryClientProvider client={client}>
      {children}
      <Toasts />
    </QueryClientProvider>
  );
}
