import { randomBytes } from "node:crypto";
import { sql } from "kysely";
import { inject } from "vitest";
import pg from "pg";
import { createDb, type Db } from "../../server/db";
import { ensureDatabase } from "../../db/pg";

export interface TestDb {
  db: Db;
  url: string;
  name: string;
  drop(): Promise<void>;
}

/** A fresh, fully migrated database of the real PostgreSQL, cloned from the template. */
export async function createTestDb(): Promise<TestDb> {
  const adminUrl = inject("adminUrl");
  const name = `t_${randomBytes(6).toString("hex")}`;
  // Owned by the app's role, and used through it, as `npm start` does (no superuser).
  await ensureDatabase(adminUrl, name, { template: inject("templateDb"), owner: inject("appRole") });
  const url = inject("appUrl").replace(/\/postgres$/, `/${name}`);
  // Ten connections (the most an app instance has by default, DATABASE_POOL_MAX): the job worker polls through
  // this pool too, and five left a slow PDF waiting past the acquire timeout on a loaded machine.
  const db = createDb(url, 10);
  return {
    db,
    url,
    name,
    async drop() {
      await db.destroy();
      const c = new pg.Client({ connectionString: adminUrl });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
      await c.end();
    },
  };
}

/**
 * Waits until at least `n` other backends of `db`'s database wait for a lock (a test that crosses two writers
 * on purpose parks one behind the other before letting go); throws after about ten seconds.
 */
export async function untilLockWaiters(db: Db, n: number): Promise<void> {
  for (let i = 0; i < 500; i++) {
    const r = await sql<{ n: number }>`select count(*)::int as n from pg_stat_activity
      where datname = current_database() and wait_event_type = 'Lock' and pid <> pg_backend_pid()`.execute(db);
    if (r.rows[0].n >= n) return;
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error(`never saw ${n} backends waiting for a lock`);
}

/**
 * Opens a transaction on `db`, takes what `take` locks in it and keeps it open until `release()` is called (a test
 * that crosses two writers on purpose parks them behind a third holder). Resolves once the locks are held;
 * `release()` lets go and waits for the holder's commit.
 */
export async function holdInTransaction(
  db: Db,
  take: (trx: Db) => Promise<unknown>,
): Promise<{ release(): Promise<void> }> {
  let letGo!: () => void;
  const released = new Promise<void>((r) => (letGo = r));
  let held!: () => void;
  const isHeld = new Promise<void>((r) => (held = r));
  const holder = db.transaction().execute(async (trx) => {
    await take(trx);
    held();
    await released;
  });
  // A failure to take the locks ends the holder before `held()`: surface it instead of waiting for ever.
  await Promise.race([isHeld, holder]);
  return {
    async release() {
      letGo();
      await holder;
    },
  };
}
