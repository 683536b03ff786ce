import { Kysely, sql } from "kysely";

// An instance admin suspends an account (a volunteer who has left, a phone lost with its session open): the account
// keeps its name on everything it recorded, but it cannot sign in, its sessions end, no reset or invitation brings it
// back, and no e-mail goes to it, until an admin reinstates it. Who suspended it, when and why are kept with it (and
// in the audit log). Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("users")
    .addColumn("suspended_at", "timestamptz")
    .addColumn("suspended_by", "uuid", (c) => c.references("users.id").onDelete("set null"))
    .addColumn("suspended_reason", "text", (c) => c.notNull().defaultTo(""))
    .execute();
  await sql`CREATE INDEX users_suspended_by_idx ON users (suspended_by)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("users")
    .dropColumn("suspended_reason")
    .dropColumn("suspended_by")
    .dropColumn("suspended_at")
    .execute();
}
