import { configDefaults, defineConfig, type Plugin } from "vitest/config";
import react from "@vitejs/plugin-react";

/**
 * Preloads the two fonts every page paints with (body text and the mono designations on tiles), so
 * the browser fetches them with the HTML instead of discovering them late in the CSS (issue 15).
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

// One config for the client build and for vitest. The API runs separately (server/);
// in dev, Vite proxies /api to it.
export default defineConfig({
  plugins: [
    react(),
    preloadFonts([/atkinson-hyperlegible-next-latin-wght-normal/, /jetbrains-mono-latin-wght-normal/]),
  ],
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
});
