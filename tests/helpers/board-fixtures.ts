import type { TileRow } from "../../src/schemas/inventory";

/** One position's tile as the board's pages answer it: an empty position at row 1, column 1 unless `extra` says. */
export const tileRow = (id: string, extra: Partial<TileRow> = {}): TileRow => ({
  id,
  designation: id,
  kind: "molded_case_breaker",
  gridRow: 1,
  gridCol: 1,
  rowSpan: 1,
  colSpan: 1,
  circuit: "",
  sectionId: null,
  sortOrder: 0,
  version: 1,
  component: null,
  latest: null,
  photoCount: 0,
  openDefectCount: 0,
  ...extra,
});

/** A board's head as the first page answers it (an invented vessel's main switchboard). */
export const boardRow = {
  id: "b1",
  name: "Main switchboard",
  location: "",
  nominalVolts: 440,
  phases: 3 as const,
  frequencyHz: 60,
  earthing: "ungrounded" as const,
  yearBuilt: null,
  drawingRef: "",
  faceHeightMm: null,
  waterLineMm: null,
  gridRows: 10,
  gridCols: 10,
  notes: "",
  version: 1,
  createdAt: "2026-12-01T00:00:00Z",
  updatedAt: "2026-12-01T00:00:00Z",
};
