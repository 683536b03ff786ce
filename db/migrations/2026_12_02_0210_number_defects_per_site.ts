import { Kysely, sql } from "kysely";

// Defect numbers count per site (site B's first defect is D-1, not D-61).
// A counter row per site, bumped by a BEFORE INSERT trigger (INSERT … ON CONFLICT DO UPDATE
// takes the counter row's lock, so two defects raised at once on one site get 1 and 2).
// Existing defects are renumbered within their site in their old order, so the oldest site
// keeps its numbers where it was alone; every number that changed is written to the audit
// log (action "renumber", before/after), so a D-number noted on paper can still be traced.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE defect_ref_counters (
    site_id uuid PRIMARY KEY REFERENCES sites(id) ON DELETE CASCADE,
    last_ref bigint NOT NULL
  )`.execute(db);

  const renumbered = sql`(SELECT id, site_id, board_id, position_id, ref AS old_ref,
      row_number() OVER (PARTITION BY site_id ORDER BY ref) AS new_ref FROM defects)`;
  await sql`INSERT INTO audit_log (site_id, entity_type, entity_id, board_id, position_id, action, actor_id, before, after)
    SELECT site_id, 'defect', id, board_id, position_id, 'renumber', NULL,
           jsonb_build_object('ref', old_ref), jsonb_build_object('ref', new_ref)
    FROM ${renumbered} r WHERE old_ref <> new_ref`.execute(db);
  await sql`ALTER TABLE defects ALTER COLUMN ref DROP IDENTITY IF EXISTS`.execute(db);
  await sql`UPDATE defects d SET ref = r.new_ref FROM ${renumbered} r WHERE d.id = r.id AND d.ref <> r.new_ref`.execute(
    db,
  );
  await sql`INSERT INTO defect_ref_counters (site_id, last_ref) SELECT site_id, max(ref) FROM defects GROUP BY site_id`.execute(
    db,
  );
  await sql`CREATE UNIQUE INDEX defects_site_ref_uq ON defects (site_id, ref)`.execute(db);

  await sql`CREATE FUNCTION defects_next_ref() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF NEW.ref IS NULL THEN
        INSERT INTO defect_ref_counters AS c (site_id, last_ref) VALUES (NEW.site_id, 1)
          ON CONFLICT (site_id) DO UPDATE SET last_ref = c.last_ref + 1
          RETURNING last_ref INTO NEW.ref;
      ELSE
        INSERT INTO defect_ref_counters AS c (site_id, last_ref) VALUES (NEW.site_id, NEW.ref)
          ON CONFLICT (site_id) DO UPDATE SET last_ref = greatest(c.last_ref, NEW.ref);
      END IF;
      RETURN NEW;
    END
  $$`.execute(db);
  await sql`CREATE TRIGGER defects_next_ref BEFORE INSERT ON defects FOR EACH ROW EXECUTE FUNCTION defects_next_ref()`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TRIGGER defects_next_ref ON defects`.execute(db);
  await sql`DROP FUNCTION defects_next_ref()`.execute(db);
  await sql`DROP INDEX defects_site_ref_uq`.execute(db);
  await sql`DROP TABLE defect_ref_counters`.execute(db);
  await sql`CREATE SEQUENCE defects_ref_seq OWNED BY defects.ref`.execute(db);
  await sql`SELECT setval('defects_ref_seq', coalesce((SELECT max(ref) FROM defects), 0) + 1, false)`.execute(db);
  await sql`ALTER TABLE defects ALTER COLUMN ref SET DEFAULT nextval('defects_ref_seq')`.execute(db);
}
