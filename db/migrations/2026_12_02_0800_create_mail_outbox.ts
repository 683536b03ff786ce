import { Kysely, sql } from "kysely";

// The e-mail outbox: an action writes its message here in its own transaction and a job
// (pg-boss queue "mail.send") delivers it, retrying with backoff. `ref_type`/`ref_id`
// tie a message to what caused it (an invitation), whose "sent / not sent" reads from here.
// Frozen in time: never import app code here.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable("mail_outbox")
    .addColumn("id", "uuid", (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn("to_address", "text", (c) => c.notNull())
    .addColumn("from_name", "text")
    .addColumn("subject", "text", (c) => c.notNull())
    .addColumn("text_body", "text", (c) => c.notNull())
    .addColumn("html_body", "text", (c) => c.notNull())
    .addColumn("status", "text", (c) =>
      c
        .notNull()
        .defaultTo("queued")
        .check(sql`status IN ('queued', 'retrying', 'sent', 'failed')`),
    )
    .addColumn("attempts", "integer", (c) => c.notNull().defaultTo(0))
    .addColumn("last_error", "text")
    .addColumn("ref_type", "text")
    .addColumn("ref_id", "uuid")
    .addColumn("created_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn("sent_at", "timestamptz")
    .execute();
  await db.schema
    .createIndex("mail_outbox_ref_idx")
    .on("mail_outbox")
    .columns(["ref_type", "ref_id", "created_at"])
    .execute();
  await db.schema.createIndex("mail_outbox_status_idx").on("mail_outbox").columns(["status", "created_at"]).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("mail_outbox").execute();
}
