import { Kysely, sql } from "kysely";

// The wanted list's budget (estimated vs spent per board) is kept by the writes instead of being
// summed over every demand link of the site on each read. Owned by the parts domain
// (server/parts/budget-repository.ts is its only writer):
// - part_budget_shares: what each line adds to each board's budget (estimated = unit cost × the
//   line's quantity on that board; spent = the line's acquisitions shared in proportion to that
//   quantity; '' = not tied to a board), exact numerics, so a total can be corrected by subtracting
//   a line's old share and adding its new one;
// - part_budget_boards: per site and board, the sums of those shares and how many there are (a board
//   with none left is not shown).
// Also two indexes that serve the list's first page in order: open lines by creation, and the
// nameplate photos of the page's components. Frozen in time: never import app code here — the
// statement that fills the tables for existing data is a copy of server/parts/budget-repository.ts's, as of today.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE part_budget_shares (
    line_id uuid NOT NULL REFERENCES part_lines(id) ON DELETE CASCADE,
    site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
    board text NOT NULL,
    estimated numeric NOT NULL,
    spent numeric NOT NULL,
    unestimated integer NOT NULL,
    PRIMARY KEY (line_id, board)
  )`.execute(db);
  await sql`CREATE TABLE part_budget_boards (
    site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
    board text NOT NULL,
    estimated numeric NOT NULL,
    spent numeric NOT NULL,
    unestimated_lines integer NOT NULL,
    shares integer NOT NULL CHECK (shares >= 0),
    PRIMARY KEY (site_id, board)
  )`.execute(db);
  await sql`WITH lines AS (
      SELECT id, site_id, manual_qty, estimated_unit_cost, status FROM part_lines WHERE status <> 'cancelled'
    ), q AS (
      SELECT l.id AS line_id, coalesce(dl.board_id::text, '') AS board, dl.qty
      FROM lines l JOIN part_demand_links dl ON dl.line_id = l.id AND (CASE WHEN l.status = 'fitted' THEN dl.fitted ELSE dl.active END)
      UNION ALL
      SELECT id, '', manual_qty FROM lines WHERE manual_qty > 0
    ), qb AS (
      SELECT line_id, board, sum(qty) AS qty FROM q GROUP BY line_id, board HAVING sum(qty) > 0
    ), tot AS (
      SELECT line_id, sum(qty) AS total FROM qb GROUP BY line_id
    ), spent AS (
      SELECT a.line_id, sum(a.cost) AS spent FROM part_acquisitions a JOIN lines l ON l.id = a.line_id GROUP BY a.line_id
    ), per AS (
      SELECT qb.line_id, qb.board, coalesce(l.estimated_unit_cost * qb.qty, 0) AS estimated,
        coalesce(s.spent, 0) * qb.qty / tot.total AS spent, (l.estimated_unit_cost IS NULL)::int AS unestimated
      FROM qb JOIN lines l ON l.id = qb.line_id JOIN tot ON tot.line_id = qb.line_id LEFT JOIN spent s ON s.line_id = qb.line_id
      UNION ALL
      SELECT s.line_id, '', 0, s.spent, 0 FROM spent s WHERE s.spent > 0 AND NOT EXISTS (SELECT 1 FROM tot WHERE tot.line_id = s.line_id)
    )
    INSERT INTO part_budget_shares (line_id, site_id, board, estimated, spent, unestimated)
    SELECT per.line_id, l.site_id, per.board, per.estimated, per.spent, per.unestimated FROM per JOIN lines l ON l.id = per.line_id`.execute(
    db,
  );
  await sql`INSERT INTO part_budget_boards (site_id, board, estimated, spent, unestimated_lines, shares)
    SELECT site_id, board, sum(estimated), sum(spent), sum(unestimated), count(*) FROM part_budget_shares GROUP BY site_id, board`.execute(
    db,
  );
  await sql`CREATE INDEX part_budget_shares_site_idx ON part_budget_shares (site_id)`.execute(db);
  await sql`CREATE INDEX part_lines_site_created_idx ON part_lines (site_id, created_at, id)`.execute(db);
  await sql`CREATE INDEX photos_nameplate_live_idx ON photos (component_id, created_at) WHERE kind = 'nameplate' AND deleted_at IS NULL`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS photos_nameplate_live_idx`.execute(db);
  await sql`DROP INDEX IF EXISTS part_lines_site_created_idx`.execute(db);
  await sql`DROP TABLE part_budget_boards`.execute(db);
  await sql`DROP TABLE part_budget_shares`.execute(db);
}
