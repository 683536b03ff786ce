/**
 * Readings as a flooded board really gives them. Each check value sits beside
 * its source; "from memory" marks values not checked against the printed page here.
 */
import { describe, expect, it } from "vitest";
import {
  assessDryOut,
  dewPointC,
  forecastDryOut,
  insulationReadingValidity,
  judgeInsulation,
  netaCorrectionTo20C,
  polarizationIndex,
  qualifiedRatio,
  testVoltageAdvice,
} from "../../src/domain/insulation";
import {
  DEFAULT_CRITERIA,
  judgeGroundCheck,
  judgeInsulationReading,
  judgeThermalScan,
} from "../../src/domain/reading-judgement";
import { scaleRiseToRatedLoad } from "../../src/domain/thermal";
import { recommendDisposition } from "../../src/domain/flood-guidance";
import { priorityScore, rankDefects } from "../../src/domain/priority";
import { inverseTimeBand, judgeInstantaneousTrip, judgeInverseTimeTrip } from "../../src/domain/trip-test";
import { comparePhases, compareWithPrevious, judgeStepVoltage } from "../../src/domain/insulation-comparison";
import {
  faultEstimateRange,
  faultOhmsWithCapacitance,
  groundHuntFinding,
  locateGround,
} from "../../src/domain/ground-detection";

const NETA20 = { ...DEFAULT_CRITERIA };
const reading = { testVoltsDc: 1000, ratedVolts: 450, ambientTempC: 20, humidityPercent: 50 };

describe("a dead short is a reading", () => {
  it("0 MΩ corrects to 0 and is below any minimum (NETA MTS Table 100.1 minimum 100 MΩ for a 450 V board)", () => {
    expect(netaCorrectionTo20C(0, 20, "solid")).toBe(0);
    const j = judgeInsulationReading({ ...reading, megohms: 0, equipmentTempC: 20 }, NETA20);
    expect(j.verdict).toBe("below_minimum");
    expect(j.reasons[0]).toMatch(/dead short/);
  });
  it("a PI with a zero reading is not computable, not an error (IEEE Std 43: PI = R10/R1)", () => {
    expect(polarizationIndex(0, 0)).toBeNull();
    const j = judgeInsulationReading({ ...reading, megohms: 0, equipmentTempC: 20, r1min: 0, r10min: 0 }, NETA20);
    expect(j.piBound).toBe("not_computable");
  });
});

describe("over-range and under-resolution readings", () => {
  it.each([
    // Interval arithmetic: numerator ≥ shown, denominator exact → ratio ≥ shown ratio.
    [{ megohms: 1000 }, { megohms: 2000, qualifier: "at_or_above" as const }, "at_least", 2],
    [
      { megohms: 2000, qualifier: "at_or_above" as const },
      { megohms: 2000, qualifier: "at_or_above" as const },
      "not_computable",
      null,
    ],
    [{ megohms: 0.01, qualifier: "below" as const }, { megohms: 5 }, "at_least", 500],
    [{ megohms: 2000, qualifier: "at_or_above" as const }, { megohms: 1500 }, "at_most", 0.75],
  ])("ratio of %o to %o is %s %s", (d, n, bound, value) => {
    const r = qualifiedRatio(d, n);
    expect(r.bound).toBe(bound);
    if (value === null) expect(r.value).toBeNull();
    else expect(r.value).toBeCloseTo(value, 9);
  });
  it("2000 MΩ at the meter's limit for both 1 and 10 minutes no longer reads PI 1.0 → investigate", () => {
    const j = judgeInsulationReading(
      {
        ...reading,
        megohms: 2000,
        megohmsQualifier: "at_or_above",
        equipmentTempC: 20,
        r1min: 2000,
        r1minQualifier: "at_or_above",
        r10min: 2000,
        r10minQualifier: "at_or_above",
      },
      NETA20,
    );
    expect(j.piBound).toBe("not_computable");
    expect(j.verdict).toBe("meets");
  });
  it("IEEE 43 (clause from memory): 1-min reading above 5 000 MΩ at 40 °C → PI not required", () => {
    // 6 000 MΩ at 40 °C is 6 000 MΩ at 40 °C (halving rule: factor 1 at 40 °C); a PI of 1.1 is not held against it.
    const j = judgeInsulationReading(
      { ...reading, megohms: 6000, equipmentTempC: 40, r1min: 6000, r10min: 6600 },
      NETA20,
    );
    expect(j.piNotRequired).toBe(true);
    expect(j.verdict).toBe("meets");
    // 2 000 MΩ at 20 °C is 500 MΩ at 40 °C: the PI of 1.1 still counts (IEEE 43 class B minimum 2.0).
    const low = judgeInsulationReading(
      { ...reading, megohms: 2000, equipmentTempC: 20, r1min: 2000, r10min: 2200 },
      NETA20,
    );
    expect(low.piNotRequired).toBe(false);
    expect(low.verdict).toBe("investigate");
  });
  it("an over-range value under the minimum cannot be judged either way", () => {
    expect(judgeInsulation({ correctedMegohms: 50, qualifier: "at_or_above", minimumMegohms: 100 }).verdict).toBe(
      "investigate",
    );
    expect(judgeInsulation({ correctedMegohms: 0.5, qualifier: "below", minimumMegohms: 100 }).verdict).toBe(
      "below_minimum",
    );
  });
});

/** Buck (1981) saturation vapour pressure over water, hPa: an independent formula for the dew point. */
const buck = (t: number) => 6.1121 * Math.exp((18.678 - t / 234.5) * (t / (257.14 + t)));
function dewPointByBuck(t: number, rh: number) {
  const e = (rh / 100) * buck(t);
  let lo = -60;
  let hi = t;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    if (buck(mid) < e) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe("dew point gate", () => {
  it.each([
    [18, 85, 15.4], // worked example (Magnus, Alduchov–Eskridge coefficients)
    [20, 50, 9.3], // psychrometric tables (e.g. ASHRAE Fundamentals chart; from memory)
    [30, 70, 23.9], // psychrometric tables (from memory)
    [25, 100, 25.0], // saturated air: dew point = air temperature (definition)
  ])("%f °C at %f %% RH → dew point %f °C", (t, rh, td) => {
    expect(dewPointC(t, rh)).toBeCloseTo(td, 1);
  });
  it.each([
    [-10, 60],
    [0, 90],
    [10, 30],
    [35, 40],
    [50, 95],
  ])("agrees with Buck (1981) within 0.2 K at %f °C, %f %%", (t, rh) => {
    expect(Math.abs(dewPointC(t, rh) - dewPointByBuck(t, rh))).toBeLessThan(0.2);
  });
  it("500 MΩ at −8 °C (NETA factor 0.278 → 139 MΩ) is not valid for judging: below freezing", () => {
    const j = judgeInsulationReading(
      { ...reading, megohms: 500, equipmentTempC: -8, ambientTempC: -8, humidityPercent: 60 },
      NETA20,
    );
    expect(j.correctedMegohms).toBeCloseTo(139, 0);
    expect(j.verdict).toBe("not_valid");
    expect(j.validForJudging).toBe(false);
  });
  it("equipment at 17 °C in 18 °C air at 85 % RH (dew point 15.4 °C) is inside the 3 K margin (common practice)", () => {
    expect(insulationReadingValidity({ equipmentTempC: 17, ambientTempC: 18, humidityPercent: 85 }).valid).toBe(false);
    expect(insulationReadingValidity({ equipmentTempC: 19, ambientTempC: 18, humidityPercent: 85 }).valid).toBe(true);
    expect(
      insulationReadingValidity({ equipmentTempC: 17, ambientTempC: 18, humidityPercent: 85, marginK: 1 }).valid,
    ).toBe(true);
  });
});

describe("dry-out levelling off", () => {
  // Readings 10 → 95 MΩ flattening near 97 MΩ, every 2 h.
  const flattening = [10, 35, 70, 88, 94, 96, 97].map((megohms, i) => ({ hours: 2 * i, megohms }));
  it("the whole-series fit promised the minimum soon; the recent window says levelling off below it", () => {
    expect(forecastDryOut(flattening, 100).hoursToTarget!).toBeLessThan(2);
    const a = assessDryOut(flattening, 100);
    expect(a.state).toBe("levelling_below");
    expect(a.message).toMatch(/drying alone may not get there/);
    expect(a.hoursToTarget).toBeNull();
  });
  it("a clean exponential gives a range that collapses to the exact value (R = 5·2^(t/10): 40 → 100 MΩ in 10·log2 2.5 = 13.219 h)", () => {
    const a = assessDryOut(
      [0, 10, 20, 30].map((h) => ({ hours: h, megohms: 5 * 2 ** (h / 10) })),
      100,
    );
    expect(a.state).toBe("rising");
    expect(a.hoursToTarget!.central).toBeCloseTo(13.219280949, 6);
    expect(a.hoursToTarget!.low).toBeCloseTo(13.219280949, 6);
    expect(a.hoursToTarget!.high).toBeCloseTo(13.219280949, 6);
  });
  it("noisy readings give low < central < high", () => {
    const a = assessDryOut(
      [
        [0, 10],
        [4, 16],
        [8, 22],
        [12, 40],
      ].map(([hours, megohms]) => ({ hours, megohms })),
      100,
    );
    expect(a.hoursToTarget!.low).toBeLessThan(a.hoursToTarget!.central);
    expect(a.hoursToTarget!.high!).toBeGreaterThan(a.hoursToTarget!.central);
  });
  it("complete only when stable (±5 %) at temperature with the PI met (common practice)", () => {
    const stable = [
      [0, 118, 40, 2.4],
      [4, 121, 40, 2.5],
      [8, 122, 41, 2.6],
    ].map(([hours, megohms, temperatureC, pi]) => ({ hours, megohms, temperatureC, pi }));
    expect(assessDryOut(stable, 100, { minimumPi: 2, targetTemperatureC: 40 }).state).toBe("complete");
    expect(assessDryOut(stable, 100, { minimumPi: 3, targetTemperatureC: 40 }).state).toBe("reached");
    const climbing = stable.map((p, i) => ({ ...p, megohms: 100 + 40 * i }));
    expect(assessDryOut(climbing, 100, { minimumPi: 2 }).state).toBe("reached");
  });
});

describe("thermal rise scaled to rated load (ΔT ∝ (I/I_rated)², common practice)", () => {
  it("8 °C over a similar part at 50 % load scales to 32 °C: NETA Table 100.18 level 2 → level 4", () => {
    expect(scaleRiseToRatedLoad(8, 50).scaledRiseC).toBeCloseTo(32, 6); // 8 · (100/50)² = 32
    const j = judgeThermalScan({ componentTempC: 38, similarTempC: 30, loadPercent: 50 });
    expect(j.measuredLevel).toBe(2);
    expect(j.scaledLevel).toBe(4);
    expect(j.level).toBe(4);
    expect(j.warnings).toEqual([]);
  });
  it("under 40 % load the measured level stands and the scaled one is for reference (common practice: low-load scans show little)", () => {
    expect(scaleRiseToRatedLoad(8, 30).scaledRiseC).toBeCloseTo(88.89, 2); // 8 · (1/0.3)²
    const j = judgeThermalScan({ componentTempC: 38, similarTempC: 30, loadPercent: 30 });
    expect(j.measuredLevel).toBe(2);
    expect(j.scaledLevel).toBe(4);
    expect(j.level).toBe(2);
    expect(j.warnings[0]).toMatch(
      /below about 40 %.*the level is the one measured; scaled to full load the same rise would read level 4/,
    );
    // 0.5 °C at 5 % load is ×400 when scaled (200 °C): not a level-4 "repair immediately" on its own.
    const faint = judgeThermalScan({ componentTempC: 20.5, similarTempC: 20, loadPercent: 5 });
    expect(faint.scaledOverSimilarC).toBeCloseTo(200, 6);
    expect(faint.level).toBe(0);
  });
  it("at full load nothing is scaled", () => {
    const j = judgeThermalScan({ componentTempC: 38, similarTempC: 30, loadPercent: 100 });
    expect(j.scaledOverSimilarC).toBeNull();
    expect(j.level).toBe(2);
  });
});

describe("evidence of water contact overrides the water line (NEMA GD 1, from memory)", () => {
  const base = { waterType: "fresh" as const, belowWaterLine: false, contaminants: [] as never[] };
  it("a molded-case breaker above the line with silt on it is replaced, not cleaned", () => {
    const r = recommendDisposition({ ...base, kind: "molded_case_breaker", contaminants: ["silt"] });
    expect(r.disposition).toBe("replace");
    expect(r.reasons.join(" ")).toMatch(/overrides the recorded water line/);
  });
  it.each([
    ["enclosed_switch", "replace"],
    ["electronic_trip_unit", "replace"],
    ["switch", "rebuild"],
  ] as const)("%s submerged → %s", (kind, d) => {
    expect(recommendDisposition({ ...base, kind, belowWaterLine: true }).disposition).toBe(d);
  });
  it("oil is weighed: a busbar above the line → rebuild; a sealed breaker → replace", () => {
    expect(recommendDisposition({ ...base, kind: "busbar", contaminants: ["oil"] }).disposition).toBe("rebuild");
    expect(recommendDisposition({ ...base, kind: "molded_case_breaker", contaminants: ["oil"] }).disposition).toBe(
      "replace",
    );
  });
});

describe("safety-critical ranks above every non-safety defect", () => {
  it("a 10-point safety defect outranks a 115-point one that is not (Tideline's rule)", () => {
    const safety = priorityScore({
      severity: "cosmetic",
      safetyCritical: true,
      blocksEnergisation: false,
      originalFabric: false,
      effortHours: 40,
      partsAvailable: "unobtainable",
    });
    const other = priorityScore({
      severity: "disabling",
      safetyCritical: false,
      blocksEnergisation: true,
      originalFabric: true,
      effortHours: 0,
      partsAvailable: "in_hand",
    });
    expect(safety.score).toBe(10);
    expect(other.score).toBe(115);
    const ranked = rankDefects([
      { id: "other", createdAt: "2026-01-01T00:00:00Z", score: other.score, safetyCritical: false },
      { id: "safety", createdAt: "2026-02-01T00:00:00Z", score: safety.score, safetyCritical: true },
    ]);
    expect(ranked.map((r) => r.id)).toEqual(["safety", "other"]);
  });
});

describe("test voltage (NETA MTS-2019 Table 100.1)", () => {
  it.each([
    [240, 5000, 500, true], // 250 V row: 500 V DC
    [450, 1000, 1000, false], // 600 V row: 1 000 V DC
    [480, 500, 1000, false], // under: a note, not a warning
  ])("%f V board tested at %f V → suggested %f V, over %s", (rated, used, suggested, over) => {
    const a = testVoltageAdvice(rated, used);
    expect(a.suggestedVoltsDc).toBe(suggested);
    expect(a.over).toBe(over);
  });
});

describe("trip tests (NETA ATS Tables 100.7 / 100.8, values from memory)", () => {
  it("20 A thermal-magnetic at 240 V: at most 50 s at 300 % (Table 100.7, from memory)", () => {
    expect(inverseTimeBand({ ratingAmps: 20, systemVolts: 240, tripUnit: "thermal_magnetic" })!.maxSeconds).toBe(50);
    expect(inverseTimeBand({ ratingAmps: 100, systemVolts: 480, tripUnit: "thermal_magnetic" })!.maxSeconds).toBe(160);
    expect(inverseTimeBand({ ratingAmps: 800, systemVolts: 480, tripUnit: "thermal_magnetic" })).toBeNull();
    expect(inverseTimeBand({ ratingAmps: 100, systemVolts: 480, tripUnit: "electronic" })).toBeNull();
  });
  it.each([
    [30, "meets"],
    [70, "investigate"],
    [null, "investigate"],
  ])("20 A breaker, 60 A injected, trips in %s s → %s", (t, v) => {
    expect(
      judgeInverseTimeTrip({
        ratingAmps: 20,
        testAmps: 60,
        tripSeconds: t,
        systemVolts: 240,
        tripUnit: "thermal_magnetic",
      }).verdict,
    ).toBe(v);
  });
  it("the manufacturer's band wins: 8 s is too fast for a 10–60 s band", () => {
    const j = judgeInverseTimeTrip({
      ratingAmps: 100,
      testAmps: 300,
      tripSeconds: 8,
      systemVolts: 480,
      tripUnit: "thermal_magnetic",
      manufacturer: { minSeconds: 10, maxSeconds: 60 },
    });
    expect(j.verdict).toBe("investigate");
    expect(j.reasons[0]).toMatch(/faster/);
  });
  it.each([
    // electronic ±30 % of a 1 000 A setting → 700–1 300 A; adjustable −30/+40 % → 700–1 400 A;
    // non-adjustable published 150–250 A widened ±25 % → 112.5–312.5 A (Table 100.8, from memory)
    [
      { tripUnit: "electronic" as const, adjustable: true, settingAmps: 1000, pickupAmps: 1350 },
      700,
      1300,
      "investigate",
    ],
    [
      { tripUnit: "thermal_magnetic" as const, adjustable: true, settingAmps: 1000, pickupAmps: 1350 },
      700,
      1400,
      "meets",
    ],
    [
      {
        tripUnit: "thermal_magnetic" as const,
        adjustable: false,
        published: { lowAmps: 150, highAmps: 250 },
        pickupAmps: 120,
      },
      112.5,
      312.5,
      "meets",
    ],
  ])("instantaneous %o → %f–%f A, %s", (input, low, high, verdict) => {
    const j = judgeInstantaneousTrip(input);
    expect(j.lowAmps).toBeCloseTo(low, 9);
    expect(j.highAmps).toBeCloseTo(high, 9);
    expect(j.verdict).toBe(verdict);
  });
  it("phase comparison flags a phase under half the highest; a drop over 25 % since the last test (Tideline's rules)", () => {
    expect(comparePhases({ A: 500, B: 480, C: 150 }).flagged).toEqual(["C"]);
    expect(comparePhases({ A: 500, B: 480, C: 260 }).flagged).toEqual([]);
    expect(compareWithPrevious(70, 100)).toMatchObject({ flagged: true });
    expect(compareWithPrevious(80, 100).flagged).toBe(false);
  });
  it("step voltage: a fall of more than 25 % as the voltage rises → investigate (common practice)", () => {
    expect(
      judgeStepVoltage([
        { testVoltsDc: 2500, megohms: 700 },
        { testVoltsDc: 500, megohms: 1000 },
        { testVoltsDc: 1000, megohms: 900 },
      ]),
    ).toMatchObject({ verdict: "investigate", largestFall: 0.3 });
    expect(
      judgeStepVoltage([
        { testVoltsDc: 500, megohms: 1000 },
        { testVoltsDc: 1000, megohms: 950 },
        { testVoltsDc: 2500, megohms: 900 },
      ]).verdict,
    ).toBe("meets");
  });
});

/** Independent forward model with complex arithmetic: Millman's theorem with capacitance (J. Millman, Proc. IRE 1940). */
function faultedLampVolts(lineVolts: number, branchOhms: number, faultOhms: number, microF: number, hz: number) {
  const vPh = lineVolts / Math.sqrt(3);
  const g = 1 / branchOhms;
  const b = 2 * Math.PI * hz * microF * 1e-6;
  const f = 1 / faultOhms;
  // E_A = vPh (real). V_G = F·E_A / (3Y + F), Y = g + jb; lamp A sees E_A − V_G.
  const [dr, di] = [3 * g + f, 3 * b];
  const den = dr * dr + di * di;
  const vg = [(f * vPh * dr) / den, (-f * vPh * di) / den];
  return Math.hypot(vPh - vg[0], -vg[1]);
}

describe("ground lamps with the system's capacitance", () => {
  it.each([
    [2000, 2000, 1],
    [5000, 500, 0.5],
    [10000, 20000, 2],
  ])("recovers a %f Ω-branch, %f Ω fault at %f µF from the faulted lamp's volts", (rb, rf, c) => {
    const vf = faultedLampVolts(450, rb, rf, c, 60);
    expect(
      faultOhmsWithCapacitance({
        lineVolts: 450,
        faultedVolts: vf,
        branchOhms: rb,
        capacitanceMicroF: c,
        frequencyHz: 60,
      }),
    ).toBeCloseTo(rf, 6);
  });
  it("neglecting 1 µF per phase reads the fault about 49 % high (2 kΩ branches, 2 kΩ fault, 60 Hz); the range brackets the truth", () => {
    const vf = faultedLampVolts(450, 2000, 2000, 1, 60);
    const neglected = locateGround({ lineVolts: 450, A: vf, B: 300, C: 300, branchOhms: 2000 }).faultOhms!;
    expect(neglected / 2000).toBeCloseTo(1.494, 2);
    const r = faultEstimateRange({
      lineVolts: 450,
      faultedVolts: vf,
      branchOhms: 2000,
      capacitanceMicroF: 1,
      frequencyHz: 60,
    });
    expect(r.lowOhms!).toBeLessThan(2000);
    expect(r.highOhms!).toBeGreaterThan(2000);
    expect(r.centralOhms!).toBeCloseTo(2000, 6);
    const words = judgeGroundCheck({
      lineVolts: 450,
      volts: { A: vf, B: 300, C: 300 },
      branchOhms: 2000,
      capacitanceMicroF: 1,
      frequencyHz: 60,
    }).words;
    expect(words).toMatch(/Estimated fault resistance \d+ Ω to \d+ Ω/);
  });
  it("a ground hunt points at the feeder whose opening balanced the lamps (common practice)", () => {
    const ground = { A: "dark", B: "bright", C: "bright" } as const;
    const alike = { A: "bright", B: "bright", C: "bright" } as const;
    expect(
      groundHuntFinding([
        { feeder: "F1", action: "opened", lamps: ground },
        { feeder: "F1", action: "closed", lamps: ground },
        { feeder: "F2", action: "opened", lamps: alike },
      ]).feeder,
    ).toBe("F2");
    expect(groundHuntFinding([{ feeder: "F1", action: "opened", lamps: ground }]).feeder).toBeNull();
  });
});
