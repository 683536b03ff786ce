import { Kysely, sql } from "kysely";

// The cap on one person's concurrent downloads holds across server instances, so it
// lives in PostgreSQL: one row per running download, taken under a per-person advisory lock and
// deleted when the download ends. A row carries a lease the running instance renews; an
// instance that dies leaves rows that stop counting once their lease runs out.
// Owned by server/export-stream.ts (its only writer). Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE export_slots (
    id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
    holder text NOT NULL,
    started_at timestamptz NOT NULL DEFAULT now(),
    lease_until timestamptz NOT NULL
  )`.execute(db);
  await sql`CREATE INDEX export_slots_holder_idx ON export_slots (holder, lease_until)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE export_slots`.execute(db);
}
