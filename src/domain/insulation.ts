/**
 * Insulation-resistance arithmetic for megohmmeter readings on a flooded board:
 * temperature correction, time-resistance ratios, NETA minimums and a verdict that
 * only ever says whether a reading meets a published minimum — never that equipment
 * is safe to energise (that is for qualified people under NFPA 70E and local codes).
 */
import { requireNumber, requireOneOf, requirePositive } from "./guards";
import { NETA_MINIMUM_INSULATION, NETA_TEMPERATURE_CORRECTION } from "./insulation-tables";

export { NETA_MINIMUM_INSULATION, NETA_TEMPERATURE_CORRECTION } from "./insulation-tables";
export type { NetaCorrectionRow, NetaMinimumRow } from "./insulation-tables";
export { fitLogResistance, forecastDryOut } from "./insulation-dry-out";
export type { DryOutForecast, DryOutPoint, LogResistanceFit } from "./insulation-dry-out";

export type InsulationMedium = "solid" | "oil";
export const THERMAL_CLASSES = ["A", "B", "F", "H"] as const;
export type ThermalClass = (typeof THERMAL_CLASSES)[number];

/** Temperatures the IEEE 43 halving rule is accepted for here, °C (Tideline's bound). */
export const IEEE43_RANGE_C = { min: -10, max: 100 } as const;

function requireMegohms(name: string, megohms: number): number {
  return requireNumber(name, megohms, { min: 0 });
}

/**
 * Insulation resistance corrected to 40 °C by the IEEE 43 halving rule.
 * Formula: R40 = R_T × 0.5^((40 − T)/10) (resistance halves for each 10 °C rise).
 * Source: IEEE Std 43-2000 / 43-2013, temperature correction to a 40 °C base.
 * @param megohms reading at the winding/insulation temperature, MΩ, ≥ 0
 * @param temperatureC insulation temperature, °C, −10 … 100
 * @returns resistance referred to 40 °C, MΩ
 * @throws RangeError for negative/NaN megohms or a temperature outside the range
 */
export function ieee43CorrectionTo40C(megohms: number, temperatureC: number): number {
  requireMegohms("megohms", megohms);
  requireNumber("temperatureC", temperatureC, IEEE43_RANGE_C);
  return megohms * Math.pow(0.5, (40 - temperatureC) / 10);
}

/**
 * NETA multiplier to 20 °C at a temperature, linearly interpolated between the
 * tabulated 5 °C steps. Source: NETA ATS/MTS temperature-correction table (100.14).
 * @throws RangeError outside −10 … 110 °C
 */
export function netaCorrectionFactor(temperatureC: number, insulation: InsulationMedium): number {
  requireOneOf("insulation", insulation, ["solid", "oil"]);
  const rows = NETA_TEMPERATURE_CORRECTION;
  const t = requireNumber("temperatureC", temperatureC, {
    min: rows[0].temperatureC,
    max: rows[rows.length - 1].temperatureC,
  });
  const upper = rows.findIndex((r) => r.temperatureC >= t);
  const hi = rows[upper];
  if (hi.temperatureC === t) return hi[insulation];
  const lo = rows[upper - 1];
  const fraction = (t - lo.temperatureC) / (hi.temperatureC - lo.temperatureC);
  return lo[insulation] + fraction * (hi[insulation] - lo[insulation]);
}

/**
 * Insulation resistance corrected to 20 °C with the NETA multipliers.
 * Formula: R20 = R_T × F(T), F linearly interpolated in NETA_TEMPERATURE_CORRECTION.
 * @param megohms reading, MΩ, ≥ 0
 * @param temperatureC insulation temperature, °C, −10 … 110
 * @param insulation "solid" (switchboards, breakers, dry-type) or "oil" (immersed)
 * @throws RangeError outside the tabulated range or for negative/NaN megohms
 */
export function netaCorrectionTo20C(
  megohms: number,
  temperatureC: number,
  insulation: InsulationMedium,
): number {
  requireMegohms("megohms", megohms);
  return megohms * netaCorrectionFactor(temperatureC, insulation);
}

/**
 * Polarization index. Formula: PI = R(10 min) / R(1 min). Source: IEEE Std 43.
 * @param r1min, r10min readings at 1 and 10 minutes, MΩ, > 0
 */
export function polarizationIndex(r1min: number, r10min: number): number {
  return requirePositive("r10min", r10min) / requirePositive("r1min", r1min);
}

/**
 * Dielectric absorption ratio. Formula: DAR = R(60 s) / R(30 s).
 * Source: common practice (megohmmeter makers' guides); IEEE 43 does not set limits for it.
 * @param r30s, r60s readings at 30 and 60 seconds, MΩ, > 0
 */
export function dielectricAbsorptionRatio(r30s: number, r60s: number): number {
  return requirePositive("r60s", r60s) / requirePositive("r30s", r30s);
}

/**
 * Recommended minimum PI by thermal class: A 1.5; B, F, H 2.0.
 * Source: IEEE Std 43-2000, recommended minimum PI by thermal class (written for
 * rotating machinery; Tideline uses it as a yardstick for board insulation).
 * @throws RangeError for an unknown class
 */
export function minimumPolarizationIndex(thermalClass: ThermalClass): number {
  requireOneOf("thermalClass", thermalClass, THERMAL_CLASSES);
  return thermalClass === "A" ? 1.5 : 2.0;
}

/**
 * NETA minimum DC test voltage and recommended minimum insulation resistance (at 20 °C)
 * for a nominal equipment rating. A rating between rows takes the next row up, so a
 * 450 V or 480 V board uses the 600 V row: 1 000 V DC, 100 MΩ.
 * Source: ANSI/NETA MTS-2019 Table 100.1 (see NETA_MINIMUM_INSULATION).
 * @param ratedVolts nominal rating, volts, > 0
 */
export function netaMinimumInsulation(ratedVolts: number): { testVoltsDc: number; minMegohms: number } {
  const v = requirePositive("ratedVolts", ratedVolts);
  const row = NETA_MINIMUM_INSULATION.find((r) => v <= r.maxRatedVolts)!;
  return { testVoltsDc: row.testVoltsDc, minMegohms: row.minMegohms };
}

export type InsulationVerdict = "meets" | "below_minimum" | "investigate";

export interface InsulationJudgementInput {
  /** Reading corrected to the same base temperature as the minimum, MΩ. */
  correctedMegohms: number;
  minimumMegohms: number;
  pi?: number | null;
  minimumPi?: number | null;
  dar?: number | null;
  /** Defaults to 1.0: a reading that falls during the test is always investigated. */
  minimumDar?: number | null;
}

/**
 * Compares a reading with a minimum. Order: below the minimum → "below_minimum";
 * else PI under its minimum (or under 1.0), or DAR under its minimum (default 1.0)
 * → "investigate"; else "meets". "meets" means only that the numbers reach the
 * published minimum; re-energising is a decision for qualified people.
 * Sources: NETA MTS (minimum values, trend comparison), IEEE Std 43 (PI).
 * @throws RangeError for negative/NaN resistances or non-positive ratios
 */
export function judgeInsulation(input: InsulationJudgementInput): {
  verdict: InsulationVerdict;
  reasons: string[];
} {
  const r = requireMegohms("correctedMegohms", input.correctedMegohms);
  const min = requireMegohms("minimumMegohms", input.minimumMegohms);
  const ratio = (name: string, v: number | null | undefined) => (v == null ? null : requirePositive(name, v));
  const pi = ratio("pi", input.pi);
  const minPi = Math.max(1, ratio("minimumPi", input.minimumPi) ?? 1);
  const dar = ratio("dar", input.dar);
  const minDar = ratio("minimumDar", input.minimumDar) ?? 1;
  if (r < min) {
    return { verdict: "below_minimum", reasons: [`${fmt(r)} MΩ is under the ${fmt(min)} MΩ minimum.`] };
  }
  const reasons: string[] = [];
  if (pi !== null && pi < minPi) reasons.push(`Polarization index ${fmt(pi)} is under ${fmt(minPi)}.`);
  if (dar !== null && dar < minDar) reasons.push(`Absorption ratio ${fmt(dar)} is under ${fmt(minDar)}.`);
  if (reasons.length > 0) return { verdict: "investigate", reasons };
  return { verdict: "meets", reasons: [`${fmt(r)} MΩ reaches the ${fmt(min)} MΩ minimum.`] };
}

function fmt(n: number): string {
  return Number(n.toPrecision(3)).toString();
}
