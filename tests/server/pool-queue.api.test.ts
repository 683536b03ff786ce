/**
 * The app pool's waiting queue is bounded (server/db.ts `boundQueue`, DATABASE_POOL_MAX_WAITING): with every
 * connection busy and the queue full, a request is refused at once — 503 `db_unavailable` with Retry-After —
 * instead of waiting toward the 5 s acquire timeout; nothing answers 500, the process keeps serving, the
 * statements already admitted finish, and once the queue drains the same requests are served.
 */
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, defaultMaxWaiting, poolOf, refusedCheckouts, type Db } from "../../server/db";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";

let tdb: TestDb;
let appDb: Db;
let server: TestServer;
let curator: Client;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const MAX = 2;
const WAITING = 4;

beforeAll(async () => {
  tdb = await createTestDb();
  fx = await makeCrew(tdb.db);
  // The app's own pool, small so the test can fill it: 2 connections, 4 waiters at most, the usual 5 s timeout.
  appDb = createDb(tdb.url, { max: MAX, maxWaiting: WAITING, connectionTimeoutMs: 5_000 });
  server = await startTestServer({ db: appDb });
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
});

afterAll(async () => {
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

    // Every connection busy for 2 s, then the queue filled to its bound with statements that will be served.
    const busy = Array.from({ length: MAX }, () => sql`SELECT pg_sleep(2)`.execute(appDb));
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
    // Refused at once: well before the busy statements end (2 s), let alone the acquire timeout (5 s).
    expect(took).toBeLessThan(1_500);
    expect(refusedCheckouts() - refusedBefore).toBeGreaterThanOrEqual(12);
    expect(pool.waitingCount).toBe(WAITING); // the admitted ones still wait; none was dropped
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

    // What was admitted is served; then the same request is served again.
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
});
