import { describe, expect, it } from "vitest";
import { fitLogResistance, forecastDryOut, type DryOutPoint } from "../../src/domain/insulation";

const pts = (rows: Array<[number, number]>): DryOutPoint[] => rows.map(([hours, megohms]) => ({ hours, megohms }));

describe("fitLogResistance", () => {
  it("recovers the rate of a known exponential", () => {
    // Constructed: R(t) = 5 · 2^(t/10) MΩ → ln R = ln 5 + (ln 2 / 10) t, slope 0.0693147 /h.
    const fit = fitLogResistance(
      pts([
        [0, 5],
        [10, 10],
        [20, 20],
        [30, 40],
      ]),
    )!;
    expect(fit.slopePerHour).toBeCloseTo(Math.LN2 / 10, 12);
    expect(fit.lnMegohmsAtZero).toBeCloseTo(Math.log(5), 12);
  });

  it("matches a least-squares fit worked by hand", () => {
    // Hand-worked ordinary least squares (NIST/SEMATECH e-Handbook §4.1.4.1 formulas):
    //   t = 0, 1, 2, 3          t̄ = 1.5
    //   y = ln R = 0, 0.5, 0.7, 1.3   ȳ = 2.5 / 4 = 0.625
    //   Sxx = 2.25 + 0.25 + 0.25 + 2.25 = 5
    //   Sxy = (−1.5)(−0.625) + (−0.5)(−0.125) + (0.5)(0.075) + (1.5)(0.675)
    //       = 0.9375 + 0.0625 + 0.0375 + 1.0125 = 2.05
    //   b = Sxy / Sxx = 0.41 per hour;  a = ȳ − b·t̄ = 0.625 − 0.615 = 0.01
    const fit = fitLogResistance(
      pts([
        [0, 1],
        [1, Math.exp(0.5)],
        [2, Math.exp(0.7)],
        [3, Math.exp(1.3)],
      ]),
    )!;
    expect(fit.slopePerHour).toBeCloseTo(0.41, 12);
    expect(fit.lnMegohmsAtZero).toBeCloseTo(0.01, 12);
  });

  it.each([
    [[] as Array<[number, number]>],
    [[[3, 10]] as Array<[number, number]>],
    [
      [
        [3, 10],
        [3, 20],
        [3, 40],
      ] as Array<[number, number]>,
    ], // no spread in time: no line
  ])("gives null when no line can be fitted (%j)", (rows) => {
    expect(fitLogResistance(pts(rows))).toBeNull();
  });
});

describe("forecastDryOut", () => {
  it.each([
    // Constructed from R = 5 · 2^(t/10): doubling 10 h; from 40 MΩ at 30 h to 100 MΩ takes
    // 10 · log2(100/40) = 13.2193 h.
    [
      [
        [0, 5],
        [10, 10],
        [20, 20],
        [30, 40],
      ],
      100,
      13.219280949,
      10,
    ],
    // Hand-worked example above: b = 0.41 /h; doubling ln2/0.41 = 0.693147/0.41 = 1.690603 h; from e^1.3 to
    // e^2: (2 − 1.3) / 0.41 = 1.707317 h.
    [
      [
        [0, 1],
        [1, Math.exp(0.5)],
        [2, Math.exp(0.7)],
        [3, Math.exp(1.3)],
      ],
      Math.exp(2),
      1.707317073,
      1.690603,
    ],
    // Readings out of time order: the latest by hours (30 h, 40 MΩ) is the starting point.
    [
      [
        [30, 40],
        [0, 5],
        [20, 20],
        [10, 10],
      ],
      100,
      13.219280949,
      10,
    ],
  ] as Array<[Array<[number, number]>, number, number, number]>)(
    "%j to %f MΩ: %f h more, doubling every %f h",
    (rows, target, hoursToTarget, doublingHours) => {
      const f = forecastDryOut(pts(rows), target);
      expect(f.hoursToTarget).toBeCloseTo(hoursToTarget, 5);
      expect(f.doublingHours).toBeCloseTo(doublingHours, 5);
    },
  );

  it.each([
    [
      "latest reading already meets the target",
      [
        [0, 5],
        [10, 10],
        [20, 120],
      ],
      100,
      0,
    ],
    ["meets the target with a single reading (a fact, not a forecast)", [[0, 150]], 100, 0],
    [
      "meets the target even when falling",
      [
        [0, 300],
        [5, 250],
        [10, 200],
      ],
      100,
      0,
    ],
    [
      "fewer than three readings",
      [
        [0, 5],
        [10, 10],
      ],
      100,
      null,
    ],
    [
      "flat trend",
      [
        [0, 10],
        [5, 10],
        [10, 10],
      ],
      100,
      null,
    ],
    [
      "falling trend",
      [
        [0, 40],
        [5, 30],
        [10, 20],
      ],
      100,
      null,
    ],
  ] as Array<[string, Array<[number, number]>, number, number | null]>)("%s", (_label, rows, target, expected) => {
    expect(forecastDryOut(pts(rows), target).hoursToTarget).toBe(expected);
  });

  it("gives a doubling time only for a rising trend of three or more readings", () => {
    expect(
      forecastDryOut(
        pts([
          [0, 5],
          [10, 10],
        ]),
        100,
      ).doublingHours,
    ).toBeNull();
    expect(
      forecastDryOut(
        pts([
          [0, 40],
          [5, 30],
          [10, 20],
        ]),
        100,
      ).doublingHours,
    ).toBeNull();
    expect(
      forecastDryOut(
        pts([
          [0, 5],
          [10, 10],
          [20, 120],
        ]),
        100,
      ).doublingHours,
    ).toBeGreaterThan(0);
  });

  it("a higher target never takes less time (property)", () => {
    const rows = pts([
      [0, 2],
      [6, 3.1],
      [12, 5.2],
      [18, 7.9],
    ]);
    let previous = 0;
    for (const target of [8, 10, 20, 50, 100, 1000]) {
      const h = forecastDryOut(rows, target).hoursToTarget!;
      expect(h).toBeGreaterThan(previous);
      previous = h;
    }
  });

  it.each([
    [[{ hours: -1, megohms: 5 }], 100],
    [[{ hours: 0, megohms: 0 }], 100],
    [[{ hours: NaN, megohms: 5 }], 100],
    [[{ hours: 0, megohms: 5 }], 0],
    [[{ hours: 0, megohms: 5 }], NaN],
  ])("rejects %j with target %f", (points, target) => {
    expect(() => forecastDryOut(points, target)).toThrow(RangeError);
  });
});
