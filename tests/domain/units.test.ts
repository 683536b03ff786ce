import { describe, expect, it } from "vitest";
import { fahrenheitRiseToCelsius, fahrenheitToCelsius, phaseVoltsFromLine } from "../../src/domain/units";
import { requireNumber, requireOneOf, requirePositive } from "../../src/domain/guards";

describe("fahrenheitToCelsius", () => {
  it.each([
    [32, 0], // NIST SP 811 Appendix B: t/°C = (t/°F − 32)/1.8
    [212, 100], // water boils at 100 °C (NIST SP 811)
    [68, 20], // NETA base temperature, 68 °F = 20 °C (NETA table 100.14 °F column)
    [104, 40], // IEEE 43 base temperature, 104 °F = 40 °C
    [-40, -40], // the two scales cross at −40 (arithmetic)
    [-459.67, -273.15], // absolute zero (NIST SP 811)
  ])("%f °F = %f °C", (f, c) => {
    expect(fahrenheitToCelsius(f)).toBeCloseTo(c, 10);
  });

  it.each([[-460], [NaN], [Infinity]])("rejects %f °F", (f) => {
    expect(() => fahrenheitToCelsius(f)).toThrow(RangeError);
  });
});

describe("fahrenheitRiseToCelsius", () => {
  it.each([
    [18, 10], // NIST SP 811: a difference of 1 °F = 1/1.8 K
    [27, 15], // NETA 100.18 level-2/level-4 boundary over similar, in °F
    [72, 40], // NETA 100.18 level-3/level-4 boundary over ambient, in °F
    [-9, -5],
  ])("a rise of %f °F is %f °C", (f, c) => {
    expect(fahrenheitRiseToCelsius(f)).toBeCloseTo(c, 10);
  });

  it("rejects NaN", () => expect(() => fahrenheitRiseToCelsius(NaN)).toThrow(RangeError));
});

describe("phaseVoltsFromLine", () => {
  it.each([
    [450, 259.81], // V_ph = V_line/√3 (any circuits text)
    [480, 277.13], // 480Y/277 V, common practice
    [208, 120.09], // 208Y/120 V, common practice
  ])("%f V line → %f V phase", (line, phase) => {
    expect(phaseVoltsFromLine(line)).toBeCloseTo(phase, 2);
  });

  it.each([[0], [-450], [NaN]])("rejects %f V", (v) => expect(() => phaseVoltsFromLine(v)).toThrow(RangeError));
});

describe("guards", () => {
  it.each([
    [5, { min: 0, max: 10 }, true],
    [0, { min: 0 }, true],
    [0, { min: 0, minExclusive: true }, false],
    [10, { max: 10, maxExclusive: true }, false],
    [Infinity, {}, false],
    [Infinity, { allowInfinity: true }, true],
    [-Infinity, { allowInfinity: true }, false],
    [NaN, {}, false],
  ])("requireNumber(%f, %o) accepts: %s", (value, bounds, ok) => {
    const call = () => requireNumber("x", value, bounds);
    if (ok) expect(call()).toBe(value);
    else expect(call).toThrow(RangeError);
  });

  it("names the parameter in the message", () => {
    expect(() => requirePositive("branchOhms", -1)).toThrow(/branchOhms/);
    expect(() => requireOneOf("phase", "D" as "A", ["A", "B", "C"])).toThrow(/phase must be one of A, B, C/);
  });

  it("rejects a non-number passed through untyped data", () => {
    expect(() => requireNumber("x", "5" as unknown as number)).toThrow(RangeError);
  });
});
