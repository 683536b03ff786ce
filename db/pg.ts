/**
 * The embedded PostgreSQL: a project-local cluster of Debian's server, listening on
 * 127.0.0.1 only. PostgreSQL refuses to run as root, so as root the cluster runs as
 * the `postgres` system user (created if absent) and its folder belongs to that user.
 * A real deployment sets DATABASE_URL and never comes here.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { chmodSync, existsSync, mkdirSync, readdirSync, chownSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import pg from "pg";

export const projectRoot = resolve(import.meta.dirname, "..");
const isRoot = process.getuid?.() === 0;

export interface ClusterOptions {
  /** Folder name under .data (e.g. "pg" or "pg-test"). */
  name: string;
  port: number;
  /** Throw-away clusters trade durability for speed (never for real data). */
  durable: boolean;
}

export interface Cluster {
  port: number;
  dataDir: string;
  urlFor(database: string): string;
  /** Stops the server if this process started it. */
  stop(): void;
}

export function pgBin(): string {
  const base = "/usr/lib/postgresql";
  const versions = existsSync(base) ? readdirSync(base).filter((v) => existsSync(join(base, v, "bin", "initdb"))) : [];
  versions.sort((a, b) => Number(b) - Number(a));
  if (!versions.length)
    throw new Error(
      "PostgreSQL server not found under /usr/lib/postgresql; run `npm start` as root or apt-get install postgresql",
    );
  return join(base, versions[0], "bin");
}

function asPostgres(cmd: string, args: string[], quiet = false) {
  const [file, argv] = isRoot ? ["runuser", ["-u", "postgres", "--", cmd, ...args]] : [cmd, args];
  return spawnSync(file, argv, { cwd: "/", encoding: "utf8", stdio: quiet ? "pipe" : ["ignore", "pipe", "pipe"] });
}

function ensurePostgresUser() {
  if (!isRoot) return;
  if (spawnSync("id", ["-u", "postgres"], { stdio: "ignore" }).status === 0) return;
  execFileSync("useradd", ["--system", "--user-group", "--no-create-home", "--shell", "/usr/sbin/nologin", "postgres"]);
}

/** The data folder: under the project's .data, or under /tmp when postgres cannot reach it. */
function dataDirFor(name: string): string {
  const preferred = join(projectRoot, ".data", name);
  mkdirSync(dirname(preferred), { recursive: true });
  if (!isRoot) return preferred;
  chmodSync(dirname(preferred), 0o755);
  if (asPostgres("test", ["-x", dirname(preferred)], true).status === 0) return preferred;
  const hash = createHash("sha256").update(projectRoot).digest("hex").slice(0, 10);
  const fallback = join("/tmp", `tideline-${hash}`, name);
  mkdirSync(dirname(fallback), { recursive: true });
  chmodSync(dirname(fallback), 0o755);
  console.log(`[tideline] the postgres user cannot reach ${dirname(preferred)}; keeping the database in ${fallback}`);
  return fallback;
}

function running(bin: string, dataDir: string) {
  return (
    existsSync(join(dataDir, "postmaster.pid")) &&
    asPostgres(join(bin, "pg_ctl"), ["-D", dataDir, "status"], true).status === 0
  );
}

async function waitReady(port: number) {
  for (let i = 0; i < 100; i++) {
    const c = new pg.Client({ host: "127.0.0.1", port, user: "postgres", database: "postgres" });
    try {
      await c.connect();
      await c.end();
      return;
    } catch {
      await new Promise((r) => setTimeout(r, 150));
    }
  }
  throw new Error(`PostgreSQL did not become ready on 127.0.0.1:${port}`);
}

export async function startCluster(opts: ClusterOptions): Promise<Cluster> {
  const bin = pgBin();
  ensurePostgresUser();
  const dataDir = dataDirFor(opts.name);
  if (!existsSync(join(dataDir, "PG_VERSION"))) {
    mkdirSync(dataDir, { recursive: true });
    chmodSync(dataDir, 0o700);
    if (isRoot) chownPostgres(dataDir);
    const r = asPostgres(join(bin, "initdb"), [
      "-D",
      dataDir,
      "-U",
      "postgres",
      "-A",
      "trust",
      "-E",
      "UTF8",
      "--locale=C.UTF-8",
    ]);
    if (r.status !== 0) throw new Error(`initdb failed: ${r.stderr || r.stdout}`);
  }
  let startedHere = false;
  if (!running(bin, dataDir)) {
    const settings = [
      "-c listen_addresses=127.0.0.1",
      `-p ${opts.port}`,
      `-c unix_socket_directories=${dataDir}`,
      ...(opts.durable ? [] : ["-c fsync=off", "-c synchronous_commit=off", "-c full_page_writes=off"]),
    ].join(" ");
    const r = asPostgres(join(bin, "pg_ctl"), [
      "-D",
      dataDir,
      "-l",
      join(dataDir, "startup.log"),
      "-w",
      "-t",
      "60",
      "-o",
      settings,
      "start",
    ]);
    if (r.status !== 0)
      throw new Error(`PostgreSQL did not start (see ${join(dataDir, "startup.log")}): ${r.stderr || r.stdout}`);
    startedHere = true;
  }
  await waitReady(opts.port);
  let stopped = false;
  return {
    port: opts.port,
    dataDir,
    urlFor: (database) => `postgres://postgres@127.0.0.1:${opts.port}/${database}`,
    stop() {
      if (!startedHere || stopped) return;
      stopped = true;
      asPostgres(join(bin, "pg_ctl"), ["-D", dataDir, "-m", "fast", "-w", "stop"], true);
    },
  };
}

/** Runs pg_ctl on a cluster folder as the user that owns it (fault tests stop and start their own cluster). */
export function pgCtl(dataDir: string, args: string[]) {
  return asPostgres(join(pgBin(), "pg_ctl"), ["-D", dataDir, ...args], true);
}

function chownPostgres(dir: string) {
  const uid = Number(execFileSync("id", ["-u", "postgres"]).toString());
  const gid = Number(execFileSync("id", ["-g", "postgres"]).toString());
  chownSync(dir, uid, gid);
}

/** Creates the database if it does not exist (or drops and recreates it when fresh). */
export async function ensureDatabase(
  adminUrl: string,
  database: string,
  opts: { fresh?: boolean; template?: string } = {},
) {
  const c = new pg.Client({ connectionString: adminUrl });
  await c.connect();
  try {
    const ident = `"${database.replace(/"/g, '""')}"`;
    if (opts.fresh) await c.query(`DROP DATABASE IF EXISTS ${ident} WITH (FORCE)`);
    const { rowCount } = await c.query("SELECT 1 FROM pg_database WHERE datname = $1", [database]);
    if (!rowCount) {
      const tmpl = opts.template ? ` TEMPLATE "${opts.template.replace(/"/g, '""')}"` : "";
      await c.query(`CREATE DATABASE ${ident}${tmpl}`);
    }
  } finally {
    await c.end();
  }
}
