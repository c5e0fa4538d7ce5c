import { hydrate } from "@tanstack/react-query";
import { StrictMode } from "react";
import { createRoot, hydrateRoot } from "react-dom/client";
import { RouterProvider } from "react-router-dom";
import { Providers } from "./app/providers.tsx";
import { createHydratingRouter, createRouter } from "./app/router.tsx";
import { readPageState } from "./lib/page-state.ts";
import { createQueryClient } from "./lib/query-client.ts";
import "./index.css";

// One cache for the page's life: the router's loaders fill it and the pages read it.
const queryClient = createQueryClient();
const root = document.getElementById("root")!;
// A public page the server rendered (decision 059) carries its data: the browser takes it over.
const served = readPageState(document);

async function start() {
  if (!served) {
    createRoot(root).render(
      <StrictMode>
        <Providers client={queryClient}>
          <RouterProvider router={createRouter(queryClient)} />
        </Providers>
      </StrictMode>,
    );
    return;
  }
  hydrate(queryClient, served.queries);
  const router = await createHydratingRouter(queryClient, served.router);
  hydrateRoot(
    root,
    <StrictMode>
      <Providers client={queryClient}>
        <RouterProvider router={router} />
      </Providers>
    </StrictMode>,
  );
}

void start();
