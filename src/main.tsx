import "./zod-config"; // first: before any zod schema exists (CSP without eval)
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { RouterProvider } from "react-router";
import { AppProvider } from "./app/provider";
import { createRouter, earlyReads } from "./app/router";
import { startRead } from "./lib/early-reads";
import "./styles/index.css";

// The service worker (vite-plugin-pwa / Workbox) exists only in a production build: it precaches the
// app so it opens with no signal. In development Vite serves every module fresh.
if (import.meta.env.PROD && "serviceWorker" in navigator)
  void import("virtual:pwa-register").then(({ registerSW }) => registerSW({ immediate: true }));

// The reads this address's pages make whatever they show travel while the rest of the page's code arrives. Matching
// the address against every route and starting the fetches is a task of its own, after the entry's evaluation (a
// long task on the phone without it) and before the router's.
setTimeout(() => {
  for (const url of earlyReads(location.pathname)) startRead(url);
}, 0);

// The router's first navigation (the route chunks' imports, each inserting its modulepreload links, and the
// loaders) runs as a task of its own after the entry's evaluation, instead of lengthening that one task.
setTimeout(() => {
  const router = createRouter();
  createRoot(document.getElementById("root")!).render(
    <StrictMode>
      <AppProvider>
        <RouterProvider router={router} />
      </AppProvider>
    </StrictMode>,
  );
}, 0);
