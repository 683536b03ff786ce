import { Kysely, sql } from "kysely";

// E-mail: invitations to a site, password-reset tokens and per-user notification
// switches. Tokens are stored only as SHA-256 hashes. Frozen in time: never import app code here.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable("invitations")
    .addColumn("id", "uuid", (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn("site_id", "uuid", (c) => c.notNull().references("sites.id").onDelete("cascade"))
    .addColumn("email", "text", (c) => c.notNull())
    .addColumn("role", "text", (c) =>
      c.notNull().check(sql`role IN ('curator', 'volunteer', 'photographer', 'scrounger', 'viewer')`),
    )
    .addColumn("token_hash", "text", (c) => c.notNull().unique())
    .addColumn("invited_by", "uuid", (c) => c.references("users.id").onDelete("set null"))
    .addColumn("expires_at", "timestamptz", (c) => c.notNull())
    .addColumn("accepted_at", "timestamptz")
    .addColumn("accepted_by", "uuid", (c) => c.references("users.id").onDelete("set null"))
    .addColumn("revoked_at", "timestamptz")
    .addColumn("send_status", "text", (c) =>
      c
        .notNull()
        .defaultTo("pending")
        .check(sql`send_status IN ('pending', 'sent', 'failed')`),
    )
    .addColumn("send_error", "text")
    .addColumn("last_sent_at", "timestamptz")
    .addColumn("created_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  // One live invitation per address and site; accepted and revoked ones stay as history.
  await sql`CREATE UNIQUE INDEX invitations_live_uq ON invitations (site_id, lower(email)) WHERE accepted_at IS NULL AND revoked_at IS NULL`.execute(
    db,
  );
  await db.schema.createIndex("invitations_site_idx").on("invitations").columns(["site_id", "created_at"]).execute();
  await db.schema.createIndex("invitations_invited_by_idx").on("invitations").column("invited_by").execute();
  await db.schema.createIndex("invitations_accepted_by_idx").on("invitations").column("accepted_by").execute();

  await db.schema
    .createTable("password_resets")
    .addColumn("id", "uuid", (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn("user_id", "uuid", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("token_hash", "text", (c) => c.notNull().unique())
    .addColumn("expires_at", "timestamptz", (c) => c.notNull())
    .addColumn("used_at", "timestamptz")
    .addColumn("created_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema
    .createIndex("password_resets_user_idx")
    .on("password_resets")
    .columns(["user_id", "created_at"])
    .execute();

  await db.schema
    .createTable("notification_prefs")
    .addColumn("user_id", "uuid", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("key", "text", (c) =>
      c.notNull().check(sql`key IN ('defect_assigned', 'awaiting_verification', 'weekly_summary')`),
    )
    .addColumn("enabled", "boolean", (c) => c.notNull())
    .addColumn("updated_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint("notification_prefs_pk", ["user_id", "key"])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("notification_prefs").execute();
  await db.schema.dropTable("password_resets").execute();
  await db.schema.dropTable("invitations").execute();
}
