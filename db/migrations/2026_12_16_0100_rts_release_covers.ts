import { Kysely, sql } from "kysely";

// A release with a reason lets the blockers it saw pass, and only those: a blocker that appears after it (a defect
// raised on the stage, a reading that fails) blocks again. The release keeps the keys of the blockers it covered
// (code and link, src/domain/rts-gate.ts blockerKey). Null on releases recorded before: they cover whatever blocks.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("rts_signoffs")
    .addColumn("covers", sql`text[]`)
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("rts_signoffs").dropColumn("covers").execute();
}
