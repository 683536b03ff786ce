import { defineConfig } from "@playwright/test";

const port = Number(process.env.E2E_PORT ?? 3100);

export default defineConfig({
  testDir: "e2e",
  fullyParallel: false,
  workers: 1,
  retries: process.env.CI ? 1 : 0,
  // Generous: the suite runs on a 2-core machine, often beside other work; a slow test is not a failing one.
  timeout: 90_000,
  expect: { timeout: 15_000 },
  outputDir: ".data/test-results",
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    browserName: "chromium",
    trace: "retain-on-failure",
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-dev-shm-usage",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--disable-quic",
      ],
    },
  },
  webServer: {
    command: "node node_modules/tsx/dist/cli.mjs server/cli/e2e-server.ts",
    url: `http://127.0.0.1:${port}/api/health`,
    reuseExistingServer: !process.env.CI,
    // Migrate, seed the demo and build the client: over two minutes on a loaded 2-core machine.
    timeout: 300_000,
    // Warnings and errors only: a line per request buried the test results at the end of CI's output.
    env: { PORT: String(port), LOG_LEVEL: process.env.E2E_LOG_LEVEL ?? "warn" },
    stdout: "pipe",
  },
});
