/**
 * The app's pool keeps DATABASE_POOL_MIN connections (default 2) open through a pause and closes the rest after
 * their idle time (server/db.ts `minIdle`, pg-pool's `min`): a connection opened after a pause costs its opening and a
 * cold catalog for its first statements' planning (DEVELOPERS.md "Connections kept open through a pause").
 * Tools' pools (MAINTENANCE_DB_OPTIONS) keep none.
 */
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, MAINTENANCE_DB_OPTIONS, poolOf, type Db } from "../../server/db";
import { createTestDb, type TestDb } from "../helpers/db";

let tdb: TestDb;
const opened: Db[] = [];

beforeAll(async () => {
  tdb = await createTestDb();
});
afterAll(async () => {
  await Promise.all(opened.map((d) => d.destroy()));
  await tdb.drop();
});

/** Opens `n` connections at once, then shortens the idle time (pg-pool reads it when a connection is released). */
async function busyThenIdle(db: Db, n: number) {
  const pool = poolOf(db)!;
  pool.options.idleTimeoutMillis = 150;
  await Promise.all(Array.from({ length: n }, () => sql`select pg_sleep(0.05)`.execute(db)));
  expect(pool.totalCount).toBe(n);
  await new Promise((r) => setTimeout(r, 600));
  return pool.totalCount;
}

describe("connections through a pause", () => {
  it("the app's pool keeps two open past the idle time and closes the others", async () => {
    const db = createDb(tdb.url, { max: 4 });
    opened.push(db);
    expect(await busyThenIdle(db, 4)).toBe(2);
    // The two kept are live: a statement after the pause runs on one without opening another.
    await sql`select 1`.execute(db);
    expect(poolOf(db)!.totalCount).toBe(2);
  });

  it("a pool of one keeps its one; a tool's pool keeps none", async () => {
    const one = createDb(tdb.url, { max: 1 });
    const tool = createDb(tdb.url, { ...MAINTENANCE_DB_OPTIONS, max: 3 });
    opened.push(one, tool);
    expect(await busyThenIdle(one, 1)).toBe(1);
    expect(await busyThenIdle(tool, 3)).toBe(0);
  });
});
