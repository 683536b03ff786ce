/**
 * `npm test`: type check, vitest (unit + API against the real PostgreSQL), Playwright
 * in Debian's chromium. Ends with one plain line counted from the runners' JSON
 * reports, e.g. "Tests: 212 passed, 0 failed", and exits non-zero on any failure.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import { join, relative } from "node:path";
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
const failures: string[] = [];
const flaky: string[] = [];
interface VitestFile {
  name: string;
  status: string;
  message?: string;
  assertionResults: { status: string; title: string; ancestorTitles: string[] }[];
}
interface PwSuite {
  title: string;
  specs?: { title: string; file: string; tests?: { status: string }[] }[];
  suites?: PwSuite[];
}
try {
  if (wants("types")) {
    // Each part with its own libraries: the server has no DOM, the client no Node (tsconfig.{server,app,node}.json).
    for (const [part, config] of [
      ["server", "tsconfig.server.json"],
      ["client", "tsconfig.app.json"],
      ["e2e", "tsconfig.node.json"],
    ])
      if (!step(`type check, ${part} (tsc --noEmit)`, bin("tsc"), ["--noEmit", "-p", config])) typecheckOk = false;
    // The formatter decides the layout of every file (.prettierrc); `npm run format` fixes it.
    if (!step("format check (prettier --check)", bin("prettier"), ["--check", ".", "--log-level", "warn"]))
      typecheckOk = false;
    // Import boundaries between layers, React's hook rules, typescript-eslint (eslint.config.js).
    if (!step("lint (eslint)", bin("eslint"), ["."])) typecheckOk = false;
    // Unused files, exports and dependencies (package.json's "knip" key).
    if (!step("unused code and dependencies (knip)", bin("knip"), ["--no-config-hints"])) typecheckOk = false;
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
      for (const f of v.testResults as VitestFile[]) {
        const file = relative(process.cwd(), f.name);
        for (const a of f.assertionResults)
          if (a.status === "failed") failures.push(`${file} › ${[...a.ancestorTitles, a.title].join(" › ")}`);
        // A file that fails to load, or whose beforeAll/afterAll hook fails (its tests then show as
        // skipped), has no failed test to count: count the file as one failure.
        if (f.status === "failed" && !f.assertionResults.some((a) => a.status === "failed")) {
          failed += 1;
          failures.push(
            `${file} (the file, or a beforeAll/afterAll hook in it, failed${f.message ? `: ${f.message.split("\n")[0].slice(0, 200)}` : ""})`,
          );
        }
      }
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
      const walk = (suite: PwSuite, path: string[]) => {
        for (const spec of suite.specs ?? [])
          for (const t of spec.tests ?? [])
            if (t.status === "unexpected") failures.push(`${spec.file} › ${[...path, spec.title].join(" › ")}`);
            else if (t.status === "flaky") flaky.push(`${spec.file} › ${[...path, spec.title].join(" › ")}`);
        for (const s of suite.suites ?? []) walk(s, s.title && !s.title.endsWith(".ts") ? [...path, s.title] : path);
      };
      for (const s of p.suites ?? []) walk(s, []);
      skipped += p.stats.skipped;
      if (p.errors?.length && p.stats.expected + p.stats.unexpected === 0) failed += p.errors.length;
    } else failed += 1;
  }
} finally {
  cluster.stop();
}

if (!typecheckOk)
  console.log("[tideline] the type check, the format check, the lint or the unused-code check failed (see above)");
const ok = typecheckOk && failed === 0 && passed > 0;
// CI shows the end of the output: name what failed (and what passed only on a retry) just above the count.
if (flaky.length) console.log(`[tideline] passed on a retry (flaky):\n${flaky.map((f) => `  ~ ${f}`).join("\n")}`);
if (failures.length) console.log(`[tideline] failed:\n${failures.map((f) => `  ✗ ${f}`).join("\n")}`);
console.log(`Tests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(ok ? 0 : 1);
