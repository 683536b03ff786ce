import { Kysely, sql } from "kysely";

// A board's positions are read in board order (row, column, order within the cell, id) a page at a time, each
// page after the last one's key (server/inventory/positions-repository.ts boardTilePage). This index serves that
// as an ordered index scan with a LIMIT, so a page costs its own rows, never a sort of the whole board; the id
// makes the key unique (two positions may share a cell and an order). It leads with the columns of
// positions_board_idx (board_id, grid_row, grid_col), which every read of that index can use as well, so that one
// goes and writes keep one index fewer. Frozen in time: never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX positions_board_order_idx ON positions (board_id, grid_row, grid_col, sort_order, id)`.execute(
    db,
  );
  await sql`DROP INDEX IF EXISTS positions_board_idx`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX IF NOT EXISTS positions_board_idx ON positions (board_id, grid_row, grid_col)`.execute(db);
  await sql`DROP INDEX IF EXISTS positions_board_order_idx`.execute(db);
}
