import { randomBytes } from "node:crypto";
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
