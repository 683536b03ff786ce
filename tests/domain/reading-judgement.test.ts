import { describe, expect, it } from "vitest";
import { contactResistanceOutliers } from "../../src/domain/contacts";
import { groundLampVoltages } from "../../src/domain/ground-detection";
import {
  DEFAULT_CRITERIA,
  contactOutliersAt,
  correctInsulation,
  judgeContactReading,
  judgeGroundCheck,
  judgeInsulationReading,
  judgeThermalScan,
  type ReadingCriteria,
} from "../../src/domain/reading-judgement";

const neta = DEFAULT_CRITERIA;
const ieee: ReadingCriteria = { ...DEFAULT_CRITERIA, correctionMethod: "ieee43_40c" };
const reading = (megohms: number, equipmentTempC: number, extra = {}) => ({
  megohms,
  equipmentTempC,
  testVoltsDc: 1000,
  ratedVolts: 450,
  ...extra,
});

describe("correctInsulation", () => {
  it.each([
    [60, 30, neta, 94.8, 20], // NETA Table 100.14 solid 30 °C ×1.58 (value from memory, see insulation.test.ts)
    [200, 12, neta, 140.4, 20], // interpolated 0.63 + 0.4·(0.81 − 0.63) = 0.702 (NETA 100.14 rows from memory)
    [50, 30, ieee, 25, 40], // IEEE Std 43 halving rule: one halving from 30 °C to 40 °C
    [100, 50, ieee, 200, 40], // IEEE Std 43: hotter than base doubles per 10 °C
  ] as const)("%f MΩ at %f °C → %f MΩ at the base of %o", (m, t, c, expected, base) => {
    const r = correctInsulation(m, t, c);
    expect(r.correctedMegohms).toBeCloseTo(expected, 9);
    expect(r.baseTemperatureC).toBe(base);
    expect(r.source.table).toMatch(c.correctionMethod === "neta_20c" ? /100\.14/ : /IEEE Std 43/);
  });

  it("says beside the figure when the row it used is recalled rather than checked against the table", () => {
    expect(correctInsulation(60, 30, neta).source.text).toMatch(/from memory: check it against your edition/);
    const oil = { ...neta, insulationMedium: "oil" as const };
    expect(correctInsulation(60, 30, oil).source.text).not.toMatch(/from memory/);
    expect(correctInsulation(60, 80, oil).source.text).toMatch(/from memory/);
  });

  it.each([
    [120, neta],
    [105, ieee],
    [-11, neta],
  ] as const)("rejects %f °C outside the method's range (%o)", (t, c) => {
    expect(() => correctInsulation(100, t, c)).toThrow(RangeError);
  });
});

describe("judgeInsulationReading", () => {
  it.each([
    // 450 V board → ANSI/NETA MTS-2019 Table 100.1 600 V row: 100 MΩ minimum, 1000 V DC.
    ["60 MΩ at 30 °C corrects to 94.8 MΩ, under 100 MΩ", reading(60, 30), neta, null, "below_minimum"],
    ["80 MΩ at 30 °C corrects to 126.4 MΩ, reaches 100 MΩ", reading(80, 30), neta, null, "meets"],
    [
      "a site minimum of 200 MΩ puts 126.4 MΩ below",
      reading(80, 30),
      { ...neta, minimumMegohms: 200, minimumSource: "Crew rule" },
      null,
      "below_minimum",
    ],
    [
      "a manufacturer's 50 MΩ replaces the site's 200 MΩ",
      reading(80, 30),
      { ...neta, minimumMegohms: 200 },
      { minimumMegohms: 50, source: "Maker's leaflet" },
      "meets",
    ],
    // IEEE Std 43-2000: class B minimum PI 2.0; PI = 300/200 = 1.5
    [
      "PI 1.5 under class B's 2.0 is investigated",
      reading(400, 20, { r1min: 200, r10min: 300 }),
      neta,
      null,
      "investigate",
    ],
    [
      "PI 1.5 meets class A's 1.5",
      reading(400, 20, { r1min: 200, r10min: 300 }),
      { ...neta, thermalClass: "A" },
      null,
      "meets",
    ],
    // DAR = 60 s / 30 s = 180/200 = 0.9 < 1 (common practice: falling during the test)
    [
      "a falling absorption ratio is investigated",
      reading(400, 20, { r30s: 200, r1min: 180 }),
      neta,
      null,
      "investigate",
    ],
  ] as const)("%s", (_label, r, c, maker, verdict) => {
    const j = judgeInsulationReading(r, c, maker);
    expect(j.verdict).toBe(verdict);
    for (const text of [...j.reasons, ...j.notes]) expect(text).not.toMatch(/\bsafe\b/i);
  });

  it("names the table row it used and notes a low test voltage", () => {
    const j = judgeInsulationReading({ ...reading(80, 30), testVoltsDc: 500 }, neta);
    expect(j.minimum).toMatchObject({ megohms: 100, from: "table" });
    expect(j.minimum.source.table).toBe("ANSI/NETA MTS-2019 Table 100.1");
    expect(j.notes.join(" ")).toContain("1000 V DC");
  });

  it("says which source wins: manufacturer, then site, then table", () => {
    expect(
      judgeInsulationReading(reading(80, 30), { ...neta, minimumMegohms: 200 }, { minimumMegohms: 50, source: "m" })
        .minimum.from,
    ).toBe("manufacturer");
    expect(
      judgeInsulationReading(
        reading(80, 30),
        { ...neta, minimumMegohms: 200 },
        { source: "contacts only", maximumMicroOhms: 90 },
      ).minimum.from,
    ).toBe("site");
    expect(judgeInsulationReading(reading(80, 30), neta).minimum.from).toBe("table");
  });
});

describe("contactOutliersAt", () => {
  it.each([
    [[50, 60, 76], 50, [2]], // Schneider Electric 0600DB1901 worked example (NETA 50 %)
    [[50, 60, 76], 60, []], // limit 1.6 × 50 = 80 µΩ (arithmetic)
    [[50, 60, 76], 10, [1, 2]], // limit 55 µΩ (arithmetic)
    [[50, 75, 60], 50, []], // exactly 50 % is not flagged (NETA wording "more than")
  ])("%j at %f %% → %j", (poles, percent, flagged) => {
    expect(contactOutliersAt(poles, percent)).toEqual(flagged);
  });

  it("at 50 % agrees with contactResistanceOutliers (property)", () => {
    for (const set of [
      [12, 19, 13],
      [80, 81, 200, 79],
      [5, 7.6, 7.4],
      [0.7, 1.05],
    ])
      expect(contactOutliersAt(set, 50)).toEqual(contactResistanceOutliers(set));
  });

  it.each([
    [[50, 0], 50],
    [[50, 60], 0],
    [[50, 60], NaN],
  ])("rejects %j at %f %%", (poles, percent) => {
    expect(() => contactOutliersAt(poles, percent)).toThrow(RangeError);
  });
});

describe("judgeContactReading", () => {
  it("flags the outlier pole and names NETA as the source", () => {
    const j = judgeContactReading([50, 60, 76], neta);
    expect(j).toMatchObject({ outliers: [2], verdict: "investigate", limitMicroOhms: 75 });
    expect(j.reasons[0]).toContain("Pole 3");
  });

  it("a manufacturer's maximum flags poles the 50 % rule passes", () => {
    const j = judgeContactReading([130, 180, 150], neta, { maximumMicroOhms: 160, source: "Maker's data" });
    expect(j.outliers).toEqual([]); // Schneider 0600DB1901: passes the 50 % test
    expect(j.overMaximum).toEqual([1]);
    expect(j.verdict).toBe("investigate");
  });
});

describe("judgeThermalScan", () => {
  it.each([
    [{ componentTempC: 45, similarTempC: 40 }, 2, "investigate"], // 5 °C over similar → NETA 100.18 level 2
    [{ componentTempC: 30, ambientTempC: 25 }, 1, "investigate"], // 5 °C over ambient → level 1
    [{ componentTempC: 72, similarTempC: 60, ambientTempC: 30 }, 4, "investigate"], // 42 over ambient → level 4
    [{ componentTempC: 25.5, similarTempC: 25 }, 0, "meets"], // under 1 °C → no action
  ])("%o → level %i", (scan, level, verdict) => {
    const j = judgeThermalScan(scan);
    expect(j.level).toBe(level);
    expect(j.verdict).toBe(verdict);
    expect(j.source.table).toMatch(/100\.18/);
  });

  it("needs a similar component or ambient to compare with", () => {
    expect(() => judgeThermalScan({ componentTempC: 40 })).toThrow(RangeError);
  });
});

describe("judgeGroundCheck", () => {
  it("names the dark lamp's phase in words, with the hull on a vessel", () => {
    const j = judgeGroundCheck({ lineVolts: 450, lamps: { A: "bright", B: "dark", C: "bright" }, siteKind: "vessel" });
    expect(j.phase).toBe("B");
    expect(j.words).toBe(
      "Phase B lamp dark, A and C bright: suspect a ground on phase B — on a vessel, a fault to the hull.",
    );
    expect(j.verdict).toBe("investigate");
  });

  it("describes unequal healthy lamps one by one", () => {
    const j = judgeGroundCheck({ lineVolts: 450, lamps: { A: "dim", B: "bright", C: "dark" }, siteKind: "plant" });
    expect(j.words).toBe("Phase C lamp dark, A dim and B bright: suspect a ground on phase C.");
  });

  it("balanced lamps meet the criterion; all dark is investigated", () => {
    expect(judgeGroundCheck({ lineVolts: 450, lamps: { A: "bright", B: "bright", C: "bright" } }).verdict).toBe(
      "meets",
    );
    expect(judgeGroundCheck({ lineVolts: 450, lamps: { A: "dark", B: "dark", C: "dark" } }).verdict).toBe(
      "investigate",
    );
  });

  it("from volts, round-trips the fault phase and resistance of the Millman model", () => {
    const v = groundLampVoltages({ lineVolts: 450, faultPhase: "A", faultOhms: 1000, branchOhms: 2000 });
    const j = judgeGroundCheck({ lineVolts: 450, volts: v, branchOhms: 2000, siteKind: "vessel" });
    expect(j.phase).toBe("A");
    expect(j.faultOhms).toBeCloseTo(1000, 6);
    // By hand: k = 2000/(2000 + 3·1000) = 0.4, V_ph = 450/√3 = 259.8 V; faulted 259.8 × 0.6 = 155.9 V,
    // healthy 259.8 × √(1 + 0.4 + 0.16) = 324.5 V (closed form in ground-detection.ts, Millman's theorem).
    expect(j.words).toMatch(
      /^Phase A lamp at 156 V to ground, B and C 324 V: suspect a ground on phase A — on a vessel, a fault to the hull\./,
    );
  });

  it("needs lamps or volts", () => {
    expect(() => judgeGroundCheck({ lineVolts: 450 })).toThrow(RangeError);
  });
});
