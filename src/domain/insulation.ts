/**
 * Insulation-resistance arithmetic for megohmmeter readings on a flooded board:
 * temperature correction, time-resistance ratios, NETA minimums and a verdict that
 * only ever says whether a reading meets a published minimum — never that equipment
 * is safe to energise (that is for qualified people under NFPA 70E and local codes).
 */
import { requireNumber, requireOneOf, requirePositive } from "./guards";
import { NETA_MINIMUM_INSULATION, NETA_TEMPERATURE_CORRECTION } from "./insulation-tables";

export { NETA_MINIMUM_INSULATION, NETA_TEMPERATURE_CORRECTION } from "./insulation-tables";
export { assessDryOut, fitLogResistance, forecastDryOut } from "./insulation-dry-out";
export type { DryOutPoint } from "./insulation-dry-out";

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
export function netaCorrectionTo20C(megohms: number, temperatureC: number, insulation: InsulationMedium): number {
  requireMegohms("megohms", megohms);
  return megohms * netaCorrectionFactor(temperatureC, insulation);
}

/**
 * Polarization index. Formula: PI = R(10 min) / R(1 min). Source: IEEE Std 43.
 * A zero 1-minute reading (a dead short, the usual first reading on a flooded bus) makes
 * the ratio meaningless: the result is null, "not computable", not an error.
 * @param r1min, r10min readings at 1 and 10 minutes, MΩ, ≥ 0
 * @returns the ratio, or null when either reading is 0
 */
export function polarizationIndex(r1min: number, r10min: number): number | null {
  const r10 = requireMegohms("r10min", r10min);
  const r1 = requireMegohms("r1min", r1min);
  return r1 === 0 || r10 === 0 ? null : r10 / r1;
}

/**
 * Dielectric absorption ratio. Formula: DAR = R(60 s) / R(30 s).
 * Source: common practice (megohmmeter makers' guides); IEEE 43 does not set limits for it.
 * @param r30s, r60s readings at 30 and 60 seconds, MΩ, ≥ 0
 * @returns the ratio, or null ("not computable") when either reading is 0
 */
export function dielectricAbsorptionRatio(r30s: number, r60s: number): number | null {
  const r60 = requireMegohms("r60s", r60s);
  const r30 = requireMegohms("r30s", r30s);
  return r30 === 0 || r60 === 0 ? null : r60 / r30;
}

/**
 * How a meter showed a reading: exactly, at or above the top of its range (">2000 MΩ"),
 * or below its resolution ("<0.01 MΩ"). The value stored is the number the meter showed.
 */
export const READING_QUALIFIERS = ["at_or_above", "below"] as const;
export type ReadingQualifier = (typeof READING_QUALIFIERS)[number];
export interface QualifiedMegohms {
  megohms: number;
  qualifier?: ReadingQualifier | null;
}

/** What a ratio of two qualified readings can say: a value, a lower or upper bound, or nothing. */
export type RatioBound =
  { value: number; bound: "exact" | "at_least" | "at_most" } | { value: null; bound: "not_computable" };

/**
 * PI or DAR from qualified readings. Rules (interval arithmetic on the true values):
 * numerator ≥ shown and denominator exact or ≤ shown → ratio at least; numerator ≤ shown
 * and denominator exact or ≥ shown → ratio at most; both at the meter's limit (or both
 * under its resolution) → not computable (IEEE 43 "PI 1.0" artefact of an over-range
 * meter); any zero → not computable.
 */
export function qualifiedRatio(denominator: QualifiedMegohms, numerator: QualifiedMegohms): RatioBound {
  const d = requireMegohms("denominator", denominator.megohms);
  const n = requireMegohms("numerator", numerator.megohms);
  if (d === 0 || n === 0) return { value: null, bound: "not_computable" };
  const qn = numerator.qualifier ?? null;
  const qd = denominator.qualifier ?? null;
  const value = n / d;
  if (qn === null && qd === null) return { value, bound: "exact" };
  const up = (qn === "at_or_above" || qn === null) && (qd === "below" || qd === null);
  const down = (qn === "below" || qn === null) && (qd === "at_or_above" || qd === null);
  if (up && !down) return { value, bound: "at_least" };
  if (down && !up) return { value, bound: "at_most" };
  return { value: null, bound: "not_computable" };
}

/** Above this 1-minute reading corrected to 40 °C, MΩ, IEEE 43 does not need the PI to judge the insulation. */
export const IEEE43_PI_NOT_REQUIRED_ABOVE_MEGOHMS = 5000;

/**
 * Dew point from air temperature and relative humidity.
 * Formula (Magnus form): γ = ln(RH/100) + a·T/(b + T); Td = b·γ/(a − γ), with the
 * Alduchov–Eskridge coefficients a = 17.625, b = 243.04 °C (O. A. Alduchov and R. E.
 * Eskridge, "Improved Magnus form approximation of saturation vapor pressure",
 * J. Appl. Meteor. 35 (1996) 601–609; coefficients from memory, checked against
 * psychrometric tables in tests/domain/readings-field.test.ts).
 * @param temperatureC air temperature, °C, −40 … 60
 * @param relativeHumidityPct relative humidity, %, > 0 … 100
 * @returns dew point, °C
 */
export function dewPointC(temperatureC: number, relativeHumidityPct: number): number {
  const t = requireNumber("temperatureC", temperatureC, { min: -40, max: 60 });
  const rh = requireNumber("relativeHumidityPct", relativeHumidityPct, { min: 0, minExclusive: true, max: 100 });
  const a = 17.625;
  const b = 243.04;
  const gamma = Math.log(rh / 100) + (a * t) / (b + t);
  return (b * gamma) / (a - gamma);
}

/** Default margin above the dew point, kelvin (common practice: 3 K; the curator may change it). */
export const DEW_POINT_MARGIN_K = 3;

export interface ReadingValidity {
  valid: boolean;
  dewPointC: number | null;
  reasons: string[];
}

/**
 * Whether an insulation reading is fit to judge with: not when the equipment was below
 * freezing (ice conducts little; the water comes back as it thaws), nor at or within the
 * margin of the dew point (moisture condenses on the insulation while it is measured).
 * Source: common practice (test above the dew point; IEEE Std 43 notes readings below the
 * dew point or below freezing are not reliable — clause from memory). Without ambient
 * temperature and humidity, the dew point cannot be checked: valid, with a note.
 * @param marginK margin above the dew point, K, ≥ 0 (DEW_POINT_MARGIN_K by default)
 */
export function insulationReadingValidity(input: {
  equipmentTempC: number;
  ambientTempC?: number | null;
  humidityPercent?: number | null;
  marginK?: number;
}): ReadingValidity {
  const t = requireNumber("equipmentTempC", input.equipmentTempC);
  const margin = requireNumber("marginK", input.marginK ?? DEW_POINT_MARGIN_K, { min: 0, max: 20 });
  const reasons: string[] = [];
  let dew: number | null = null;
  if (input.ambientTempC != null && input.humidityPercent != null && input.humidityPercent > 0) {
    dew = dewPointC(input.ambientTempC, input.humidityPercent);
    if (t <= dew)
      reasons.push(
        `Equipment at ${fmt(t)} °C is at or below the dew point (${fmt1(dew)} °C): moisture condenses on it.`,
      );
    else if (t < dew + margin)
      reasons.push(`Equipment at ${fmt(t)} °C is within ${fmt(margin)} K of the dew point (${fmt1(dew)} °C).`);
  }
  if (t < 0) reasons.push(`Equipment below freezing (${fmt(t)} °C): ice hides the water that returns on thawing.`);
  return { valid: reasons.length === 0, dewPointC: dew, reasons };
}

export interface TestVoltageAdvice {
  suggestedVoltsDc: number;
  note: string | null;
  over: boolean;
}

/**
 * The NETA Table 100.1 DC test voltage for a rating, and a note when the voltage used
 * differs: above it can overstress aged or wet insulation (a 5 000 V test on a 240 V
 * board); below it the reading may not reveal weak insulation.
 */
export function testVoltageAdvice(ratedVolts: number, testVoltsDc: number): TestVoltageAdvice {
  const { testVoltsDc: suggested } = netaMinimumInsulation(ratedVolts);
  const used = requirePositive("testVoltsDc", testVoltsDc);
  if (used > suggested) {
    return {
      suggestedVoltsDc: suggested,
      over: true,
      note: `Tested at ${used} V DC, above the ${suggested} V DC NETA Table 100.1 gives for ${fmt(ratedVolts)} V equipment: a higher voltage can overstress old or wet insulation.`,
    };
  }
  if (used < suggested) {
    return {
      suggestedVoltsDc: suggested,
      over: false,
      note: `Tested at ${used} V DC; NETA Table 100.1 suggests ${suggested} V DC for ${fmt(ratedVolts)} V equipment.`,
    };
  }
  return { suggestedVoltsDc: suggested, over: false, note: null };
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
  /** Reading corrected to the same base temperature as the minimum, MΩ, ≥ 0. */
  correctedMegohms: number;
  /** How the meter showed it: exactly (null), at or above its range, or below its resolution. */
  qualifier?: ReadingQualifier | null;
  minimumMegohms: number;
  pi?: number | RatioBound | null;
  minimumPi?: number | null;
  dar?: number | RatioBound | null;
  /** Defaults to 1.0: a reading that falls during the test is always investigated. */
  minimumDar?: number | null;
  /** IEEE 43: the 1-minute reading at 40 °C is above 5 000 MΩ, so the PI is not needed. */
  piNotRequired?: boolean;
}

const asBound = (name: string, v: number | RatioBound | null | undefined): RatioBound | null => {
  if (v == null) return null;
  if (typeof v === "number") return { value: requirePositive(name, v), bound: "exact" };
  return v;
};

/**
 * Compares a reading with a minimum. Order: 0 MΩ → "below_minimum" (a fault, below any
 * minimum); a value under the minimum → "below_minimum" (also when the meter showed
 * "below its resolution"); an over-range value whose top of range is under the minimum
 * → "investigate" (re-test on a higher range); else PI under its minimum (or under 1.0),
 * or DAR under its minimum (default 1.0) → "investigate" — a ratio that is only a bound
 * on the wrong side, or not computable, gives a note instead; else "meets".
 * "meets" means only that the numbers reach the published minimum; re-energising is a
 * decision for qualified people.
 * Sources: NETA MTS (minimum values, trend comparison), IEEE Std 43 (PI; PI not required
 * when the 1-minute reading at 40 °C exceeds 5 000 MΩ — clause from memory).
 * @throws RangeError for negative/NaN resistances or non-positive ratios
 */
export function judgeInsulation(input: InsulationJudgementInput): {
  verdict: InsulationVerdict;
  reasons: string[];
  notes: string[];
} {
  const r = requireMegohms("correctedMegohms", input.correctedMegohms);
  const min = requireMegohms("minimumMegohms", input.minimumMegohms);
  const q = input.qualifier ?? null;
  const pi = asBound("pi", input.pi);
  const minPi = Math.max(1, input.minimumPi == null ? 1 : requirePositive("minimumPi", input.minimumPi));
  const dar = asBound("dar", input.dar);
  const minDar = input.minimumDar == null ? 1 : requirePositive("minimumDar", input.minimumDar);
  const notes: string[] = [];
  if (r === 0) {
    return {
      verdict: "below_minimum",
      reasons: [`0 MΩ: a dead short (a fault), below any minimum (${fmt(min)} MΩ here).`],
      notes,
    };
  }
  if (r < min) {
    const shown =
      q === "below"
        ? `Below the meter's resolution (${fmt(r)} MΩ)`
        : q === "at_or_above"
          ? `At the meter's top of range (${fmt(r)} MΩ)`
          : `${fmt(r)} MΩ`;
    if (q === "at_or_above") {
      return {
        verdict: "investigate",
        reasons: [
          `${shown}, which is under the ${fmt(min)} MΩ minimum: the true value is unknown. Re-test on a higher range.`,
        ],
        notes,
      };
    }
    return { verdict: "below_minimum", reasons: [`${shown} is under the ${fmt(min)} MΩ minimum.`], notes };
  }
  if (q === "below") {
    return {
      verdict: "investigate",
      reasons: [
        `Recorded as below the meter's resolution (${fmt(r)} MΩ), which is not under the minimum: check the entry.`,
      ],
      notes,
    };
  }
  const reasons: string[] = [];
  const ratio = (label: string, b: RatioBound | null, minimum: number) => {
    if (b === null) return;
    if (b.bound === "not_computable") {
      notes.push(`${label} not computable (a zero reading, or both readings at the meter's limit).`);
      return;
    }
    const low = b.value < minimum;
    if (b.bound === "exact" && low) reasons.push(`${label} ${fmt(b.value)} is under ${fmt(minimum)}.`);
    else if (b.bound === "at_most" && low) reasons.push(`${label} at most ${fmt(b.value)}, under ${fmt(minimum)}.`);
    else if (b.bound === "at_least" && low)
      notes.push(
        `${label} at least ${fmt(b.value)} (a reading at the meter's limit): cannot tell whether it reaches ${fmt(minimum)}.`,
      );
    else if (b.bound === "at_most")
      notes.push(
        `${label} at most ${fmt(b.value)} (a reading below resolution): cannot confirm it reaches ${fmt(minimum)}.`,
      );
  };
  if (input.piNotRequired && pi !== null) {
    notes.push(
      `The 1-minute reading corrected to 40 °C is above ${IEEE43_PI_NOT_REQUIRED_ABOVE_MEGOHMS} MΩ: IEEE Std 43 does not need the PI to judge this insulation.`,
    );
  } else ratio("Polarization index", pi, minPi);
  ratio("Absorption ratio", dar, minDar);
  if (reasons.length > 0) return { verdict: "investigate", reasons, notes };
  const at = q === "at_or_above" ? "At or above " : "";
  return { verdict: "meets", reasons: [`${at}${fmt(r)} MΩ reaches the ${fmt(min)} MΩ minimum.`], notes };
}

function fmt(n: number): string {
  return Number(n.toPrecision(3)).toString();
}
function fmt1(n: number): string {
  return n.toFixed(1);
}
