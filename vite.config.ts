import { fileURLToPath } from "node:url";
import { configDefaults, defineConfig, type Plugin } from "vitest/config";
import react from "@vitejs/plugin-react";
import { VitePWA } from "vite-plugin-pwa";
import { compression } from "vite-plugin-compression2";

/**
 * Preloads the two fonts every page paints with (body text and the mono designations on tiles), so
 * the browser fetches them with the HTML instead of discovering them late in the CSS.
 * The hashed file names are known only after bundling, hence a transformIndexHtml hook.
 */
function preloadFonts(patterns: RegExp[]): Plugin {
  return {
    name: "tideline-preload-fonts",
    apply: "build",
    transformIndexHtml: {
      order: "post",
      handler: (_html, ctx) =>
        Object.keys(ctx.bundle ?? {})
          .filter((f) => f.endsWith(".woff2") && patterns.some((p) => p.test(f)))
          .map((f) => ({
            tag: "link",
            attrs: { rel: "preload", as: "font", type: "font/woff2", href: `/${f}`, crossorigin: "" },
            injectTo: "head" as const,
          })),
    },
  };
}

/**
 * React Router 7's package.json sends every bundler to its development build (dist/development, with
 * ENABLE_DEV_WARNINGS on: warnings built as strings on every route match, extra checks) and lists no condition
 * for its production build, which the package ships beside it (dist/production, the same code with those
 * warnings compiled out). A production build of the client takes that one: smaller and less work in the entry
 * chunk. Dev and vitest keep the package's default.
 */
const reactRouterProduction = fileURLToPath(
  new URL("./node_modules/react-router/dist/production/index.mjs", import.meta.url),
);

// One config for the client build and for vitest. The API runs separately (server/);
// in dev, Vite proxies /api to it.
export default defineConfig(({ command }) => ({
  resolve: command === "build" ? { alias: [{ find: /^react-router$/, replacement: reactRouterProduction }] } : {},
  plugins: [
    react(),
    preloadFonts([/atkinson-hyperlegible-next-latin-wght-normal/, /jetbrains-mono-latin-wght-normal/]),
    // The installable field app: Workbox precaches the whole built client (every page's
    // chunk, the CSS, the fonts, the icons), so after one visit Tideline opens with no signal. /api is
    // never cached by the service worker: reads go through the persisted query cache, writes through
    // the outbox (src/lib/outbox), each with its own rules.
    VitePWA({
      registerType: "autoUpdate",
      injectRegister: false, // src/main.tsx registers it (no inline script: the CSP forbids one)
      includeAssets: ["icons/tideline.svg", "icons/tideline-apple-180.png"],
      manifest: {
        id: "/",
        name: "Tideline — flooded switchboard restoration",
        short_name: "Tideline",
        description: "Condition survey, readings and return to service for flood-damaged switchboards, in the field.",
        start_url: "/",
        scope: "/",
        display: "standalone",
        orientation: "any",
        background_color: "#0b1117",
        theme_color: "#0d141b",
        icons: [
          { src: "/icons/tideline-192.png", sizes: "192x192", type: "image/png" },
          { src: "/icons/tideline-512.png", sizes: "512x512", type: "image/png" },
          { src: "/icons/tideline-maskable-512.png", sizes: "512x512", type: "image/png", purpose: "maskable" },
          { src: "/icons/tideline.svg", sizes: "any", type: "image/svg+xml" },
        ],
      },
      workbox: {
        globPatterns: ["**/*.{js,css,html,woff2,png,svg,webmanifest}"],
        navigateFallback: "/index.html",
        navigateFallbackDenylist: [/^\/api\//],
        cleanupOutdatedCaches: true,
        // A new build takes over at once and controls the open page (its data lives in IndexedDB).
        clientsClaim: true,
        skipWaiting: true,
        maximumFileSizeToCacheInBytes: 3 * 1024 * 1024,
      },
    }),
    // Each text asset (scripts, styles, the HTML, SVG, the web manifest) also written compressed, with brotli at
    // quality 11 and gzip at level 9, once at build time; the server hands those bytes to any browser that accepts
    // them (express-static-gzip in server/app.ts). Compressing on each request the server would have to use a quick
    // setting; the fonts and pictures are compressed formats already.
    compression({ algorithms: ["brotliCompress", "gzip"], threshold: 1024, logLevel: "silent" }),
  ],
  // Static files copied as they are (the app icons): inside src/, the agreed top level has no public/.
  publicDir: "src/public",
  build: { outDir: "dist/client", emptyOutDir: true, sourcemap: false, reportCompressedSize: true },
  server: {
    host: "127.0.0.1",
    port: Number(process.env.VITE_PORT ?? 5173),
    // changeOrigin stays false: the API's Origin check compares the browser's Origin with Host.
    proxy: { "/api": { target: `http://127.0.0.1:${process.env.PORT ?? 3000}`, changeOrigin: false } },
  },
  test: {
    include: ["tests/**/*.test.ts"],
    // The fault tests have their own part (`npm test -- faults`, tests/faults/vitest.config.ts).
    exclude: [...configDefaults.exclude, "tests/faults/**"],
    globalSetup: ["tests/setup/global-setup.ts"],
    testTimeout: 20000,
    hookTimeout: 60000,
    pool: "forks",
  },
}));
