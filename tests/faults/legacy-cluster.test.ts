/**
 * An embedded cluster made by an earlier version (`initdb -A trust`:
 * anyone on the machine signs in as the superuser, and the app's tables belong to it)
 * keeps working after the change to password sign-in and an app role of its own. On its
 * next start, db/pg.ts gives the superuser a password, creates the app's role, rewrites
 * pg_hba.conf (scram-sha-256 only) and reloads it; ensureDatabase hands the app's database
 * and everything in it over to the app's role. Then the data is all there, the app (as its
 * own role) migrates, writes and runs its job queue, and a sign-in without the password is
 * refused. Its own throw-away cluster (.data/pg-legacy on a free port).
 */
import { existsSync, rmSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import {
  APP_ROLE,
  asClusterUser,
  dataDirFor,
  ensureDatabase,
  giveToClusterUser,
  passwordsFile,
  pgCtl,
  startCluster,
  type Cluster,
} from "../../db/pg";
import { migrateToLatest } from "../../db/migrate";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../../server/db";
import { backup, restore } from "../../server/backup";
import { createJobs } from "../../server/jobs";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { makeCrew } from "../helpers/fixtures";
import { freePort } from "./helpers";

const NAME = "pg-legacy";
const DATABASE = "tideline_legacy";
let dataDir: string;
let port: number;
let cluster: Cluster | undefined;
let sitesBefore = 0;

function startOld() {
  const settings = `-c listen_addresses=127.0.0.1 -p ${port} -c unix_socket_directories=${dataDir} -c fsync=off`;
  const r = pgCtl(dataDir, ["-l", join(dataDir, "startup.log"), "-w", "-t", "60", "-o", settings, "start"]);
  if (r.status !== 0) throw new Error(`old cluster did not start: ${r.stderr || r.stdout}`);
}

beforeAll(async () => {
  port = await freePort();
  dataDir = dataDirFor(NAME);
  if (existsSync(join(dataDir, "postmaster.pid"))) pgCtl(dataDir, ["-m", "immediate", "-w", "stop"]);
  rmSync(dataDir, { recursive: true, force: true });
  rmSync(passwordsFile(NAME), { force: true });
  // The cluster as earlier versions made it: trust sign-in, the app as the superuser.
  giveToClusterUser(dataDir);
  const init = asClusterUser("initdb", [
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
  expect(init.status, init.stderr).toBe(0);
  startOld();
  const oldAdmin = `postgres://postgres@127.0.0.1:${port}/postgres`;
  await ensureDatabase(oldAdmin, DATABASE);
  const old = createDb(`postgres://postgres@127.0.0.1:${port}/${DATABASE}`, MAINTENANCE_DB_OPTIONS);
  await migrateToLatest(old);
  await makeCrew(old);
  const jobs = createJobs({ db: old, work: false });
  await jobs.start();
  await jobs.stop(1000);
  sitesBefore = Number(
    (
      await old
        .selectFrom("sites")
        .select((e) => e.fn.countAll().as("n"))
        .executeTakeFirstOrThrow()
    ).n,
  );
  await old.destroy();
  const stop = pgCtl(dataDir, ["-m", "fast", "-w", "stop"]);
  expect(stop.status).toBe(0);
});

afterAll(async () => {
  cluster?.stop();
  if (existsSync(join(dataDir, "postmaster.pid"))) pgCtl(dataDir, ["-m", "immediate", "-w", "stop"]);
  rmSync(dataDir, { recursive: true, force: true });
  rmSync(passwordsFile(NAME), { force: true });
});

async function signIn(config: pg.ClientConfig) {
  const c = new pg.Client({ host: "127.0.0.1", port, database: "postgres", ...config });
  try {
    await c.connect();
    return "ok";
  } catch (e) {
    return (e as { code?: string }).code ?? (e as Error).message;
  } finally {
    await c.end().catch(() => {});
  }
}

describe("a cluster made before password sign-in", () => {
  it("is converted on its next start: data kept, the app runs as its own role, no sign-in without the password", async () => {
    // Before: anyone signs in as the superuser with any password.
    startOld();
    expect(await signIn({ user: "postgres", password: "anything" })).toBe("ok");
    pgCtl(dataDir, ["-m", "fast", "-w", "stop"]);

    cluster = await startCluster({ name: NAME, port, durable: false });
    await ensureDatabase(cluster.adminUrlFor("postgres"), DATABASE, { owner: APP_ROLE });

    expect(await signIn({ user: "postgres", password: "anything" })).toBe("28P01");
    expect(await signIn({ user: APP_ROLE, password: "anything" })).toBe("28P01");

    const app = createDb(cluster.urlFor(DATABASE), MAINTENANCE_DB_OPTIONS);
    try {
      expect(await currentUser(cluster.urlFor(DATABASE))).toBe(APP_ROLE);
      const sites = await app
        .selectFrom("sites")
        .select((e) => e.fn.countAll().as("n"))
        .executeTakeFirstOrThrow();
      expect(Number(sites.n)).toBe(sitesBefore);
      expect(await migrateToLatest(app)).toEqual([]);
      await makeCrew(app); // inserts through every sequence and trigger the fixtures touch
      const jobs = createJobs({ db: app, work: false });
      await jobs.start();
      await jobs.stop(1000);
    } finally {
      await app.destroy();
    }
    // `npm run restore` as the app's role: pg_restore --clean drops and recreates the extensions too.
    const sitesNow = await count(cluster.urlFor(DATABASE), "sites");
    const work = await mkdtemp(join(tmpdir(), "tideline-legacy-"));
    try {
      const storage = new LocalDiskStorage(join(work, "photos"));
      const out = join(work, "backup.tar.gz");
      await backup({ databaseUrl: cluster.urlFor(DATABASE), storage, out });
      await restore({ databaseUrl: cluster.urlFor(DATABASE), storage, file: out });
    } finally {
      await rm(work, { recursive: true, force: true });
    }
    expect(await count(cluster.urlFor(DATABASE), "sites")).toBe(sitesNow);

    const admin = new pg.Client({ connectionString: cluster.adminUrlFor(DATABASE) });
    await admin.connect();
    const notOwned = await admin.query(
      `SELECT n.nspname, c.relname, pg_get_userbyid(c.relowner) AS owner FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
        WHERE c.relkind IN ('r', 'S', 'v', 'm', 'p') AND n.nspname IN ('public', 'pgboss') AND pg_get_userbyid(c.relowner) <> $1`,
      [APP_ROLE],
    );
    const schemas = await admin.query(
      "SELECT pg_get_userbyid(nspowner) AS owner FROM pg_namespace WHERE nspname = 'pgboss'",
    );
    const hba = await admin.query("SELECT DISTINCT auth_method FROM pg_hba_file_rules");
    await admin.end();
    expect(notOwned.rows).toEqual([]);
    expect(schemas.rows).toEqual([{ owner: APP_ROLE }]);
    expect(hba.rows).toEqual([{ auth_method: "scram-sha-256" }]);
  });

  it("a second start changes nothing and keeps working", async () => {
    cluster!.stop();
    cluster = await startCluster({ name: NAME, port, durable: false });
    await ensureDatabase(cluster.adminUrlFor("postgres"), DATABASE, { owner: APP_ROLE });
    expect(await signIn({ user: APP_ROLE, password: decodeURIComponent(new URL(cluster.urlFor("x")).password) })).toBe(
      "ok",
    );
  });
});

async function currentUser(url: string) {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    return (await c.query("SELECT current_user AS who")).rows[0].who;
  } finally {
    await c.end();
  }
}

async function count(url: string, table: string) {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    return (await c.query(`SELECT count(*) AS n FROM ${table}`)).rows[0].n as string;
  } finally {
    await c.end();
  }
}
