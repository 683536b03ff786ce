import type { Db } from "../db";
import * as repo from "./boards-repository";
import { requireOwned } from "./common";
import { boardTiles, toTile } from "./positions-repository";

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

/** One board with its sections and a tile per position; 404 when the site has no such board. */
export async function boardOf(db: Db, siteId: string, boardId: string) {
  const board = await requireOwned(db, "boards", siteId, boardId, "That board");
  const [sections, tiles] = await Promise.all([repo.listSections(db, boardId), boardTiles(db, boardId)]);
  return { board, sections, positions: tiles.map(toTile) };
}
