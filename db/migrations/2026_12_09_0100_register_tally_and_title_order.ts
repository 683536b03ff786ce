import { Kysely, sql } from "kysely";

// The register's total grows with the site when it is counted on every read (60,000 index entries on
// a 200,000-position site for the unfiltered view). `defect_tallies` keeps how many defects each
// (site, board, status, severity) holds, kept by triggers on `defects` in the same statement as each
// write — inserts, every update that moves a defect between keys, and deletes, cascaded ones included —
// so no write path can leave it behind. A register view filtered by nothing but board, status and
// severity sums these rows (at most boards × 7 × 4 per site) instead of counting defects. Owned by the
// defects domain; only these triggers write it. Each statement applies its changes as one INSERT … ON
// CONFLICT in key order, so two writers lock the rows they share in the same order. No foreign keys:
// when a board or site goes, its defects' cascaded deletes bring its rows to zero; a row at zero is
// deleted by the same statement. (n has no CHECK (n >= 0): an upsert's proposed row carries a decrement,
// negative, and PostgreSQL checks the proposed row before it finds the conflict.)
//
// The title sort's index gains the reference (the tie-break), the id (what the page selects) and the title
// (PostgreSQL reads an expression index alone only when it holds the column too), so a page by title is an
// index-only walk in either direction instead of a sort of every defect.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE defect_tallies (
    site_id uuid NOT NULL,
    board_id uuid NOT NULL,
    status text NOT NULL,
    severity text NOT NULL,
    n integer NOT NULL,
    PRIMARY KEY (site_id, board_id, status, severity)
  )`.execute(db);
  await sql`CREATE FUNCTION defect_tallies_apply() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'INSERT' THEN
        INSERT INTO defect_tallies AS t (site_id, board_id, status, severity, n)
          SELECT site_id, board_id, status, severity, count(*) FROM added
          GROUP BY 1, 2, 3, 4 ORDER BY 1, 2, 3, 4
        ON CONFLICT (site_id, board_id, status, severity) DO UPDATE SET n = t.n + excluded.n;
      ELSIF TG_OP = 'DELETE' THEN
        UPDATE defect_tallies t SET n = t.n - g.n
          FROM (SELECT site_id, board_id, status, severity, count(*) AS n FROM removed GROUP BY 1, 2, 3, 4) g
          WHERE (t.site_id, t.board_id, t.status, t.severity) = (g.site_id, g.board_id, g.status, g.severity);
        DELETE FROM defect_tallies t USING (SELECT DISTINCT site_id, board_id, status, severity FROM removed) g
          WHERE (t.site_id, t.board_id, t.status, t.severity) = (g.site_id, g.board_id, g.status, g.severity)
            AND t.n = 0;
      ELSE
        INSERT INTO defect_tallies AS t (site_id, board_id, status, severity, n)
          SELECT site_id, board_id, status, severity, sum(d) FROM (
            SELECT site_id, board_id, status, severity, 1 AS d FROM added
            UNION ALL SELECT site_id, board_id, status, severity, -1 FROM removed
          ) c
          GROUP BY 1, 2, 3, 4 HAVING sum(d) <> 0 ORDER BY 1, 2, 3, 4
        ON CONFLICT (site_id, board_id, status, severity) DO UPDATE SET n = t.n + excluded.n;
        DELETE FROM defect_tallies t USING (SELECT DISTINCT site_id, board_id, status, severity FROM removed) g
          WHERE (t.site_id, t.board_id, t.status, t.severity) = (g.site_id, g.board_id, g.status, g.severity)
            AND t.n = 0;
      END IF;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER defect_tallies_insert AFTER INSERT ON defects REFERENCING NEW TABLE AS added
    FOR EACH STATEMENT EXECUTE FUNCTION defect_tallies_apply()`.execute(db);
  await sql`CREATE TRIGGER defect_tallies_update AFTER UPDATE ON defects REFERENCING OLD TABLE AS removed NEW TABLE AS added
    FOR EACH STATEMENT EXECUTE FUNCTION defect_tallies_apply()`.execute(db);
  await sql`CREATE TRIGGER defect_tallies_delete AFTER DELETE ON defects REFERENCING OLD TABLE AS removed
    FOR EACH STATEMENT EXECUTE FUNCTION defect_tallies_apply()`.execute(db);
  await sql`INSERT INTO defect_tallies (site_id, board_id, status, severity, n)
    SELECT site_id, board_id, status, severity, count(*) FROM defects GROUP BY 1, 2, 3, 4`.execute(db);

  await sql`CREATE INDEX defects_site_title_order_idx ON defects (site_id, lower(title), ref) INCLUDE (id, title)`.execute(
    db,
  );
  await sql`DROP INDEX IF EXISTS defects_site_title_lower_idx`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX IF NOT EXISTS defects_site_title_lower_idx ON defects (site_id, lower(title))`.execute(db);
  await sql`DROP INDEX IF EXISTS defects_site_title_order_idx`.execute(db);
  await sql`DROP TRIGGER IF EXISTS defect_tallies_insert ON defects`.execute(db);
  await sql`DROP TRIGGER IF EXISTS defect_tallies_update ON defects`.execute(db);
  await sql`DROP TRIGGER IF EXISTS defect_tallies_delete ON defects`.execute(db);
  await sql`DROP FUNCTION IF EXISTS defect_tallies_apply()`.execute(db);
  await sql`DROP TABLE IF EXISTS defect_tallies`.execute(db);
}
