import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { render } from "@testing-library/react";
import type { ReactElement } from "react";
import { MemoryRouter, Route, Routes } from "react-router-dom";

/** Renders a component inside a router and a fresh query cache, seeded with `data`. */
export function renderWithApp(ui: ReactElement, opts: { path?: string; route?: string; data?: Array<[readonly unknown[], unknown]> } = {}) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false, staleTime: Infinity } } });
  for (const [key, value] of opts.data ?? []) client.setQueryData(key, value);
  const utils = render(
    <QueryClientProvider client={client}>
      <MemoryRouter initialEntries={[opts.route ?? "/"]}>
        <Routes>
          <Route path={opts.path ?? "/"} element={ui} />
          <Route path="/sign-in" element={<p>sign-in page</p>} />
        </Routes>
      </MemoryRouter>
    </QueryClientProvider>,
  );
  return { ...utils, client };
}
