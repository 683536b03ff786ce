import "./zod-config"; // first: before any zod schema exists (CSP without eval)
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { RouterProvider } from "react-router";
import { AppProvider } from "./app/provider";
import { createRouter, readsOf } from "./app/router";
import { startRead } from "./lib/early-reads";
import "./styles/index.css";

// The service worker (vite-plugin-pwa / Workbox) exists only in a production build: it precaches the
// app so it opens with no signal. In development Vite serves every module fresh.
if (import.meta.env.PROD && "serviceWorker" in navigator)
  void import("virtual:pwa-register").then(({ registerSW }) => registerSW({ immediate: true }));

// The router's creation and first navigation (the routes flattened and ranked, the first matches, the route chunks'
// imports, each inserting its modulepreload links, and the loaders) run as a task of their own after the entry's
// evaluation, instead of lengthening that one task. The reads this address's pages make whatever they show are then
// started from the router's own first matches (React Router keeps them as its state until that first navigation
// ends), so they travel while the rest of the page's code arrives and is evaluated; matching the address apart from
// the router (`earlyReads`) flattened and ranked every route a second time, a long task of its own on a phone.
setTimeout(() => {
  const router = createRouter();
  for (const url of readsOf(router.state.matches, new URLSearchParams(router.state.location.search))) startRead(url);
  createRoot(document.getElementById("root")!).render(
    <StrictMode>
      <AppProvider>
        <RouterProvider router={router} />
      </AppProvider>
    </StrictMode>,
  );
}, 0);
