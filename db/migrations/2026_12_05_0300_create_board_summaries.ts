import { Kysely, sql } from "kysely";

// The site overview and the board list read per-board counts kept current by the writes,
// so they grow with boards, not positions. One row per board × facet × key (× surveyed for the two
// facets the overview splits by it): 'positions' (key ''), 'disposition' (a disposition or
// 'undecided'), 'custody' (a custody state, or 'none' for a position without a current component),
// 'grade' (the current component's newest ASTM D610 grade, or 'ungraded'), 'retained' ('yes'/'no':
// original fabric neither scrapped nor missing). Owned by the inventory domain
// (server/inventory/board-summaries-repository.ts is its only writer). Frozen in time: never import app code
// here — the statement that fills it for existing data is a copy of that module's, as of today.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE board_summaries (
    board_id uuid NOT NULL REFERENCES boards(id) ON DELETE CASCADE,
    site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
    facet text NOT NULL CHECK (facet IN ('positions', 'disposition', 'custody', 'grade', 'retained')),
    key text NOT NULL,
    surveyed boolean NOT NULL,
    n integer NOT NULL CHECK (n > 0),
    PRIMARY KEY (board_id, facet, key, surveyed)
  )`.execute(db);
  await sql`CREATE INDEX board_summaries_site_idx ON board_summaries (site_id, facet)`.execute(db);
  await sql`WITH pos AS MATERIALIZED (
      SELECT p.board_id, p.site_id, c.disposition, c.custody, l.astm_grade AS grade,
        EXISTS (SELECT 1 FROM inspections i WHERE i.position_id = p.id) AS surveyed,
        coalesce(c.heritage = 'original' AND c.custody NOT IN ('scrapped', 'missing'), false) AS retained
      FROM positions p
      LEFT JOIN components c ON c.position_id = p.id AND c.retired_at IS NULL
      LEFT JOIN LATERAL (
        SELECT i.astm_grade FROM inspections i WHERE i.component_id = c.id
        ORDER BY i.inspected_at DESC, i.created_at DESC, i.id DESC LIMIT 1
      ) l ON true
    )
    INSERT INTO board_summaries (board_id, site_id, facet, key, surveyed, n)
    SELECT board_id, site_id, 'positions', '', surveyed, count(*) FROM pos GROUP BY 1, 2, 5
    UNION ALL SELECT board_id, site_id, 'disposition', coalesce(disposition, 'undecided'), surveyed, count(*)
      FROM pos GROUP BY 1, 2, 4, 5
    UNION ALL SELECT board_id, site_id, 'custody', coalesce(custody, 'none'), false, count(*) FROM pos GROUP BY 1, 2, 4
    UNION ALL SELECT board_id, site_id, 'grade', coalesce(grade::text, 'ungraded'), false, count(*) FROM pos GROUP BY 1, 2, 4
    UNION ALL SELECT board_id, site_id, 'retained', CASE WHEN retained THEN 'yes' ELSE 'no' END, false, count(*)
      FROM pos GROUP BY 1, 2, 4`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE board_summaries`.execute(db);
}
