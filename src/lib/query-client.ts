import { MutationCache, QueryClient } from "@tanstack/react-query";
import { ApiError } from "./api-client.ts";

export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        refetchOnWindowFocus: false,
        // A 4xx will not change by asking again.
        retry: (count, err) => !(err instanceof ApiError && err.status < 500) && count < 2,
      },
    },
    mutationCache: new MutationCache({
      onError: (err, _vars, _ctx, mutation) => {
        // Forms show field errors themselves; everything else becomes a toast.
        if (mutation.meta?.quiet) return;
        if (err instanceof ApiError && Object.keys(err.fields).length > 0) return;
        // The toasts' library loads with the first toast, not with every public page (decision 065).
        const message = err instanceof Error ? err.message : "Something went wrong.";
        void import("sonner").then(({ toast }) => toast.error(message));
      },
    }),
  });
}

declare module "@tanstack/react-query" {
  interface Register {
    mutationMeta: { quiet?: boolean };
  }
}
