/**
 * Shared set-up for `npm start`, `npm run dev` and the test runner: database up,
 * migrations applied, demo loaded when empty, client built when its sources changed.
 */
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join, relative } from "node:path";
import { gzipSync } from "node:zlib";
import { openLocalDatabase, type LocalDatabase } from "../../db/local";
import { migrateToLatest } from "../../db/migrate";
import { isEmpty, seedDemo } from "../seed/demo";
import { projectRoot } from "../../db/pg";
import { createDb, MAINTENANCE_DB_OPTIONS, type Db } from "../db";

export async function prepareDatabase(
  mode: "dev" | "test",
  database?: string,
  opts: { seed?: boolean } = { seed: true },
): Promise<{ local: LocalDatabase; db: Db }> {
  const local = await openLocalDatabase(mode, database);
  // Migrations and the demo seed may run long statements: their own pool, without the app's timeouts.
  const setup = createDb(local.url, MAINTENANCE_DB_OPTIONS);
  try {
    const applied = await migrateToLatest(setup);
    if (applied.length) log(`migrations applied: ${applied.length}`);
    if (opts.seed !== false && (await isEmpty(setup))) {
      log("empty database: loading the demo scenario (MV Kestrel Lantern, invented)…");
      await seedDemo(setup);
    }
  } catch (e) {
    await setup.destroy();
    local.stop();
    throw e;
  }
  await setup.destroy();
  return { local, db: createDb(local.url) };
}

function sourceHash(): string {
  const h = createHash("sha256");
  const walk = (dir: string) => {
    for (const name of readdirSync(dir).sort()) {
      const p = join(dir, name);
      if (statSync(p).isDirectory()) walk(p);
      else h.update(relative(projectRoot, p)).update(readFileSync(p));
    }
  };
  for (const d of ["src", "fonts", "public"]) if (existsSync(join(projectRoot, d))) walk(join(projectRoot, d));
  for (const f of ["index.html", "vite.config.ts", "postcss.config.js", "package-lock.json"])
    if (existsSync(join(projectRoot, f))) h.update(readFileSync(join(projectRoot, f)));
  return h.digest("hex");
}

/** Builds dist/client with Vite unless the last build came from the same sources. */
export function buildClient(): string {
  const out = join(projectRoot, "dist", "client");
  const stampFile = join(projectRoot, "dist", ".client-source-hash");
  const want = sourceHash();
  if (existsSync(join(out, "index.html")) && existsSync(stampFile) && readFileSync(stampFile, "utf8") === want)
    return out;
  log("building the client (vite build)…");
  const r = spawnSync(join(projectRoot, "node_modules", ".bin", "vite"), ["build", "--logLevel", "warn"], {
    cwd: projectRoot,
    stdio: "inherit",
  });
  if (r.status !== 0) throw new Error("vite build failed");
  writeFileSync(stampFile, want);
  reportBundle(out);
  return out;
}

function reportBundle(out: string) {
  const html = readFileSync(join(out, "index.html"), "utf8");
  const initial = [...html.matchAll(/(?:src|href)="\/(assets\/[^"]+\.(?:js|css))"/g)].map((m) => m[1]);
  const gz = (f: string) => gzipSync(readFileSync(join(out, f))).length;
  const size = initial.reduce((n, f) => n + gz(f), 0);
  const js = initial.filter((f) => f.endsWith(".js")).reduce((n, f) => n + gz(f), 0);
  log(`initial client bundle (JS + CSS): ${(size / 1024).toFixed(1)} KiB gzip (${initial.join(", ")})`);
  // Issue 15's target is on the JavaScript alone; the fonts every page paints with are preloaded.
  const fonts = [...html.matchAll(/<link[^>]*rel="preload"[^>]*as="font"[^>]*>/g)].length;
  log(
    `initial JS ${(js / 1024).toFixed(1)} KiB gzip (target ≤ 150: ${js <= 150 * 1024 ? "met" : "NOT met"}); fonts preloaded: ${fonts}`,
  );
}

export function log(msg: string) {
  console.log(`[tideline] ${msg}`);
}
