import { describe, expect, it } from "vitest";
import { contactResistanceOutliers } from "../../src/domain/contacts";

describe("contactResistanceOutliers", () => {
  it.each([
    // Schneider Electric data bulletin 0600DB1901: 50, 60, 76 "would fail" the NETA 50 % test…
    [[50, 60, 76], [2]],
    // …while 130, 180, 150 would pass (limit 1.5 × 130 = 195).
    [[130, 180, 150], []],
    // testguy.net wiki: lowest 20 µΩ → others may reach 1.5 × 20 = 30 µΩ.
    [[20, 30, 31], [2]],
    // NETA ATS/MTS: "more than 50 % of the lowest" — exactly 50 % is not flagged.
    [[50, 75, 60], []],
    [[0.7, 1.05], []], // exactly 1.5 × in decimal, not flagged despite binary rounding
    [
      [100, 151, 149, 150.5],
      [1, 3],
    ], // limit 150 µΩ (NETA 50 % rule)
    [[200, 90, 95], [0]], // the lowest need not be first
    [[40, 40, 40], []],
    [
      [10, 100, 1000],
      [1, 2],
    ],
  ])("%j → flagged %j", (readings, flagged) => {
    expect(contactResistanceOutliers(readings)).toEqual(flagged);
  });

  it.each([[[]], [[42]]])("gives [] for fewer than two readings (%j)", (readings) => {
    expect(contactResistanceOutliers(readings)).toEqual([]);
  });

  it.each([[[50, 0, 60]], [[50, -3]], [[50, NaN]], [[50, Infinity]], [[0]]])("rejects %j", (readings) => {
    expect(() => contactResistanceOutliers(readings)).toThrow(RangeError);
  });

  it("never flags the lowest pole and scales with the readings (property)", () => {
    const sets = [
      [12, 19, 13],
      [80, 81, 200, 79],
      [5, 7.6, 7.4],
    ];
    for (const set of sets) {
      const lowestIndex = set.indexOf(Math.min(...set));
      const flagged = contactResistanceOutliers(set);
      expect(flagged).not.toContain(lowestIndex);
      expect(contactResistanceOutliers(set.map((v) => v * 1000))).toEqual(flagged);
    }
  });
});
