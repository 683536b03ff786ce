/**
 * The app pool's waiting queue is bounded (server/db.ts `boundQueue`, DATABASE_POOL_MAX_WAITING): with every
 * connection busy and the queue full, a request is refused at once — 503 `db_unavailable` with Retry-After —
 * instead of waiting toward the 5 s acquire timeout; nothing answers 500, the process keeps serving, the
 * statements already admitted finish, and once the queue drains the same requests are served.
 */
import { sql } from "kysely";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { availableParallelism } from "node:os";
import {
  appPoolMax,
  createDb,
  databaseIsLocal,
  defaultMaxWaiting,
  defaultPoolMax,
  poolOf,
  refusedCheckouts,
  type Db,
} from "../../server/db";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

let tdb: TestDb;
let appDb: Db;
let server: TestServer;
let curator: Client;
let gate: pg.Client | undefined;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const MAX = 2;
const WAITING = 4;
const ACQUIRE_TIMEOUT = 30_000;
/** The advisory lock the busy statements wait on while the test holds it. */
const GATE = 7_155_015;

beforeAll(async () => {
  tdb = await createTestDb();
  fx = await makeCrew(tdb.db);
  // The app's own pool, small so the test can fill it: 2 connections, 4 waiters at most. The acquire timeout is long
  // (30 s) so a request that queued instead of being refused could not pass for a refusal by timing out.
  appDb = createDb(tdb.url, { max: MAX, maxWaiting: WAITING, connectionTimeoutMs: ACQUIRE_TIMEOUT });
  server = await startTestServer({ db: appDb });
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
});

afterAll(async () => {
  await gate?.end().catch(() => {}); // its session's end lets go of the lock, should a check have failed first
  await server?.close();
  await appDb?.destroy();
  await tdb?.drop();
});

const until = async (what: string, ok: () => boolean) => {
  for (let i = 0; i < 200 && !ok(); i++) await new Promise((r) => setTimeout(r, 10));
  if (!ok()) throw new Error(`timed out waiting for ${what}`);
};

describe("a full waiting queue for the database pool", () => {
  it("is answered 503 db_unavailable with Retry-After at once, never 500, and service resumes once it drains", async () => {
    const pool = poolOf(appDb)!;
    const register = `/api/sites/${fx.siteId}/defects`;
    expect((await curator.get(register)).status).toBe(200);

    // Every connection busy until the test lets go (each statement waits on an advisory lock the test holds on a
    // connection of its own; transaction-scoped, so it leaves nothing on the pooled connection), then the queue
    // filled to its bound with statements that will be served. No sleep: a loaded machine cannot end the busy
    // statements before the refusals are read.
    gate = new pg.Client({ connectionString: tdb.url });
    await gate.connect();
    await gate.query("SELECT pg_advisory_lock($1)", [GATE]);
    const busy = Array.from({ length: MAX }, () => sql`SELECT pg_advisory_xact_lock_shared(${GATE})`.execute(appDb));
    await until("both connections to be busy", () => pool.totalCount === MAX && pool.idleCount === 0);
    const admitted = Array.from({ length: WAITING }, () => sql<{ one: number }>`SELECT 1 AS one`.execute(appDb));
    await until("the queue to be full", () => pool.waitingCount === WAITING);

    const refusedBefore = refusedCheckouts();
    const started = performance.now();
    const answers = await Promise.all(Array.from({ length: 12 }, () => curator.get(register)));
    const took = performance.now() - started;
    for (const r of answers) {
      expect(r.status).toBe(503);
      expect(r.body.error.code).toBe("db_unavailable");
      expect(r.headers.get("retry-after")).toBe("1");
      expect(r.body.error.requestId).toBeTruthy();
    }
    // Refused at once, by the bound: every refusal counted, none of them joined the queue (the admitted ones still
    // wait, none dropped), all answered while every connection was still held, and far sooner than a wait for a
    // connection would end (the acquire timeout). The refusal is shown by the pool's counters, not by a tight
    // wall-clock bound (it was 1.5 s against a 2 s sleep: 12 session checks and error answers on a shared machine
    // under heavy load could miss it, or outlast the sleep, which said nothing about the queue).
    expect(refusedCheckouts() - refusedBefore).toBeGreaterThanOrEqual(12);
    expect(pool.waitingCount).toBe(WAITING);
    expect(pool.idleCount).toBe(0);
    expect(took).toBeLessThan(ACQUIRE_TIMEOUT / 2);
    // The process is up and answering what needs no database.
    expect((await curator.get("/api/health/live")).status).toBe(200);
    // Health asks on the probes' own connection: the database answers. Readiness says what a caller sees now (the
    // app's pool refuses) without failing: under load an instance stays in rotation (see server/health.ts).
    const health = await curator.get("/api/health");
    expect(health.status).toBe(200);
    expect(health.body).toEqual({ ok: true, db: "up" });
    const full = await curator.get("/api/health/ready");
    expect(full.status).toBe(200);
    expect(full.body).toMatchObject({ ok: true, db: "up", pool: "full" });

    // Let go: what was admitted is served; then the same request is served again.
    await gate.query("SELECT pg_advisory_unlock($1)", [GATE]);
    await Promise.all(busy);
    expect((await Promise.all(admitted)).map((r) => r.rows[0].one)).toEqual(Array(WAITING).fill(1));
    const after = await curator.get(register);
    expect(after.status).toBe(200);
    expect(after.body.rows).toBeInstanceOf(Array);
    expect((await curator.get("/api/health/ready")).body).toMatchObject({ pool: "accepting" });
  });

  it("has a default of ten waiting statements per connection, never fewer than the issue's 50 clients need (100)", () => {
    expect(defaultMaxWaiting(10)).toBe(100);
    expect(defaultMaxWaiting(4)).toBe(100);
    expect(defaultMaxWaiting(20)).toBe(200);
    const pool = poolOf(createDb(tdb.url, 7))!;
    expect(pool.options.max).toBe(7);
    void pool.end();
  });

  it("is sized by default at twice the cores for a database on this machine (2 to 10), 10 for one elsewhere", () => {
    const here = "postgres://u:p@127.0.0.1:5432/d";
    expect(defaultPoolMax(here, 1)).toBe(2);
    expect(defaultPoolMax(here, 2)).toBe(4);
    expect(defaultPoolMax(here, 3)).toBe(6);
    expect(defaultPoolMax(here, 5)).toBe(10);
    expect(defaultPoolMax(here, 64)).toBe(10);
    for (const local of [
      "postgres://u@localhost/d",
      "postgres://u@[::1]:5432/d",
      "postgres:///d?host=/var/run/postgresql",
    ])
      expect(databaseIsLocal(local)).toBe(true);
    for (const remote of ["postgres://u:p@db.yard.example:5432/d", "postgres://u@10.0.0.5/d", "not a url"]) {
      expect(databaseIsLocal(remote)).toBe(false);
      expect(defaultPoolMax(remote, 2)).toBe(10);
    }
    // The app's pool on the test database (127.0.0.1) takes that default unless DATABASE_POOL_MAX says otherwise.
    const size = process.env.DATABASE_POOL_MAX ? Number(process.env.DATABASE_POOL_MAX) : defaultPoolMax(tdb.url);
    expect(defaultPoolMax(tdb.url)).toBe(Math.min(10, Math.max(2, 2 * availableParallelism())));
    expect(appPoolMax(tdb.url)).toBe(size);
    const pool = poolOf(createDb(tdb.url))!;
    expect(pool.options.max).toBe(size);
    void pool.end();
  });
});
