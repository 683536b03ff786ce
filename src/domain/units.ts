/**
 * Unit conversions the survey forms need: older meters, cameras and nameplates on
 * American-built boards read in °F. Definitions are exact (NIST SP 811, Appendix B).
 */
import { requireNumber } from "./guards";

/** Absolute zero, °F. */
const ABSOLUTE_ZERO_F = -459.67;

/**
 * Temperature reading in °F to °C. Formula: t_C = (t_F − 32) / 1.8. Source: NIST SP 811.
 * @param fahrenheit temperature, °F, ≥ −459.67 (absolute zero)
 * @throws RangeError below absolute zero or NaN
 */
export function fahrenheitToCelsius(fahrenheit: number): number {
  requireNumber("fahrenheit", fahrenheit, { min: ABSOLUTE_ZERO_F });
  return (fahrenheit - 32) / 1.8;
}

/**
 * Temperature difference (rise) in °F to °C — no 32° offset. Formula: Δt_C = Δt_F / 1.8.
 * Source: NIST SP 811. Used for thermographic rises reported in °F.
 * @param deltaFahrenheit difference, °F, any finite value
 */
export function fahrenheitRiseToCelsius(deltaFahrenheit: number): number {
  return requireNumber("deltaFahrenheit", deltaFahrenheit) / 1.8;
}

/**
 * Phase (line-to-neutral) voltage of a balanced three-phase system.
 * Formula: V_ph = V_line / √3. Source: any circuits text.
 * @param lineVolts line-to-line voltage, V rms, > 0
 */
export function phaseVoltsFromLine(lineVolts: number): number {
  return requireNumber("lineVolts", lineVolts, { min: 0, minExclusive: true }) / Math.sqrt(3);
}
