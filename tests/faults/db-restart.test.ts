/**
 * The database stops (`pg_ctl stop -m fast`) or
 * its postmaster is killed (-9) in the middle of a burst of writes. The real server runs
 * as its own process (`server/index.ts` with DATABASE_URL) against a throw-away cluster
 * of this file's own (.data/pg-faults on a free port), never the shared test cluster.
 * Expected: the process survives, every write it acknowledged (201) is in the database
 * afterwards, the ones caught in flight get 503, health says "down" while the database
 * is away, and writes are served again once it is back.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { readFileSync } from "node:fs";
import { request } from "node:http";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { APP_ROLE, ensureDatabase, pgCtl, projectRoot, startCluster, type Cluster } from "../../db/pg";
import { migrateToLatest } from "../../db/migrate";
import { createDb, MAINTENANCE_DB_OPTIONS } from "../../server/db";
import { makeCrew } from "../helpers/fixtures";
import { Client } from "../helpers/http";
import { freePort, sleep, waitFor } from "./helpers";

const DATABASE = "tideline_faults";
let cluster: Cluster;
let pgPort: number;
let url: string;
let child: ChildProcess;
let exited: { code: number | null; signal: string | null } | null = null;
let serverLog = "";
let base: string;
let siteId: string;
let curator: Client;

async function startDatabase() {
  // After a kill -9 the old backends take a moment to notice and leave; start may need a retry.
  for (let i = 0; ; i++) {
    try {
      cluster = await startCluster({ name: "pg-faults", port: pgPort, durable: true });
      return;
    } catch (e) {
      if (i >= 20) throw e;
      await sleep(500);
    }
  }
}

beforeAll(async () => {
  pgPort = await freePort();
  await startDatabase();
  await ensureDatabase(cluster.adminUrlFor("postgres"), DATABASE, { fresh: true, owner: APP_ROLE });
  url = cluster.urlFor(DATABASE);
  const setup = createDb(url, MAINTENANCE_DB_OPTIONS);
  await migrateToLatest(setup);
  const fx = await makeCrew(setup);
  siteId = fx.siteId;
  await setup.destroy();

  const port = await freePort();
  base = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: url, PORT: String(port), PUBLIC_URL: base };
  delete env.SMTP_URL;
  child = spawn(process.execPath, [join(projectRoot, "node_modules", "tsx", "dist", "cli.mjs"), "server/index.ts"], {
    cwd: projectRoot,
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => (serverLog += d));
  child.stderr!.on("data", (d) => (serverLog += d));
  child.on("exit", (code, signal) => (exited = { code, signal }));
  await waitFor(
    "the server to answer /api/health",
    async () => (await fetch(`${base}/api/health`)).status === 200,
    90_000,
    250,
  );
  curator = new Client(base);
  await curator.signIn(fx.crew.curator.email);
});

afterAll(async () => {
  if (child && !exited) {
    child.kill("SIGTERM");
    await Promise.race([new Promise((r) => child.once("exit", r)), sleep(5000)]);
  }
  pgCtl(cluster.dataDir, ["-m", "immediate", "-w", "stop"]);
});

interface Burst {
  acked: string[];
  statuses: Map<number, number>;
  failures: string[];
  stop(): Promise<void>;
}

/**
 * One POST on a connection of its own (no keep-alive): a reused idle connection that the
 * server closes at the same moment would fail on the client's side and blur the count.
 */
function postFresh(path: string, body: unknown): Promise<number> {
  return new Promise((resolve, reject) => {
    const payload = JSON.stringify(body);
    const req = request(
      base + path,
      {
        method: "POST",
        agent: false,
        headers: {
          "content-type": "application/json",
          "content-length": Buffer.byteLength(payload),
          origin: base,
          cookie: curator.cookie,
          connection: "close",
        },
      },
      (res) => {
        res.resume();
        res.on("end", () => resolve(res.statusCode ?? 0));
        res.on("error", reject);
      },
    );
    req.on("error", reject);
    req.end(payload);
  });
}

/** Eight writers posting flood events as fast as the server answers, until stopped. */
function writeBurst(tag: string): Burst {
  const acked: string[] = [];
  const statuses = new Map<number, number>();
  const failures: string[] = [];
  let running = true;
  const writers = Array.from({ length: 8 }, async (_, w) => {
    for (let i = 0; running; i++) {
      const notes = `${tag}-${w}-${i}`;
      let status: number;
      try {
        status = await postFresh(`/api/sites/${siteId}/flood-events`, {
          occurredOn: "2026-11-20",
          waterType: "salt",
          notes,
        });
      } catch (e) {
        status = -1; // the connection itself failed: the server would have to be gone
        failures.push(String((e as Error & { cause?: Error }).cause ?? e));
      }
      statuses.set(status, (statuses.get(status) ?? 0) + 1);
      if (status === 201) acked.push(notes);
      if (status !== 201) await sleep(50);
    }
  });
  return {
    acked,
    statuses,
    failures,
    stop: async () => {
      running = false;
      await Promise.all(writers);
    },
  };
}

const health = async () => {
  const r = await fetch(`${base}/api/health`);
  return { status: r.status, body: (await r.json()) as { db?: string } };
};

async function storedNotes(): Promise<Set<string>> {
  const db = createDb(url, MAINTENANCE_DB_OPTIONS);
  try {
    const rows = await db.selectFrom("floodEvents").select("notes").where("siteId", "=", siteId).execute();
    return new Set(rows.map((r) => r.notes));
  } finally {
    await db.destroy();
  }
}

async function outageUnderWrites(tag: string, takeDown: () => void) {
  const burst = writeBurst(tag);
  await waitFor("some writes acknowledged", async () => burst.acked.length >= 20, 60_000);
  takeDown();
  await waitFor(
    "health to report the database down",
    async () => {
      const h = await health();
      return h.status === 503 && h.body.db === "down";
    },
    60_000,
    200,
  );
  await sleep(1000); // writers keep knocking on a database that is not there
  await startDatabase();
  await waitFor("health to report the database up", async () => (await health()).body.db === "up", 60_000, 200);
  const ackedBefore = burst.acked.length;
  await waitFor(
    "writes acknowledged again after the restart",
    async () => burst.acked.length >= ackedBefore + 20,
    60_000,
  );
  await burst.stop();

  expect(exited, serverLog.slice(-3000)).toBeNull();
  // Acknowledged, or refused with 503 while the database was away: nothing else.
  expect([...burst.statuses.keys()].sort(), JSON.stringify([...burst.statuses]) + burst.failures.join("; ")).toEqual([
    201, 503,
  ]);
  const stored = await storedNotes();
  const lost = burst.acked.filter((n) => !stored.has(n));
  expect(lost).toEqual([]);
  return burst;
}

describe("the database goes away under a write burst", () => {
  it("pg_ctl stop -m fast, then start: the server survives, acknowledged writes are all stored, in-flight ones got 503", async () => {
    await outageUnderWrites("fast", () => {
      const r = pgCtl(cluster.dataDir, ["-m", "fast", "-w", "stop"]);
      expect(r.status).toBe(0);
    });
  });

  it("kill -9 of the postmaster, then start (crash recovery): the same", async () => {
    await outageUnderWrites("kill9", () => {
      const pid = Number(readFileSync(join(cluster.dataDir, "postmaster.pid"), "utf8").split("\n")[0]);
      process.kill(pid, "SIGKILL");
    });
  });

  it("a 503 during the outage carries a clear message and Retry-After", async () => {
    pgCtl(cluster.dataDir, ["-m", "fast", "-w", "stop"]);
    try {
      const r = await curator.post(`/api/sites/${siteId}/flood-events`, {
        occurredOn: "2026-11-20",
        waterType: "salt",
        notes: "while down",
      });
      expect(r.status).toBe(503);
      expect(r.body.error).toMatchObject({ code: "db_unavailable" });
      expect(r.body.error.message).toMatch(/try again/i);
      expect(r.headers.get("retry-after")).toBe("5");
    } finally {
      await startDatabase();
    }
    await waitFor("health up", async () => (await health()).status === 200, 60_000, 200);
    expect(exited).toBeNull();
  });
});
