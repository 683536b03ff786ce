import { Kysely, sql } from "kysely";

// The curator's release of a refused custody move (which rules, and why), photos
// attached to a custody move, the two-way link between a defect and the readings that raised
// it or prove its repair, a currency per site, and short per-site numbers for parts lines
// (W-12). Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable("custody_moves")
    .addColumn("released_rules", sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'::text[]`))
    .addColumn("release_reason", "text", (c) => c.notNull().defaultTo(""))
    .execute();

  await db.schema
    .alterTable("photos")
    .addColumn("custody_move_id", "uuid", (c) => c.references("custody_moves.id").onDelete("set null"))
    .execute();
  await db.schema.createIndex("photos_custody_move_idx").on("photos").column("custody_move_id").execute();

  await db.schema
    .createTable("defect_readings")
    .addColumn("id", "uuid", (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn("site_id", "uuid", (c) => c.notNull().references("sites.id").onDelete("cascade"))
    .addColumn("defect_id", "uuid", (c) => c.notNull().references("defects.id").onDelete("cascade"))
    .addColumn("reading_kind", "text", (c) =>
      c.notNull().check(sql`reading_kind IN ('insulation', 'contact', 'thermal', 'ground')`),
    )
    .addColumn("reading_id", "uuid", (c) => c.notNull())
    .addColumn("role", "text", (c) => c.notNull().check(sql`role IN ('raised_from', 'retest')`))
    .addColumn("linked_by", "uuid", (c) => c.references("users.id").onDelete("set null"))
    .addColumn("linked_at", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await sql`CREATE UNIQUE INDEX defect_readings_uq ON defect_readings (defect_id, reading_kind, reading_id)`.execute(
    db,
  );
  await db.schema
    .createIndex("defect_readings_reading_idx")
    .on("defect_readings")
    .columns(["reading_kind", "reading_id"])
    .execute();
  await db.schema.createIndex("defect_readings_site_idx").on("defect_readings").column("site_id").execute();
  await db.schema.createIndex("defect_readings_by_idx").on("defect_readings").column("linked_by").execute();

  // ISO 4217 alphabetic code; existing sites keep the dollar figures they were entered in.
  await db.schema
    .alterTable("sites")
    .addColumn("currency", "text", (c) =>
      c
        .notNull()
        .defaultTo("USD")
        .check(sql`currency ~ '^[A-Z]{3}$'`),
    )
    .execute();

  await db.schema.alterTable("part_lines").addColumn("number", "integer").execute();
  await sql`UPDATE part_lines p SET number = n.rn FROM (
    SELECT id, row_number() OVER (PARTITION BY site_id ORDER BY created_at, id) rn FROM part_lines) n WHERE n.id = p.id`.execute(
    db,
  );
  await sql`ALTER TABLE part_lines ALTER COLUMN number SET NOT NULL`.execute(db);
  await sql`CREATE UNIQUE INDEX part_lines_site_number_uq ON part_lines (site_id, number)`.execute(db);
  // Every writer of part_lines gets the next number of its site without knowing about it; the
  // advisory lock (per site, for the transaction) keeps two concurrent inserts from taking the same one.
  await sql`CREATE FUNCTION part_lines_next_number() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF NEW.number IS NULL THEN
        PERFORM pg_advisory_xact_lock(hashtext('part_lines_number:' || NEW.site_id::text));
        SELECT coalesce(max(number), 0) + 1 INTO NEW.number FROM part_lines WHERE site_id = NEW.site_id;
      END IF;
      RETURN NEW;
    END $$`.execute(db);
  await sql`CREATE TRIGGER part_lines_number_trg BEFORE INSERT ON part_lines FOR EACH ROW EXECUTE FUNCTION part_lines_next_number()`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TRIGGER part_lines_number_trg ON part_lines`.execute(db);
  await sql`DROP FUNCTION part_lines_next_number()`.execute(db);
  await sql`DROP INDEX part_lines_site_number_uq`.execute(db);
  await db.schema.alterTable("part_lines").dropColumn("number").execute();
  await db.schema.alterTable("sites").dropColumn("currency").execute();
  await db.schema.dropTable("defect_readings").execute();
  await db.schema.alterTable("photos").dropColumn("custody_move_id").execute();
  await db.schema.alterTable("custody_moves").dropColumn("released_rules").dropColumn("release_reason").execute();
}
