/**
 * `npm test`: type check, vitest (unit + API against the real PostgreSQL), Playwright
 * in Debian's chromium. Ends with one plain line counted from the runners' JSON
 * reports, e.g. "Tests: 212 passed, 0 failed", and exits non-zero on any failure.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { projectRoot } from "../db/pg";
import { openLocalDatabase } from "../db/local";

const reports = join(projectRoot, ".data", "reports");
rmSync(reports, { recursive: true, force: true });
mkdirSync(reports, { recursive: true });
const bin = (name: string) => join(projectRoot, "node_modules", ".bin", name);
const only = process.argv.slice(2); // e.g. `npm test -- unit`, `-- faults` or `-- e2e`
const wants = (part: string) => only.length === 0 || only.includes(part);

function step(title: string, cmd: string, args: string[], env: Record<string, string> = {}) {
  console.log(`\n[tideline] ── ${title}`);
  const r = spawnSync(cmd, args, { cwd: projectRoot, stdio: "inherit", env: { ...process.env, ...env } });
  return r.status === 0;
}

// The throw-away cluster stays up for the whole run; vitest and the e2e server reuse it.
const cluster = await openLocalDatabase("test", "postgres");
let typecheckOk = true;
let passed = 0;
let failed = 0;
let skipped = 0;
try {
  if (wants("types")) {
    typecheckOk = step("type check (tsc --noEmit)", bin("tsc"), ["--noEmit", "-p", "tsconfig.json"]);
    // The formatter decides the layout of every file (.prettierrc.json); `npm run format` fixes it.
    if (!step("format check (prettier --check)", bin("prettier"), ["--check", ".", "--log-level", "warn"]))
      typecheckOk = false;
  }

  const vitest = (title: string, report: string, args: string[]) => {
    const out = join(reports, report);
    step(title, bin("vitest"), ["run", ...args, "--reporter=default", "--reporter=json", `--outputFile.json=${out}`], {
      NO_COLOR: "1",
    });
    if (existsSync(out)) {
      const v = JSON.parse(readFileSync(out, "utf8"));
      passed += v.numPassedTests;
      failed += v.numFailedTests;
      skipped += v.numPendingTests + v.numTodoTests;
      // A file that fails to load has no tests to count; count it as a failure.
      failed += v.testResults.filter(
        (f: { status: string; assertionResults: unknown[] }) =>
          f.status === "failed" && f.assertionResults.length === 0,
      ).length;
    } else failed += 1;
  };

  if (wants("unit")) vitest("vitest: domain and API tests", "vitest.json", []);

  // Database connections dropped, the database stopped under writes, readers that never read
  // (tests/faults, tests/faults/vitest.config.ts): a few minutes, one file at a time.
  if (wants("faults"))
    vitest("vitest: fault tests", "vitest-faults.json", ["--config", "tests/faults/vitest.config.ts"]);

  if (wants("e2e")) {
    const out = join(reports, "playwright.json");
    step("playwright: end-to-end in chromium", bin("playwright"), ["test", "--reporter=list,json"], {
      PLAYWRIGHT_JSON_OUTPUT_NAME: out,
    });
    if (existsSync(out)) {
      const p = JSON.parse(readFileSync(out, "utf8"));
      passed += p.stats.expected + p.stats.flaky;
      failed += p.stats.unexpected;
      skipped += p.stats.skipped;
      if (p.errors?.length && p.stats.expected + p.stats.unexpected === 0) failed += p.errors.length;
    } else failed += 1;
  }
} finally {
  cluster.stop();
}

if (!typecheckOk) console.log("[tideline] the type check or the format check failed (see above)");
const ok = typecheckOk && failed === 0 && passed > 0;
console.log(`Tests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(ok ? 0 : 1);
