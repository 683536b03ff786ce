// Tideline's entry point for every npm script. It is plain JavaScript on purpose: it
// runs before dependencies are installed (a fresh clone has no node_modules, so no
// TypeScript runner yet). It installs what the machine lacks, then hands over to the
// TypeScript command named by the first argument.
import { spawn, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, readFileSync, writeFileSync, readdirSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath } from "node:url";
import { aptGet } from "./apt.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const isRoot = typeof process.getuid === "function" && process.getuid() === 0;

const commands = {
  start: { script: "server/cli/start.ts", needs: ["deps", "postgres"] },
  dev: { script: "server/cli/dev.ts", needs: ["deps", "postgres"] },
  test: { script: "tests/run-all.ts", needs: ["deps", "postgres", "chromium", "poppler", "libreoffice"] },
  migrate: { script: "server/cli/migrate.ts", needs: ["deps", "postgres"] },
  "user:create": { script: "server/cli/user-create.ts", needs: ["deps", "postgres"] },
  bench: { script: "server/cli/bench.ts", needs: ["deps", "postgres", "chromium", "poppler"] },
  worker: { script: "server/cli/worker.ts", needs: ["deps", "postgres"] },
  "mail:weekly": { script: "server/cli/weekly-summary.ts", needs: ["deps", "postgres"] },
  "photos:cleanup": { script: "server/cli/photos-cleanup.ts", needs: ["deps", "postgres"] },
  backup: { script: "server/cli/backup.ts", needs: ["deps", "postgres"] },
  restore: { script: "server/cli/restore.ts", needs: ["deps", "postgres"] },
  "rts:overdue": { script: "server/cli/rts-overdue.ts", needs: ["deps", "postgres"] },
};

function say(msg) {
  process.stdout.write(`[tideline] ${msg}\n`);
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: "inherit", cwd: root, ...opts });
  if (r.error) throw r.error;
  return r.status ?? 1;
}

function lockHash() {
  const lock = join(root, "package-lock.json");
  return createHash("sha256")
    .update(readFileSync(existsSync(lock) ? lock : join(root, "package.json")))
    .digest("hex");
}

function ensureDeps() {
  const stamp = join(root, "node_modules", ".tideline-lock-hash");
  const want = lockHash();
  if (existsSync(stamp) && readFileSync(stamp, "utf8").trim() === want) return;
  say("installing npm dependencies (npm ci)…");
  if (run("npm", ["ci", "--no-audit", "--no-fund"]) !== 0) {
    say("npm ci failed; see the output above.");
    process.exit(1);
  }
  writeFileSync(stamp, want + "\n");
}

function findPgBin() {
  const base = "/usr/lib/postgresql";
  if (!existsSync(base)) return null;
  const versions = readdirSync(base).filter((v) => existsSync(join(base, v, "bin", "initdb")));
  versions.sort((a, b) => Number(b) - Number(a));
  return versions.length ? join(base, versions[0], "bin") : null;
}

function aptInstall(pkgs, why) {
  if (!isRoot) {
    say(`${why} is missing. Install it with: sudo apt-get install -y ${pkgs.join(" ")}`);
    process.exit(1);
  }
  say(`installing ${pkgs.join(", ")} from Debian's packages (${why})…`);
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  if (
    aptGet(["update", "-qq"], { cwd: root, env }) !== 0 ||
    aptGet(["install", "-y", "-qq", ...pkgs], { cwd: root, env }) !== 0
  ) {
    say(`apt-get could not install ${pkgs.join(" ")}.`);
    process.exit(1);
  }
}

function ensurePostgres() {
  if (process.env.DATABASE_URL && process.env.TIDELINE_EMBEDDED_PG !== "1") return;
  if (!findPgBin()) aptInstall(["postgresql"], "the PostgreSQL server");
  if (!findPgBin()) {
    say("PostgreSQL was installed but initdb was not found under /usr/lib/postgresql/*/bin.");
    process.exit(1);
  }
}

function ensureChromium() {
  if (process.env.CHROMIUM_PATH && existsSync(process.env.CHROMIUM_PATH)) return;
  if (existsSync("/usr/bin/chromium")) return;
  aptInstall(["chromium"], "Debian's chromium for the end-to-end tests");
}

/** pdftotext, pdftoppm and pdfinfo: the report and label tests read Tideline's PDFs with them. */
function ensurePoppler() {
  if (existsSync("/usr/bin/pdftotext") && existsSync("/usr/bin/pdftoppm")) return;
  aptInstall(["poppler-utils"], "Debian's poppler-utils (pdftotext, pdftoppm) for the report tests");
}

/** The spreadsheet round-trip test opens exports in a real spreadsheet program (headless LibreOffice Calc). */
function ensureLibreOffice() {
  if (existsSync("/usr/bin/soffice")) return;
  aptInstall(
    ["--no-install-recommends", "libreoffice-calc-nogui"],
    "Debian's libreoffice-calc-nogui (headless Calc) for the spreadsheet round-trip test",
  );
}

const name = process.argv[2];
const command = commands[name];
if (!command) {
  say(`unknown command '${name}'. One of: ${Object.keys(commands).join(", ")}`);
  process.exit(2);
}
if (command.needs.includes("deps")) ensureDeps();
if (command.needs.includes("postgres")) ensurePostgres();
if (command.needs.includes("chromium")) ensureChromium();
if (command.needs.includes("poppler")) ensurePoppler();
if (command.needs.includes("libreoffice")) ensureLibreOffice();

// `node --import tsx` rather than the tsx command: the command relays SIGTERM to its child and
// SIGKILLs it unless the child confirms within 30 ms, which cut graceful shutdowns short.
const child = spawn(process.execPath, ["--import", "tsx", command.script, ...process.argv.slice(3)], {
  stdio: "inherit",
  cwd: root,
  env: process.env,
});
// Ctrl-C reaches the whole process group; the child shuts the database down cleanly,
// so this wrapper waits for it instead of dying first. Other signals are passed on.
for (const sig of ["SIGINT", "SIGTERM", "SIGHUP"]) {
  process.on(sig, () => {
    if (sig !== "SIGINT") child.kill(sig);
  });
}
child.on("exit", (code, signal) => process.exit(code ?? (signal ? 130 : 1)));
