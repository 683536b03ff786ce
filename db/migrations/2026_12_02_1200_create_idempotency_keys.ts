import { Kysely, sql } from "kysely";

// Idempotency keys: a phone that lost its signal sends its queued creates again with
// the same `Idempotency-Key`; the first result is kept here and answered to every repeat, so a
// replay never makes a second row. One row per (user, key); `fingerprint` is the SHA-256 of
// method, path and body, so the same key with a different request is refused.
// Frozen in time: never import app code here.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable("idempotency_keys")
    .addColumn("user_id", "uuid", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("key", "text", (c) => c.notNull())
    .addColumn("method", "text", (c) => c.notNull())
    .addColumn("path", "text", (c) => c.notNull())
    .addColumn("fingerprint", "text", (c) => c.notNull())
    .addColumn("state", "text", (c) =>
      c
        .notNull()
        .defaultTo("running")
        .check(sql`state IN ('running', 'done')`),
    )
    .addColumn("response_status", "integer")
    .addColumn("response_body", "jsonb")
    .addColumn("created_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn("completed_at", "timestamptz")
    .addPrimaryKeyConstraint("idempotency_keys_pkey", ["user_id", "key"])
    .execute();
  await db.schema
    .createIndex("idempotency_keys_user_created_idx")
    .on("idempotency_keys")
    .columns(["user_id", "created_at"])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("idempotency_keys").execute();
}
