import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { RouterProvider } from "react-router-dom";
import { Providers } from "./app/providers.tsx";
import { createRouter } from "./app/router.tsx";
import { createQueryClient } from "./lib/query-client.ts";
import "./index.css";

// One cache for the page's life: the router's loaders fill it and the pages read it.
const queryClient = createQueryClient();

createRoot(document.getElementById("root")!).render(
  <StrictMode>
    <Providers client={queryClient}>
      <RouterProvider router={createRouter(queryClient)} />
    </Providers>
  </StrictMode>,
);
