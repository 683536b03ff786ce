import { afterAll, expect, it } from "vitest";
import { inject } from "vitest";
import { sql } from "kysely";
import { ensureDatabase } from "../../db/pg";
import { migrateAllDown, migrateToLatest } from "../../db/migrate";
import { createDb } from "../../server/db";
import { seedDemo } from "../../server/seed/demo";

const name = `m_${Date.now().toString(36)}`;
const adminUrl = inject("adminUrl");
// As the app's own role (no superuser), the way `npm start` migrates the embedded database.
const db = createDb(inject("appUrl").replace(/\/postgres$/, `/${name}`), 2);
afterAll(async () => {
  await db.destroy();
  await ensureDatabase(adminUrl, "postgres"); // no-op; keeps the helper honest
});

it("when migrations run on an empty database, every table exists and a second run applies nothing", async () => {
  await ensureDatabase(adminUrl, name, { fresh: true, owner: inject("appRole") });
  const applied = await migrateToLatest(db);
  expect(applied.length).toBeGreaterThan(0);
  const tables = await sql<{
    tableName: string;
  }>`select table_name from information_schema.tables where table_schema = 'public'`.execute(db);
  expect(tables.rows.map((r) => r.tableName)).toEqual(
    expect.arrayContaining(["users", "sessions", "sites", "memberships"]),
  );
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

// The defect states were renamed to the trade's words by a migration.
it("the defect-state rename maps every old value to the new one and back, in defects, history, audit and saved views", async () => {
  const m = await import("../../db/migrations/2026_12_02_0500_rename_defect_statuses");
  const site = await db.selectFrom("sites").select("id").executeTakeFirstOrThrow();
  const user = await db
    .selectFrom("users")
    .select("id")
    .where("email", "=", "curator@tideline.test")
    .executeTakeFirstOrThrow();
  await db
    .insertInto("defectViews")
    .values({
      siteId: site.id,
      userId: user.id,
      name: "Work in hand",
      query: "status=scheduled&status=under_repair&sort=priority",
    })
    .execute();
  const counts = async () =>
    Object.fromEntries(
      (
        await sql<{ status: string; n: string }>`select status, count(*) n from defects group by status`.execute(db)
      ).rows.map((r) => [r.status, Number(r.n)]),
    );
  const after = await counts();
  expect(Object.keys(after).sort()).toEqual([
    "accepted_as_is",
    "awaiting_retest",
    "closed",
    "deferred",
    "raised",
    "scheduled",
    "under_repair",
  ]);

  await m.down(db);
  const before = await counts();
  expect(before).toEqual({
    open: after.raised,
    triaged: after.scheduled,
    in_repair: after.under_repair,
    awaiting_verification: after.awaiting_retest,
    closed: after.closed,
    deferred: after.deferred,
    wont_fix: after.accepted_as_is,
  });
  expect(
    (await db.selectFrom("defectViews").select("query").where("name", "=", "Work in hand").executeTakeFirstOrThrow())
      .query,
  ).toBe("status=triaged&status=in_repair&sort=priority");
  const history = await sql<{ s: string }>`select distinct to_status s from defect_status_changes order by 1`.execute(
    db,
  );
  expect(history.rows.map((r) => r.s)).toEqual(
    expect.arrayContaining(["open", "triaged", "in_repair", "awaiting_verification", "closed"]),
  );

  await m.up(db);
  expect(await counts()).toEqual(after);
  expect(
    (await db.selectFrom("defectViews").select("query").where("name", "=", "Work in hand").executeTakeFirstOrThrow())
      .query,
  ).toBe("status=scheduled&status=under_repair&sort=priority");
  const stale = await sql<{
    n: string;
  }>`select count(*) n from defect_status_changes where to_status in ('open','triaged','in_repair','awaiting_verification','wont_fix')`.execute(
    db,
  );
  expect(Number(stale.rows[0].n)).toBe(0);
  await expect(sql`update defects set status = 'triaged'`.execute(db)).rejects.toThrow(/defects_status_check/);
});

it("every migration's down undoes it: all the way down leaves no table, type or function of ours, and up applies all again", async () => {
  const downName = `${name}_down`;
  await ensureDatabase(adminUrl, downName, { fresh: true, owner: inject("appRole") });
  const d = createDb(inject("appUrl").replace(/\/postgres$/, `/${downName}`), 2);
  const ours = async () => {
    const r = await sql<{ kind: string; name: string }>`
      select 'table' as kind, table_name as name from information_schema.tables
       where table_schema = 'public' and table_name not like 'kysely_migration%'
      union all
      select 'type', t.typname from pg_type t join pg_namespace n on n.oid = t.typnamespace
       where n.nspname = 'public' and t.typtype in ('e', 'd')
      union all
      select 'function', p.proname from pg_proc p join pg_namespace n on n.oid = p.pronamespace
       where n.nspname = 'public' and not exists (select 1 from pg_depend dep where dep.objid = p.oid and dep.deptype = 'e')
      order by 1, 2`.execute(d);
    return r.rows.map((x) => `${x.kind} ${x.name}`);
  };
  try {
    const up = await migrateToLatest(d);
    expect(up.length).toBeGreaterThan(0);
    expect(await ours()).not.toEqual([]);
    const down = await migrateAllDown(d);
    expect(down).toEqual([...up].reverse());
    expect(await ours()).toEqual([]);
    expect(await migrateToLatest(d)).toEqual(up);
  } finally {
    await d.destroy();
  }
});
