/**
 * A phone's kept copy of a board's readings from before the board's answer carried its totals, its dry-out
 * series and its components with readings (2026-12-05): the page gets them made from the lists the copy has,
 * so it opens with no signal instead of failing on a missing field; a copy that has them passes unchanged.
 */
import { describe, expect, it } from "vitest";
import { withSeries } from "../../src/features/readings/api";
import type { BoardReadings } from "../../src/schemas/readings";

const reading = (componentId: string | null, circuit: string, conductors: string, measuredAt: string) =>
  ({ componentId, circuit, conductors, measuredAt, designation: componentId ? `Q${componentId}` : null }) as never;

const old = {
  board: { id: "b", name: "Main switchboard", nominalVolts: 450 },
  positions: [],
  insulation: [
    reading("1", "Galley", "A-G", "2026-11-22T10:00:00.000Z"),
    reading(null, "Shore supply", "A-G", "2026-11-22T09:00:00.000Z"),
    reading("1", "Galley", "B-G", "2026-11-21T10:00:00.000Z"),
  ],
  contacts: [reading("2", "Steering gear", "", "2026-11-20T10:00:00.000Z")],
  thermal: [],
  groundChecks: [{} as never, {} as never],
  tripTests: [],
  stepTests: [],
  groundHunts: [],
  phaseComparisons: [],
} as unknown as BoardReadings;

describe("a kept copy of a board's readings without totals and series", () => {
  it("counts what it lists", () => {
    expect(withSeries(old).totals).toEqual({
      insulation: 3,
      contacts: 1,
      thermal: 0,
      groundChecks: 2,
      tripTests: 0,
      stepTests: 0,
    });
  });

  it("makes the series from its insulation readings, newest first, and the components from every list", () => {
    const d = withSeries(old);
    expect(d.dryOutSeries).toEqual([
      {
        componentId: "1",
        designation: "Q1",
        circuit: "Galley",
        conductors: ["A-G", "B-G"],
        count: 2,
        latestAt: "2026-11-22T10:00:00.000Z",
      },
      {
        componentId: null,
        designation: null,
        circuit: "Shore supply",
        conductors: ["A-G"],
        count: 1,
        latestAt: "2026-11-22T09:00:00.000Z",
      },
    ]);
    expect(d.componentsWithReadings).toEqual([
      { componentId: "1", designation: "Q1" },
      { componentId: "2", designation: "Q2" },
    ]);
  });

  it("passes a copy that has them through unchanged", () => {
    const full = withSeries(old);
    expect(withSeries(full)).toBe(full);
  });
});
