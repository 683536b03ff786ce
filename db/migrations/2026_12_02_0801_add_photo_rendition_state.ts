import { Kysely, sql } from "kysely";

// Renditions are made by a background job after the original is stored: a photo is
// 'processing' until its display copy and thumbnail exist, 'failed' (with the reason)
// when the job gave up. Photos stored before this change already have theirs ('ready').
// Frozen in time: never import app code here.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("photos")
    .addColumn("rendition_state", "text", (c) =>
      c
        .notNull()
        .defaultTo("ready")
        .check(sql`rendition_state IN ('processing', 'ready', 'failed')`),
    )
    .addColumn("rendition_error", "text")
    .execute();
  await sql`CREATE INDEX photos_processing_idx ON photos (site_id) WHERE rendition_state <> 'ready'`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("photos").dropColumn("rendition_error").dropColumn("rendition_state").execute();
}
