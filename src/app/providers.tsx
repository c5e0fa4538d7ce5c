import { QueryClientProvider, type QueryClient } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { Toaster } from "sonner";

/** The app's query cache (shared with the router's loaders, which prime it) and the toasts. */
export function Providers({ client, children }: { client: QueryClient; children: ReactNode }) {
  return (
    <QueryClientProvider client={client}>
      {children}
      <Toaster position="bottom-right" toastOptions={{ className: "!rounded-sm !border-ink !font-sans" }} />
    </QueryClientProvider>
  );
}
