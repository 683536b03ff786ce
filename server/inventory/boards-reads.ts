import type { Db } from "../db";
import * as repo from "./boards-repository";
import { requireOwned } from "./common";
import { tilePageKeyOf, type TilePageKey } from "../../src/schemas/inventory";
import { notFound } from "../errors";
import { boardThumbnailCells, boardTilePage, toTile, type TileQueryRow } from "./positions-repository";

/** The reads of boards and flood events, as the board routes answer them. */

export const floodEventsOf = (db: Db, siteId: string) => repo.listFloodEvents(db, siteId);

/** The site's boards with how many positions each has and how many of them are surveyed. */
export async function boardsOf(db: Db, siteId: string) {
  const rows = await repo.listBoards(db, siteId);
  return rows.map((b) => ({
    ...b,
    positionCount: Number(b.positionCount ?? 0),
    surveyedCount: Number(b.surveyedCount ?? 0),
  }));
}

/** A page of tiles: `size` of the rows read (one more was read to learn whether a page follows). */
function paged(rows: TileQueryRow[], size: number) {
  const positions = rows.slice(0, size).map(toTile);
  return { positions, next: rows.length > size ? tilePageKeyOf(positions[positions.length - 1]) : null };
}

/**
 * One board: its row, its sections, how many positions it has (its kept summary) and the first `size` of them in
 * board order, with the key of the next page (null when that was all); 404 when the site has no such board. The
 * three statements run at once (the board's own with its total, the sections, the page); the sections and the page
 * are thrown away when the site has no such board.
 */
export async function boardOf(db: Db, siteId: string, boardId: string, size: number) {
  const [head, sections, rows] = await Promise.all([
    repo.boardHead(db, siteId, boardId),
    repo.listSections(db, boardId),
    boardTilePage(db, boardId, null, size + 1),
  ]);
  if (!head) throw notFound("That board");
  const { positionTotal, ...board } = head;
  return { board, sections, total: Number(positionTotal ?? 0), ...paged(rows, size) };
}

/**
 * The page of a board's tiles after `after`, with the key of the one after it; 404 when the site has no such board
 * (asked at the same time as the page, which is then thrown away).
 */
export async function tilesOf(db: Db, siteId: string, boardId: string, after: TilePageKey, size: number) {
  const [, rows] = await Promise.all([
    requireOwned(db, "boards", siteId, boardId, "That board"),
    boardTilePage(db, boardId, after, size + 1),
  ]);
  return paged(rows, size);
}

/** A board's thumbnail (its grid, one compact cell per position); 404 when the site has no such board. */
export async function thumbnailOf(db: Db, siteId: string, boardId: string) {
  const [board, cells] = await Promise.all([
    requireOwned(db, "boards", siteId, boardId, "That board"),
    boardThumbnailCells(db, boardId),
  ]);
  return {
    gridRows: board.gridRows,
    gridCols: board.gridCols,
    faceHeightMm: board.faceHeightMm,
    waterLineMm: board.waterLineMm,
    cells: cells.map((c) => [c.gridRow, c.gridCol, c.rowSpan, c.colSpan, c.astmGrade ?? null, c.custody ?? null]),
  };
}
