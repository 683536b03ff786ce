import { Kysely, sql } from "kysely";

// `defect_tallies` (migration 2026_12_09_0100) applied an insert's and an update's changes in key order, but a
// delete's — a board or site removed takes its defects with it — as an UPDATE … FROM whose plan chose the order:
// a delete holding some tally rows while it waited for another writer's could deadlock with that writer. A delete
// now applies its decrements like the others, as one INSERT … ON CONFLICT in key order.
//
// Every UPDATE of `defects` runs the update trigger: PostgreSQL allows no column list on a trigger with
// transition tables ("if the trigger is an UPDATE trigger, it must not specify a column_name list", CREATE
// TRIGGER). Most updates move no defect between tallies (a title, an assignee, a priority score, the parts
// state): their grouped changes net to nothing, the upsert writes no row, and the rows at zero are now looked
// for only when the upsert left one at zero (before, every update probed the tallies for each key it touched).
// An EXISTS comparing the transition tables by id was tried first and rejected: PostgreSQL joined them by a
// nested loop, 13 s for an update of 6,000 defects.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE OR REPLACE FUNCTION defect_tallies_apply() RETURNS trigger LANGUAGE plpgsql AS $$
    DECLARE
      emptied boolean;
    BEGIN
      IF TG_OP = 'INSERT' THEN
        INSERT INTO defect_tallies AS t (site_id, board_id, status, severity, n)
          SELECT site_id, board_id, status, severity, count(*) FROM added
          GROUP BY 1, 2, 3, 4 ORDER BY 1, 2, 3, 4
        ON CONFLICT (site_id, board_id, status, severity) DO UPDATE SET n = t.n + excluded.n;
        RETURN NULL;
      END IF;
      IF TG_OP = 'DELETE' THEN
        WITH applied AS (
          INSERT INTO defect_tallies AS t (site_id, board_id, status, severity, n)
            SELECT site_id, board_id, status, severity, -count(*) FROM removed
            GROUP BY 1, 2, 3, 4 ORDER BY 1, 2, 3, 4
          ON CONFLICT (site_id, board_id, status, severity) DO UPDATE SET n = t.n + excluded.n
          RETURNING t.n
        )
        SELECT coalesce(bool_or(n = 0), false) INTO emptied FROM applied;
      ELSE
        WITH applied AS (
          INSERT INTO defect_tallies AS t (site_id, board_id, status, severity, n)
            SELECT site_id, board_id, status, severity, sum(d) FROM (
              SELECT site_id, board_id, status, severity, 1 AS d FROM added
              UNION ALL SELECT site_id, board_id, status, severity, -1 FROM removed
            ) c
            GROUP BY 1, 2, 3, 4 HAVING sum(d) <> 0 ORDER BY 1, 2, 3, 4
          ON CONFLICT (site_id, board_id, status, severity) DO UPDATE SET n = t.n + excluded.n
          RETURNING t.n
        )
        SELECT coalesce(bool_or(n = 0), false) INTO emptied FROM applied;
      END IF;
      -- Rows the upsert brought to zero go (rows this statement already holds).
      IF emptied THEN
        DELETE FROM defect_tallies t USING (
          SELECT DISTINCT site_id, board_id, status, severity FROM removed ORDER BY 1, 2, 3, 4
        ) g
          WHERE (t.site_id, t.board_id, t.status, t.severity) = (g.site_id, g.board_id, g.status, g.severity)
            AND t.n = 0;
      END IF;
      RETURN NULL;
    END $$`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  // The function as migration 2026_12_09_0100 made it.
  await sql`CREATE OR REPLACE FUNCTION defect_tallies_apply() RETURNS trigger LANGUAGE plpgsql AS $$
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
}
