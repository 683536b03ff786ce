import { Kysely, sql } from "kysely";

// Exports write timestamps in the site's local time and say which zone that is.
// An IANA zone name (e.g. "Europe/Lisbon"); existing sites keep UTC until a curator sets it.
// Frozen in time: no app imports.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("sites")
    .addColumn("time_zone", "text", (c) =>
      c
        .notNull()
        .defaultTo("UTC")
        .check(sql`length(time_zone) BETWEEN 1 AND 64`),
    )
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("sites").dropColumn("time_zone").execute();
}
