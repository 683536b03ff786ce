/**
 * Infrared survey classification of a hot spot by its temperature rise, for boards
 * that have been brought back under load by qualified people. A thermogram does not
 * show a board is sound; it shows where to look.
 */
import { requireNumber } from "./guards";

export type ThermalLevel = 0 | 1 | 2 | 3 | 4;

/** Suggested action per level, Tideline's paraphrase of the NETA table. */
export const THERMAL_ACTIONS: Record<ThermalLevel, string> = {
  0: "No action from temperature rise alone",
  1: "Possible deficiency: investigate",
  2: "Probable deficiency: repair as time permits",
  3: "Monitor until corrective measures can be accomplished",
  4: "Major discrepancy: repair immediately",
};

/**
 * NETA bands read as continuous intervals. NETA prints whole degrees (1–3, 4–15, >15
 * over a similar component; 1–10, 11–20, 21–40, >40 over ambient); Tideline closes each
 * band at its upper printed number and gives everything above it to the next band, so
 * 3.5 °C over similar is level 2 and 10.5 °C over ambient is level 2.
 */
function levelOverSimilar(deltaC: number): ThermalLevel {
  if (deltaC < 1) return 0;
  if (deltaC <= 3) return 1;
  if (deltaC <= 15) return 2;
  return 4; // the table has no level 3 for comparisons between similar components
}

function levelOverAmbient(deltaC: number): ThermalLevel {
  if (deltaC < 1) return 0;
  if (deltaC <= 10) return 1;
  if (deltaC <= 20) return 2;
  if (deltaC <= 40) return 3;
  return 4;
}

/**
 * Classifies a temperature rise. With both inputs the more severe level wins.
 * Bands (°C): over a similar component under similar load 1–3 → 1, >3–15 → 2, >15 → 4;
 * over ambient air 1–10 → 1, >10–20 → 2, >20–40 → 3, >40 → 4; under 1 (or negative) → 0.
 * Source: NETA ATS/MTS "Thermographic Survey Suggested Actions Based on Temperature
 * Rise" (table numbered 100.18).
 * @param input.overSimilarC rise over a similar component, °C (kelvin difference)
 * @param input.overAmbientC rise over ambient air, °C
 * @throws RangeError when neither is given, or either is NaN or infinite
 */
export function classifyTemperatureRise(input: { overSimilarC?: number; overAmbientC?: number }): {
  level: ThermalLevel;
  action: string;
} {
  const { overSimilarC, overAmbientC } = input;
  if (overSimilarC === undefined && overAmbientC === undefined) {
    throw new RangeError("give overSimilarC, overAmbientC or both");
  }
  const similar = overSimilarC === undefined ? 0 : levelOverSimilar(requireNumber("overSimilarC", overSimilarC));
  const ambient = overAmbientC === undefined ? 0 : levelOverAmbient(requireNumber("overAmbientC", overAmbientC));
  const level = Math.max(similar, ambient) as ThermalLevel;
  return { level, action: THERMAL_ACTIONS[level] };
}

/** Exponent of the load-scaling relation ΔT ∝ (I / I_rated)^n (common practice: about 2, as I²R heating). */
export const LOAD_SCALING_EXPONENT = 2;
/** Below this load, % of rated, a scan shows little (common practice; from memory of infrared-survey guides). */
export const LOW_LOAD_PERCENT = 40;

/**
 * A temperature rise measured at part load, scaled to rated load.
 * Formula: ΔT_rated = ΔT_measured · (100 / load%)^n, n = LOAD_SCALING_EXPONENT (2: the
 * heat of a resistive joint goes with I²R; common practice, and practitioners use n
 * between about 1.6 and 2 — Tideline takes 2, the I²R value). Example: 8 °C
 * at 30 % load → 8 · (1/0.3)² = 88.9 °C at rated load.
 * @param riseC measured rise, °C (kelvin difference); a rise ≤ 0 is returned unscaled
 * @param loadPercent load at the time of the scan, % of rated, > 0 … 200
 * @returns scaled rise, °C, and whether the scan was taken at too low a load to mean much
 */
export function scaleRiseToRatedLoad(
  riseC: number,
  loadPercent: number,
  exponent = LOAD_SCALING_EXPONENT,
): {
  scaledRiseC: number;
  factor: number;
  lowLoad: boolean;
} {
  const rise = requireNumber("riseC", riseC);
  const load = requireNumber("loadPercent", loadPercent, { min: 0, minExclusive: true, max: 200 });
  const n = requireNumber("exponent", exponent, { min: 1, max: 3 });
  const factor = Math.pow(100 / load, n);
  return { scaledRiseC: rise > 0 ? rise * factor : rise, factor, lowLoad: load < LOW_LOAD_PERCENT };
}
