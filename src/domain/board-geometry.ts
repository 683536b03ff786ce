/**
 * Where the flood water line falls on a board's elevation grid, and whether a position
 * on that grid reached below it. Geometry only: the board face is `faceHeightMm` tall,
 * drawn as `gridRows` equal rows numbered 1 from the top; heights are measured up from
 * the bottom edge of the face (the deck or floor side), as a water line is.
 */
import { requireNumber } from "./guards";

/**
 * Fraction of the face, from its top edge, at which the water line is drawn.
 * Formula: 1 − waterLineMm / faceHeightMm, clamped to 0…1 (a water line above the face
 * covers all of it). Source: plain proportion (common practice for elevation drawings).
 * @param waterLineMm height of the water mark above the bottom of the face, mm, ≥ 0
 * @param faceHeightMm height of the board face, mm, > 0
 * @returns 0 (top edge) … 1 (bottom edge)
 * @throws RangeError for a negative water line or a face height ≤ 0
 */
export function waterLineFromTop(waterLineMm: number, faceHeightMm: number): number {
  requireNumber("waterLineMm", waterLineMm, { min: 0 });
  requireNumber("faceHeightMm", faceHeightMm, { min: 0, minExclusive: true });
  return Math.min(1, Math.max(0, 1 - waterLineMm / faceHeightMm));
}

/**
 * Whether any part of a tile lies below the water line: its bottom edge is lower than the mark.
 * Formula: bottomMm = faceHeightMm × (gridRows − (gridRow − 1 + rowSpan)) / gridRows;
 * below when bottomMm < waterLineMm. Source: plain proportion (common practice).
 * @param gridRow 1-based row of the tile's top, from the top of the face
 * @param rowSpan rows the tile covers, ≥ 1
 * @throws RangeError when the tile does not fit the grid
 */
export function tileBelowWaterLine(
  tile: { gridRow: number; rowSpan: number },
  board: { gridRows: number; faceHeightMm: number; waterLineMm: number },
): boolean {
  requireNumber("gridRows", board.gridRows, { min: 1 });
  requireNumber("gridRow", tile.gridRow, { min: 1, max: board.gridRows });
  requireNumber("rowSpan", tile.rowSpan, { min: 1, max: board.gridRows - tile.gridRow + 1 });
  waterLineFromTop(board.waterLineMm, board.faceHeightMm);
  const rowsBelowTile = board.gridRows - (tile.gridRow - 1 + tile.rowSpan);
  const bottomMm = (board.faceHeightMm * rowsBelowTile) / board.gridRows;
  return bottomMm < board.waterLineMm;
}
