import { describe, expect, it } from "vitest";
import { ASTM_D610_BANDS, ISO_4628_RI_UPPER_BOUNDS, astmD610Grade, iso4628RiGrade } from "../../src/domain/corrosion";

describe("astmD610Grade", () => {
  // Band edges: ASTM D610-08 (R2019) Table 1 — "greater than <lower> and up to <upper> percent".
  it.each([
    [0, 10], // ASTM D610-08 Table 1: 10 = ≤ 0.01 %
    [0.01, 10], // ASTM D610-08 Table 1: upper edge of grade 10 is inclusive
    [0.011, 9], // ASTM D610-08 Table 1: > 0.01 % → 9
    [0.03, 9], // ASTM D610-08 Table 1
    [0.031, 8], // ASTM D610-08 Table 1
    [0.1, 8], // ASTM D610-08 Table 1
    [0.2, 7], // ASTM D610-08 Table 1: > 0.1 up to 0.3
    [0.3, 7], // ASTM D610-08 Table 1
    [0.31, 6], // ASTM D610-08 Table 1
    [1, 6], // ASTM D610-08 Table 1
    [1.01, 5], // ASTM D610-08 Table 1
    [3, 5], // ASTM D610-08 Table 1
    [3.5, 4], // ASTM D610-08 Table 1: > 3 up to 10
    [10, 4], // ASTM D610-08 Table 1
    [10.5, 3], // ASTM D610-08 Table 1: > 10 up to 16
    [16, 3], // ASTM D610-08 Table 1
    [16.1, 2], // ASTM D610-08 Table 1
    [33, 2], // ASTM D610-08 Table 1
    [33.1, 1], // ASTM D610-08 Table 1
    [50, 1], // ASTM D610-08 Table 1
    [50.01, 0], // ASTM D610-08 Table 1: 0 = greater than 50 %
    [100, 0], // ASTM D610-08 Table 1
  ])("%f %% rusted is grade %i", (percent, grade) => {
    expect(astmD610Grade(percent)).toBe(grade);
  });

  // ISO 4628-3:2016 Annex B correlation with D610, as tabulated by coatingsradar.com:
  // Ri 1 (0.05 %) ↔ 8, Ri 2 (0.5 %) ↔ 6, Ri 3 (1 %) ↔ 6, Ri 4 (8 %) ↔ 4, Ri 5 (40 %) ↔ 1.
  it.each([
    [0.05, 8], // ISO 4628-3 Annex B Table B.2
    [0.5, 6], // ISO 4628-3 Annex B Table B.2
    [1, 6], // ISO 4628-3 Annex B Table B.2
    [8, 4], // ISO 4628-3 Annex B Table B.2
    [40, 1], // ISO 4628-3 Annex B Table B.2
  ])("ISO reference point %f %% maps to D610 grade %i", (percent, grade) => {
    expect(astmD610Grade(percent)).toBe(grade);
  });

  it.each([[-0.001], [100.001], [NaN], [Infinity], [-Infinity]])("rejects %f with RangeError", (p) => {
    expect(() => astmD610Grade(p)).toThrow(RangeError);
  });

  it("never raises the grade as rust increases (property over 0–100 %)", () => {
    let previous = 10;
    for (let p = 0; p <= 100; p += 0.01) {
      const g = astmD610Grade(Math.min(100, p));
      expect(g).toBeLessThanOrEqual(previous);
      previous = g;
    }
  });

  it("publishes eleven bands 10…0 with rising upper bounds ending at 100 %", () => {
    expect(ASTM_D610_BANDS.map((b) => b.grade)).toEqual([10, 9, 8, 7, 6, 5, 4, 3, 2, 1, 0]);
    // ASTM D610-08 Table 1 upper bounds
    expect(ASTM_D610_BANDS.map((b) => b.maxPercent)).toEqual([0.01, 0.03, 0.1, 0.3, 1, 3, 10, 16, 33, 50, 100]);
    for (const band of ASTM_D610_BANDS) {
      expect(band.description.length).toBeGreaterThan(5);
      expect(astmD610Grade(band.maxPercent)).toBe(band.grade);
    }
  });
});

describe("iso4628RiGrade", () => {
  it.each([
    [0, "Ri 0"], // ISO 4628-3:2016 Table 1: Ri 0 = 0 %
    [0.05, "Ri 1"], // ISO 4628-3:2016 Table 1: Ri 1 = 0.05 %
    [0.5, "Ri 2"], // ISO 4628-3:2016 Table 1: Ri 2 = 0.5 %
    [1, "Ri 3"], // ISO 4628-3:2016 Table 1: Ri 3 = 1 %
    [8, "Ri 4"], // ISO 4628-3:2016 Table 1: Ri 4 = 8 %
    [40, "Ri 5"], // ISO 4628-3:2016 Table 1: Ri 5 = 40/50 %
    [50, "Ri 5"], // ISO 4628-3:2016 Table 1
    [100, "Ri 5"], // ISO 4628-3:2016 Table 1: beyond the last point is still the worst degree
  ])("a reference point %f %% is %s", (percent, ri) => {
    expect(iso4628RiGrade(percent)).toBe(ri);
  });

  // Tideline's rule (documented in corrosion.ts): geometric midpoints, ties to the lower degree.
  it.each([
    [0.01, "Ri 0"], // boundary = ASTM D610 grade-10 limit, inclusive
    [0.0101, "Ri 1"],
    [Math.sqrt(0.025), "Ri 1"], // √(0.05·0.5) ≈ 0.158, inclusive
    [0.16, "Ri 2"],
    [0.7, "Ri 2"], // √(0.5·1) ≈ 0.707
    [0.71, "Ri 3"],
    [2.8, "Ri 3"], // √8 ≈ 2.83
    [2.9, "Ri 4"],
    [17.8, "Ri 4"], // √(8·40) ≈ 17.9
    [18, "Ri 5"],
  ])("%f %% is %s (log-scale midpoint rule)", (percent, ri) => {
    expect(iso4628RiGrade(percent)).toBe(ri);
  });

  it("uses the geometric midpoints it documents", () => {
    expect(ISO_4628_RI_UPPER_BOUNDS[1]).toBeCloseTo(0.1581, 4);
    expect(ISO_4628_RI_UPPER_BOUNDS[2]).toBeCloseTo(0.7071, 4);
    expect(ISO_4628_RI_UPPER_BOUNDS[3]).toBeCloseTo(2.8284, 4);
    expect(ISO_4628_RI_UPPER_BOUNDS[4]).toBeCloseTo(17.8885, 4);
  });

  it("each boundary is equally far (in log terms) from the two points it separates", () => {
    const points = [0.05, 0.5, 1, 8, 40];
    for (let i = 1; i < points.length; i++) {
      const b = ISO_4628_RI_UPPER_BOUNDS[i];
      expect(Math.log(b / points[i - 1])).toBeCloseTo(Math.log(points[i] / b), 12);
    }
  });

  it.each([[-1], [101], [NaN]])("rejects %f with RangeError", (p) => {
    expect(() => iso4628RiGrade(p)).toThrow(RangeError);
  });
});
