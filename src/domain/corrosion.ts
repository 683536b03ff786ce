/**
 * Rust ratings for painted steel (enclosures, frames, breaker mechanisms).
 * Input is the estimated percentage of the inspected surface showing rust, 0–100.
 */
import { requireNumber } from "./guards";

export interface RustBand {
  /** ASTM D610 rust grade, 10 (none) … 0 (worst). */
  grade: number;
  /** Upper bound of the band, percent of surface rusted (inclusive). */
  maxPercent: number;
  /** Short wording for the form's visual guide (Tideline's own words). */
  description: string;
}

/**
 * ASTM D610-08 (SSPC-VIS 2) Table 1 rust grades. A surface belongs to the first band
 * whose `maxPercent` is at least its rusted percentage; the standard's bands are
 * "greater than the previous bound and up to this one". Grade 0 is "greater than 50 %",
 * so its upper bound is the whole surface.
 */
export const ASTM_D610_BANDS: readonly RustBand[] = [
  { grade: 10, maxPercent: 0.01, description: "No rust to be seen, or a speck at most" },
  { grade: 9, maxPercent: 0.03, description: "A few minute rust specks" },
  { grade: 8, maxPercent: 0.1, description: "Scattered small spots" },
  { grade: 7, maxPercent: 0.3, description: "Light rusting, spots easy to find" },
  { grade: 6, maxPercent: 1, description: "Rust spots across the surface, up to 1 %" },
  { grade: 5, maxPercent: 3, description: "Rusting up to 3 % of the surface" },
  { grade: 4, maxPercent: 10, description: "Rusting up to a tenth of the surface" },
  { grade: 3, maxPercent: 16, description: "About a sixth of the surface rusted" },
  { grade: 2, maxPercent: 33, description: "About a third of the surface rusted" },
  { grade: 1, maxPercent: 50, description: "Up to half the surface rusted" },
  { grade: 0, maxPercent: 100, description: "More than half the surface rusted" },
];

function requirePercent(percentRusted: number): number {
  return requireNumber("percentRusted", percentRusted, { min: 0, max: 100 });
}

/**
 * ASTM D610 rust grade of a painted steel surface.
 * Formula: the grade of the first band in ASTM_D610_BANDS with percentRusted ≤ maxPercent.
 * Source: ASTM D610-08 (reapproved 2019) Table 1.
 * @param percentRusted percent of surface rusted, 0–100
 * @returns grade 10 (≤ 0.01 %) … 0 (> 50 %)
 * @throws RangeError outside 0–100 or NaN
 */
export function astmD610Grade(percentRusted: number): number {
  const p = requirePercent(percentRusted);
  const band = ASTM_D610_BANDS.find((b) => p <= b.maxPercent);
  return (band ?? ASTM_D610_BANDS[ASTM_D610_BANDS.length - 1]).grade;
}

/**
 * Upper bounds (inclusive) used to pick the nearest Ri degree. ISO 4628-3 Table 1's reference points
 * (rusted area): Ri 0 = 0 %, Ri 1 = 0.05 %, Ri 2 = 0.5 %, Ri 3 = 1 %, Ri 4 = 8 %, Ri 5 = 40–50 %
 * (tests/domain/corrosion.test.ts checks each).
 *
 * How "nearest" is decided: rusted-area scales are logarithmic (D610 calls its own
 * scale exponential, and the ISO points step by ×10, ×2, ×8, ×5), so distance is
 * measured on a log scale and each boundary is the geometric midpoint of neighbouring
 * points: √(0.05·0.5), √(0.5·1), √(1·8), √(8·40). Ri 5 is the range 40–50 %, and the
 * nearest point of a range is its near end, so 40 is used. Ri 0 (0 %) has no log
 * position; its boundary is 0.01 %, the ASTM D610 grade-10 limit ("no rusting"), so the
 * two scales agree on what counts as unrusted. A value exactly on a boundary takes the
 * lower (less rusted) degree, as D610's inclusive "up to" bounds do.
 */
export const ISO_4628_RI_UPPER_BOUNDS: readonly number[] = [
  0.01,
  Math.sqrt(0.05 * 0.5),
  Math.sqrt(0.5 * 1),
  Math.sqrt(1 * 8),
  Math.sqrt(8 * 40),
];

/**
 * Nearest ISO 4628-3 degree of rusting.
 * Formula: first i with percentRusted ≤ ISO_4628_RI_UPPER_BOUNDS[i] gives "Ri i",
 * above the last bound "Ri 5" (see that constant for how the bounds are chosen).
 * Source: ISO 4628-3:2016 Table 1 (Ri 0 = 0 %, Ri 1 = 0.05 %, Ri 2 = 0.5 %, Ri 3 = 1 %,
 * Ri 4 = 8 %, Ri 5 = 40/50 %).
 * @param percentRusted percent of surface rusted, 0–100
 * @returns "Ri 0" … "Ri 5"
 * @throws RangeError outside 0–100 or NaN
 */
export function iso4628RiGrade(percentRusted: number): string {
  const p = requirePercent(percentRusted);
  const index = ISO_4628_RI_UPPER_BOUNDS.findIndex((bound) => p <= bound);
  return `Ri ${index === -1 ? 5 : index}`;
}
