import { Kysely, sql } from "kysely";

// Issue 16: a watch check kept on a phone with no signal carries the time the person observed, by
// the phone's clock. The server no longer takes that clock on trust: it keeps what the phone said
// (`device_at`), how far the phone's clock was from the server's when it sent (`clock_skew_s`,
// phone minus server; null when the phone did not say), and `at` becomes the observed time on the
// server's clock (the phone's time less that difference), which the watch's schedule counts.
// `created_at` (already there) is the time the server received it. Frozen in time: no app imports.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("rts_watch_checks")
    .addColumn("device_at", "timestamptz")
    .addColumn("clock_skew_s", "integer")
    .execute();
  await sql`COMMENT ON COLUMN rts_watch_checks.device_at IS 'The observed time as the phone gave it, by its own clock'`.execute(
    db,
  );
  await sql`COMMENT ON COLUMN rts_watch_checks.clock_skew_s IS 'Phone clock minus server clock when it was sent, in seconds'`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("rts_watch_checks").dropColumn("device_at").dropColumn("clock_skew_s").execute();
}
