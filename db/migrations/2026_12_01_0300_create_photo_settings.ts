import { Kysely, sql } from "kysely";

// Photos: what a site requires of every position (the shoot list), and an
// index for the galleries and the shoot list (live photos of a position by kind).
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable("photo_settings")
    .addColumn("site_id", "uuid", (c) => c.primaryKey().references("sites.id").onDelete("cascade"))
    .addColumn("required_kinds", sql`text[]`, (c) => c.notNull().defaultTo(sql`'{as_found,nameplate}'::text[]`))
    .addColumn("version", "integer", (c) => c.notNull().defaultTo(1))
    .addColumn("updated_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await sql`CREATE INDEX photos_position_kind_live_idx ON photos (position_id, kind) WHERE deleted_at IS NULL`.execute(
    db,
  );
  await sql`CREATE INDEX photos_deleted_at_idx ON photos (deleted_at) WHERE deleted_at IS NOT NULL`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS photos_deleted_at_idx`.execute(db);
  await sql`DROP INDEX IF EXISTS photos_position_kind_live_idx`.execute(db);
  await db.schema.dropTable("photo_settings").execute();
}
