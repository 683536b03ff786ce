/**
 * The bench's client floor (server/bench/paint.ts `writeFloorPage`), never part of the app's build: the static
 * baseline page's heading and paragraph, rendered by React and React Router alone — the two libraries every
 * Tideline page starts with — with the app's stylesheet and preloaded fonts. What a client-rendered page on this
 * stack costs a phone before any of Tideline's own code, data or queries: the page-paint table's
 * "React + React Router alone" row.
 */
import { createElement as h, StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { createBrowserRouter, RouterProvider } from "react-router";

function Page() {
  return h(
    "main",
    { id: "main", className: "p-4" },
    h("h1", { className: "text-2xl font-bold" }, "Board 001 — Hull 2, deck 2"),
    h(
      "p",
      null,
      "Static reference page for the bench: the app's stylesheet and preloaded fonts, no script. The board's " +
        "positions, their grades and dispositions would be listed here. Nothing on this page is real.",
    ),
  );
}

const router = createBrowserRouter([{ path: "*", element: h(Page) }]);
createRoot(document.getElementById("root")!).render(h(StrictMode, null, h(RouterProvider, { router })));
