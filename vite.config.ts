import { configDefaults, defineConfig } from "vitest/config";
import react from "@vitejs/plugin-react";

// One config for the client build and for vitest. The API runs separately (server/);
// in dev, Vite proxies /api to it.
export default defineConfig({
  plugins: [react()],
  build: { outDir: "dist/client", emptyOutDir: true, sourcemap: false, reportCompressedSize: true },
  server: {
    host: "127.0.0.1",
    port: Number(process.env.VITE_PORT ?? 5173),
    // changeOrigin stays false: the API's Origin check compares the browser's Origin with Host.
    proxy: { "/api": { target: `http://127.0.0.1:${process.env.PORT ?? 3000}`, changeOrigin: false } },
  },
  test: {
    include: ["tests/**/*.test.ts"],
    // The fault tests have their own part (`npm test -- faults`, vitest.faults.config.ts).
    exclude: [...configDefaults.exclude, "tests/faults/**"],
    globalSetup: ["tests/setup/global-setup.ts"],
    testTimeout: 20000,
    hookTimeout: 60000,
    pool: "forks",
  },
});
