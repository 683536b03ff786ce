import { describe, expect, it } from "vitest";
import { tileBelowWaterLine, waterLineFromTop } from "../../src/domain/board-geometry";

describe("waterLineFromTop", () => {
  // Plain proportion on the elevation drawing (common practice; no published source needed).
  it.each([
    [0, 2000, 1], // common practice: no water → line at the bottom edge
    [500, 2000, 0.75], // common practice: a quarter up the face
    [1000, 2000, 0.5], // common practice: half way
    [2000, 2000, 0], // common practice: up to the top edge
    [2600, 2000, 0], // common practice: water above the face covers all of it (clamped)
  ])("a %i mm water line on a %i mm face is drawn %f of the way down", (water, face, expected) => {
    expect(waterLineFromTop(water, face)).toBeCloseTo(expected, 10);
  });

  it.each([
    [-1, 2000],
    [500, 0],
    [Number.NaN, 2000],
  ])("rejects water %f on face %f with a RangeError", (water, face) => {
    expect(() => waterLineFromTop(water, face)).toThrow(RangeError);
  });
});

describe("tileBelowWaterLine", () => {
  const board = { gridRows: 8, faceHeightMm: 2000, waterLineMm: 600 }; // each row 250 mm
  it.each([
    [8, 1, true], // common practice: bottom row spans 0–250 mm, under a 600 mm line
    [6, 1, true], // common practice: row 6 spans 500–750 mm, its bottom is under 600 mm
    [5, 1, false], // common practice: row 5 spans 750–1000 mm, all above the line
    [4, 2, false], // common practice: rows 4–5 bottom at 750 mm
    [5, 2, true], // common practice: rows 5–6 reach down to 500 mm
    [1, 8, true], // common practice: a full-height tile always reaches the bottom
  ])("a tile at row %i spanning %i rows is below the line: %s", (gridRow, rowSpan, expected) => {
    expect(tileBelowWaterLine({ gridRow, rowSpan }, board)).toBe(expected);
  });

  it("a tile whose bottom is exactly at the line is not below it (common practice: touching is not under)", () => {
    expect(tileBelowWaterLine({ gridRow: 4, rowSpan: 1 }, { gridRows: 4, faceHeightMm: 1000, waterLineMm: 0 })).toBe(
      false,
    );
  });

  it.each([
    [0, 1],
    [9, 1],
    [8, 2],
  ])("rejects a tile at row %i spanning %i rows that does not fit the grid", (gridRow, rowSpan) => {
    expect(() => tileBelowWaterLine({ gridRow, rowSpan }, board)).toThrow(RangeError);
  });
});
