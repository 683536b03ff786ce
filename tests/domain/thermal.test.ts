import { describe, expect, it } from "vitest";
import { THERMAL_ACTIONS, classifyTemperatureRise } from "../../src/domain/thermal";

// Bands: NETA ATS-2003 Table 100.18 "Thermographic Survey Suggested Actions Based on
// Temperature Rise" (dokumen.tips / scribd copies): over similar 1–3, 4–15, >15 °C;
// over ambient 1–10, 11–20, 21–40, >40 °C. Values between NETA's whole degrees follow
// Tideline's documented rule: each band closes at its printed upper number.
describe("classifyTemperatureRise over a similar component", () => {
  it.each([
    [0, 0], // NETA 100.18: below the first band, no action
    [0.9, 0],
    [1, 1], // NETA 100.18: 1–3 °C → possible deficiency
    [2, 1],
    [3, 1], // exactly 3 stays level 1
    [3.5, 2], // between 3 and 4: Tideline rule → level 2
    [4, 2], // NETA 100.18: 4–15 °C → probable deficiency
    [15, 2], // exactly 15 stays level 2
    [15.1, 4], // NETA 100.18: >15 °C → major discrepancy
    [60, 4],
    [-5, 0], // colder than its neighbour: no heating deficiency
  ])("%f °C → level %i", (overSimilarC, level) => {
    expect(classifyTemperatureRise({ overSimilarC }).level).toBe(level);
  });
});

describe("classifyTemperatureRise over ambient", () => {
  it.each([
    [0.5, 0],
    [1, 1], // NETA 100.18: 1–10 °C → level 1
    [10, 1], // exactly 10 stays level 1
    [10.5, 2], // between 10 and 11: Tideline rule → level 2
    [11, 2], // NETA 100.18: 11–20 °C → level 2
    [20, 2], // exactly 20 stays level 2
    [20.5, 3],
    [21, 3], // NETA 100.18: 21–40 °C → monitor
    [40, 3], // exactly 40 stays level 3
    [40.01, 4], // NETA 100.18: >40 °C → repair immediately
    [-3, 0],
  ])("%f °C → level %i", (overAmbientC, level) => {
    expect(classifyTemperatureRise({ overAmbientC }).level).toBe(level);
  });
});

describe("classifyTemperatureRise with both comparisons", () => {
  it.each([
    [2, 35, 3], // ambient band is more severe
    [16, 5, 4], // similar band is more severe
    [5, 15, 2], // both level 2
    [0, 0, 0],
    [-1, 45, 4],
  ])("similar %f °C and ambient %f °C → level %i (more severe wins)", (overSimilarC, overAmbientC, level) => {
    expect(classifyTemperatureRise({ overSimilarC, overAmbientC }).level).toBe(level);
  });

  it("is never less severe than either comparison alone (property)", () => {
    for (let s = -2; s <= 20; s += 0.5) {
      for (let a = -2; a <= 45; a += 0.5) {
        const both = classifyTemperatureRise({ overSimilarC: s, overAmbientC: a }).level;
        expect(both).toBe(
          Math.max(
            classifyTemperatureRise({ overSimilarC: s }).level,
            classifyTemperatureRise({ overAmbientC: a }).level,
          ),
        );
      }
    }
  });
});

describe("actions and errors", () => {
  it.each([
    [0, /no action/i],
    [1, /investigate/i], // NETA 100.18: "warrants investigation"
    [2, /repair as time permits/i], // NETA 100.18
    [3, /monitor/i], // NETA 100.18
    [4, /repair immediately/i], // NETA 100.18
  ] as const)("level %i action reads %s", (level, pattern) => {
    expect(THERMAL_ACTIONS[level]).toMatch(pattern);
    for (const action of Object.values(THERMAL_ACTIONS)) expect(action).not.toMatch(/safe/i);
  });

  it("returns the action text of its level", () => {
    expect(classifyTemperatureRise({ overAmbientC: 25 })).toEqual({ level: 3, action: THERMAL_ACTIONS[3] });
  });

  it.each([[{}], [{ overSimilarC: NaN }], [{ overAmbientC: Infinity }], [{ overSimilarC: 2, overAmbientC: NaN }]])(
    "rejects %o with RangeError",
    (input) => {
      expect(() => classifyTemperatureRise(input)).toThrow(RangeError);
    },
  );
});
