import { Kysely, sql } from "kysely";

// Two kinds the flood guidance treats apart — electronic trip units (their
// own kind) and enclosed safety switches (replaced after submersion, not rebuilt). Widens the
// CHECK on every `kind` column that lists component kinds (positions, components, part lines).
// Frozen in time: no app imports.

const KINDS = [
  "molded_case_breaker",
  "power_breaker",
  "meter",
  "ground_lamp",
  "fuse",
  "switch",
  "bus_tie",
  "busbar",
  "transformer",
  "relay",
  "terminal_strip",
  "other",
  "electronic_trip_unit",
  "enclosed_switch",
];
const OLD = KINDS.slice(0, 12);
const TABLES = ["positions", "components", "part_lines"];

async function setKinds(db: Kysely<any>, kinds: string[]) {
  for (const table of TABLES) {
    const found = await sql<{ conname: string }>`
      SELECT c.conname FROM pg_constraint c JOIN pg_class t ON t.oid = c.conrelid
      WHERE t.relname = ${table} AND c.contype = 'c' AND pg_get_constraintdef(c.oid) LIKE '%molded_case_breaker%'`.execute(
      db,
    );
    if (found.rows.length === 0) continue; // table absent on this branch's schema
    for (const r of found.rows)
      await sql`ALTER TABLE ${sql.table(table)} DROP CONSTRAINT ${sql.ref(r.conname)}`.execute(db);
    const list = sql.raw(kinds.map((k) => `'${k}'`).join(", "));
    await sql`ALTER TABLE ${sql.table(table)} ADD CONSTRAINT ${sql.ref(`${table}_kind_check`)} CHECK (kind IN (${list}))`.execute(
      db,
    );
  }
}

export async function up(db: Kysely<any>): Promise<void> {
  await setKinds(db, KINDS);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of TABLES)
    await sql`UPDATE ${sql.table(table)} SET kind = 'other' WHERE kind IN ('electronic_trip_unit', 'enclosed_switch')`
      .execute(db)
      .catch(() => undefined);
  await setKinds(db, OLD);
}
