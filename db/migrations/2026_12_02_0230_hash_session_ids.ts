import { Kysely, sql } from "kysely";

// sessions.id now holds the SHA-256 (hex) of the session id in the cookie
// (server/auth/lucia.ts). Rows stored before hold the raw id and can never match a hash,
// so they are ended: everyone signs in once more.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`DELETE FROM sessions`.execute(db);
  await sql`COMMENT ON COLUMN sessions.id IS 'SHA-256 (hex) of the session id sent in the cookie'`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DELETE FROM sessions`.execute(db);
  await sql`COMMENT ON COLUMN sessions.id IS NULL`.execute(db);
}
