import { Kysely } from "kysely";

// A custody move made on a phone with no signal is applied when it arrives (the chain's order is the order the
// server takes moves in), but it keeps when it was made on the phone, its clock corrected: the trail says both.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("custody_moves").addColumn("made_at", "timestamptz").execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("custody_moves").dropColumn("made_at").execute();
}
