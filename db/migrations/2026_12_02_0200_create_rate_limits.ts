import { Kysely, sql } from "kysely";

// The counters of rate-limiter-flexible's PostgreSQL store, in the
// shape its RateLimiterPostgres expects (key, points, expire in ms since the epoch), so
// several server instances share them; and audit rows that belong to no site (sign-ins,
// account creation) — audit_log.site_id becomes nullable.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE rate_limits (
    key varchar(255) PRIMARY KEY,
    points integer NOT NULL DEFAULT 0,
    expire bigint
  )`.execute(db);
  await sql`CREATE INDEX rate_limits_expire_idx ON rate_limits (expire)`.execute(db);
  await sql`ALTER TABLE audit_log ALTER COLUMN site_id DROP NOT NULL`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DELETE FROM audit_log WHERE site_id IS NULL`.execute(db);
  await sql`ALTER TABLE audit_log ALTER COLUMN site_id SET NOT NULL`.execute(db);
  await sql`DROP TABLE rate_limits`.execute(db);
}
