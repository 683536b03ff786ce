import { Kysely, sql } from "kysely";

// Two positions can no longer cover one grid cell of a board. An exclusion
// constraint over the rectangle each position covers (rows × columns, spans included):
// same board AND rows overlap AND columns overlap is refused (SQLSTATE 23P01). btree_gist
// supplies the "=" on uuid inside a GiST index; it is a trusted extension (PostgreSQL 13+),
// so the database owner may create it without being a superuser.
// Positions that already overlap are moved, later ones first, to new rows below the board's
// grid (the grid grows to hold them), and each move is written to the audit log, so the
// curator finds and places them; nothing is deleted.
// Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE EXTENSION IF NOT EXISTS btree_gist`.execute(db);

  const clashes = await sql<{ id: string; boardId: string; siteId: string; gridRow: number; gridCol: number }>`
    SELECT DISTINCT ON (p.id) p.id, p.board_id AS "boardId", p.site_id AS "siteId", p.grid_row AS "gridRow", p.grid_col AS "gridCol"
    FROM positions p JOIN positions q
      ON q.board_id = p.board_id AND q.id <> p.id
     AND (q.created_at, q.id) < (p.created_at, p.id)
     AND int4range(q.grid_row, q.grid_row + q.row_span) && int4range(p.grid_row, p.grid_row + p.row_span)
     AND int4range(q.grid_col, q.grid_col + q.col_span) && int4range(p.grid_col, p.grid_col + p.col_span)
    ORDER BY p.id`.execute(db);
  for (const c of clashes.rows) {
    // One new row per moved position, at column 1, below everything on the board; a grid
    // has at most 60 rows (boards' check), so a crowded board keeps the newest rows.
    const { rows } = await sql<{
      r: number;
    }>`SELECT greatest(b.grid_rows, coalesce(max(p.grid_row + p.row_span - 1), 0)) + 1 AS r
      FROM boards b LEFT JOIN positions p ON p.board_id = b.id WHERE b.id = ${c.boardId} GROUP BY b.grid_rows`.execute(
      db,
    );
    const row = Math.min(rows[0].r, 60);
    await sql`UPDATE positions SET grid_row = ${row}, grid_col = 1, row_span = 1, col_span = 1, updated_at = now(), version = version + 1 WHERE id = ${c.id}`.execute(
      db,
    );
    await sql`UPDATE boards SET grid_rows = greatest(grid_rows, ${row}) WHERE id = ${c.boardId}`.execute(db);
    await sql`INSERT INTO audit_log (site_id, entity_type, entity_id, board_id, position_id, action, actor_id, before, after)
      VALUES (${c.siteId}, 'position', ${c.id}, ${c.boardId}, ${c.id}, 'moved_off_shared_cell', NULL,
              ${JSON.stringify({ gridRow: c.gridRow, gridCol: c.gridCol })}::jsonb, ${JSON.stringify({ gridRow: row, gridCol: 1 })}::jsonb)`.execute(
      db,
    );
  }

  await sql`ALTER TABLE positions ADD CONSTRAINT positions_one_per_cell EXCLUDE USING gist (
    board_id WITH =,
    int4range(grid_row, grid_row + row_span) WITH &&,
    int4range(grid_col, grid_col + col_span) WITH &&
  ) DEFERRABLE INITIALLY IMMEDIATE`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE positions DROP CONSTRAINT positions_one_per_cell`.execute(db);
}
