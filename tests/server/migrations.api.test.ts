import { afterAll, expect, it } from "vitest";
import { inject } from "vitest";
import { sql } from "kysely";
import { ensureDatabase } from "../../db/pg";
import { migrateToLatest } from "../../db/migrate";
import { createDb } from "../../server/db";
import { seedDemo } from "../../db/seed/demo";

const name = `m_${Date.now().toString(36)}`;
const adminUrl = inject("adminUrl");
const db = createDb(adminUrl.replace(/\/postgres$/, `/${name}`), 2);
afterAll(async () => {
  await db.destroy();
  await ensureDatabase(adminUrl, "postgres"); // no-op; keeps the helper honest
});

it("when migrations run on an empty database, every table exists and a second run applies nothing", async () => {
  await ensureDatabase(adminUrl, name, { fresh: true });
  const applied = await migrateToLatest(db);
  expect(applied.length).toBeGreaterThan(0);
  const tables = await sql<{ tableName: string }>`select table_name from information_schema.tables where table_schema = 'public'`.execute(db);
  expect(tables.rows.map((r) => r.tableName)).toEqual(expect.arrayContaining(["users", "sessions", "sites", "memberships"]));
  expect(await migrateToLatest(db)).toEqual([]);
});

it("the demo seed loads into the migrated database with the six demo accounts", async () => {
  await seedDemo(db);
  const users = await db.selectFrom("users").select("email").orderBy("email").execute();
  expect(users.map((u) => u.email)).toEqual([
    "admin@tideline.test",
    "curator@tideline.test",
    "photographer@tideline.test",
    "scrounger@tideline.test",
    "viewer@tideline.test",
    "volunteer@tideline.test",
  ]);
});
