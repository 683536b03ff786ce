/**
 * Page paint on a phone profile: Debian's chromium driven by Playwright, 360 × 740
 * CSS px at 2 × density, touch, and the CPU slowed 4 × through the DevTools protocol
 * (Emulation.setCPUThrottlingRate). Each load is a fresh browser context (cold cache, the session
 * cookie set) and the figures come from the browser's own Performance APIs: the last
 * largest-contentful-paint entry, the sum of layout-shift values without recent input (CLS), and
 * the longest 'longtask' entry. The baseline is a static page served by the same server with the
 * app's CSS and preloaded fonts, a heading and a paragraph (written into the build output for the
 * run and removed after). On a page with a list, also when its first row was first drawn: the frame after the row
 * entered the page (a MutationObserver, then requestAnimationFrame), since the LCP element is the page's heading or
 * intro and says nothing of when the rows a person came for appear.
 */
import { copyFileSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { chromium, type Browser, type CDPSession } from "@playwright/test";
import { build } from "vite";

export interface PaintFigures {
  lcp: number;
  cls: number;
  longestTask: number;
  /** Sum over long tasks of their time past 50 ms (total blocking time, after load). */
  blocking: number;
  /** ms from navigation to the frame that first drew one of the list's rows; null on a page without a list. */
  rows: number | null;
}

const observe = (rowSelector: string | null) => `
  window.__paint = { lcp: 0, cls: 0, longest: 0, blocking: 0, rows: 0 };
  ${
    rowSelector
      ? `new MutationObserver((_, seen) => {
    if (!document.querySelector(${JSON.stringify(rowSelector)})) return;
    seen.disconnect();
    requestAnimationFrame(() => (window.__paint.rows = performance.now()));
  }).observe(document, { childList: true, subtree: true });`
      : ""
  }
  new PerformanceObserver((l) => { for (const e of l.getEntries()) window.__paint.lcp = e.startTime; })
    .observe({ type: "largest-contentful-paint", buffered: true });
  new PerformanceObserver((l) => { for (const e of l.getEntries()) if (!e.hadRecentInput) window.__paint.cls += e.value; })
    .observe({ type: "layout-shift", buffered: true });
  new PerformanceObserver((l) => { for (const e of l.getEntries()) {
    window.__paint.longest = Math.max(window.__paint.longest, e.duration);
    window.__paint.blocking += Math.max(0, e.duration - 50);
  } }).observe({ type: "longtask", buffered: true });
`;

export const STATIC_PAGE = "bench-static.html";
export const FLOOR_PAGE = "bench-floor.html";

/** The built index.html's head without its scripts and module preloads: the app's stylesheet, fonts, icons. */
function appHead(clientDir: string): string {
  const html = readFileSync(join(clientDir, "index.html"), "utf8");
  const head = /<head>([\s\S]*?)<\/head>/.exec(html)?.[1] ?? "";
  return head
    .split("\n")
    .filter((l) => !/<script/.test(l) && !/modulepreload/.test(l))
    .join("\n");
}

/** Writes the static baseline page next to the built index.html, with the same head. Returns a remover. */
export function writeStaticPage(clientDir: string): () => void {
  const file = join(clientDir, STATIC_PAGE);
  writeFileSync(
    file,
    `<!doctype html><html lang="en"><head>${appHead(clientDir)}</head><body><main id="main" class="p-4">
<h1 class="text-2xl font-bold">Board 001 — Hull 2, deck 2</h1>
<p>Static reference page for the bench: the app's stylesheet and preloaded fonts, no script. The board's positions,
their grades and dispositions would be listed here. Nothing on this page is real.</p></main></body></html>`,
  );
  return () => existsSync(file) && rmSync(file);
}

/**
 * The client floor: the static page's heading and paragraph rendered by React and React Router alone (src/bench-floor.ts),
 * built here by Vite's own `build` as a production bundle (React Router's production build, as vite.config.ts
 * chooses it) and served beside the app with the same head. What any client-rendered page on this stack costs a phone
 * before Tideline's own code: the page-paint table's floor row, as the bare-HTTP side is the endpoints' floor.
 * Returns a remover for the page and its script.
 */
export async function writeFloorPage(clientDir: string): Promise<() => void> {
  const root = join(import.meta.dirname, "..", "..");
  const outDir = mkdtempSync(join(tmpdir(), "tideline-floor-client-"));
  try {
    const result = await build({
      configFile: false,
      root,
      mode: "production",
      logLevel: "error", // not react-router's "use client" directive, which means nothing in a client bundle
      resolve: {
        alias: [
          { find: /^react-router$/, replacement: join(root, "node_modules/react-router/dist/production/index.mjs") },
        ],
      },
      build: {
        outDir,
        emptyOutDir: true,
        copyPublicDir: false,
        modulePreload: false,
        rollupOptions: {
          input: join(root, "src", "bench-floor.ts"),
          output: { entryFileNames: "bench-floor-[hash].js", chunkFileNames: "bench-floor-[name]-[hash].js" },
        },
      },
    });
    const outputs = (Array.isArray(result) ? result : [result]).flatMap((r) => ("output" in r ? r.output : []));
    const scripts = outputs.filter((o) => o.type === "chunk").map((o) => o.fileName);
    const entry = outputs.find((o) => o.type === "chunk" && o.isEntry)?.fileName;
    if (!entry) throw new Error("the client floor's build made no entry chunk");
    for (const f of scripts) copyFileSync(join(outDir, f), join(clientDir, "assets", f));
    const file = join(clientDir, FLOOR_PAGE);
    writeFileSync(
      file,
      `<!doctype html><html lang="en"><head>${appHead(clientDir)}
<script type="module" crossorigin src="/assets/${entry}"></script></head><body><div id="root"></div></body></html>`,
    );
    return () => {
      for (const f of [file, ...scripts.map((s) => join(clientDir, "assets", s))]) if (existsSync(f)) rmSync(f);
    };
  } finally {
    rmSync(outDir, { recursive: true, force: true });
  }
}

export async function openBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
}

/**
 * The value of `expression` in the page, through the DevTools protocol (Runtime.evaluate). Not Playwright's
 * page.evaluate, locators or waitForFunction: those first inject Playwright's own script into the page, a long task
 * of its own at 4 × throttle that the page's long-task figures would then count; and waitForFunction evaluates its
 * predicate with `eval`, which the app's Content-Security-Policy (no 'unsafe-eval') refuses. A string: it runs in the
 * page, which the server's types (no DOM) do not describe.
 */
export async function inPage<T>(cdp: CDPSession, expression: string): Promise<T> {
  const r = await cdp.send("Runtime.evaluate", { expression, returnByValue: true, awaitPromise: true });
  if (r.exceptionDetails) throw new Error(`${expression}: ${r.exceptionDetails.exception?.description ?? "failed"}`);
  return r.result.value as T;
}

/** Polls `expression` in the page (inPage) until it is truthy. */
export async function waitInPage(cdp: CDPSession, expression: string, timeoutMs: number): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!(await inPage(cdp, expression))) {
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs} ms waiting for ${expression}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * One cold load of `url` on the phone profile; waits for the network to go quiet (and, given `rowSelector`, for a
 * row of the page's list to be drawn), then reads the figures.
 */
export async function measurePaint(
  browser: Browser,
  base: string,
  url: string,
  cookie: string | null,
  rowSelector: string | null = null,
): Promise<PaintFigures> {
  const context = await browser.newContext({
    viewport: { width: 360, height: 740 },
    deviceScaleFactor: 2,
    isMobile: true,
    hasTouch: true,
  });
  try {
    if (cookie) {
      const [name, value] = cookie.split("=");
      await context.addCookies([{ name, value, url: base }]);
    }
    const page = await context.newPage();
    const cdp = await context.newCDPSession(page);
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
    await page.addInitScript(observe(rowSelector));
    await page.goto(`${base}${url}`, { waitUntil: "networkidle", timeout: 120_000 });
    // The app paints after its data arrives: wait for the first contentful paint and the page's
    // heading, then for a quiet second and a half so the last LCP candidate and late shifts count.
    await waitInPage(
      cdp,
      'performance.getEntriesByType("paint").some((e) => e.name === "first-contentful-paint")',
      120_000,
    );
    await waitInPage(cdp, 'document.querySelector("h1") !== null', 120_000);
    if (rowSelector) await waitInPage(cdp, "window.__paint.rows > 0", 120_000);
    await page.waitForTimeout(1500);
    const m = await inPage<{ lcp: number; cls: number; longest: number; blocking: number; rows: number }>(
      cdp,
      "window.__paint",
    );
    return { lcp: m.lcp, cls: m.cls, longestTask: m.longest, blocking: m.blocking, rows: rowSelector ? m.rows : null };
  } finally {
    await context.close();
  }
}
