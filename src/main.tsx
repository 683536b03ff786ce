import "./zod-config"; // first: before any zod schema exists (CSP without eval)
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { RouterProvider } from "react-router";
import { AppProvider } from "./app/provider";
import { router } from "./app/router";
import "./styles/index.css";

// The service worker (vite-plugin-pwa / Workbox) exists only in a production build: it precaches the
// app so it opens with no signal. In development Vite serves every module fresh.
if (import.meta.env.PROD && "serviceWorker" in navigator)
  void import("virtual:pwa-register").then(({ registerSW }) => registerSW({ immediate: true }));

createRoot(document.getElementById("root")!).render(
  <StrictMode>
    <AppProvider>
      <RouterProvider router={router} />
    </AppProvider>
  </StrictMode>,
);
