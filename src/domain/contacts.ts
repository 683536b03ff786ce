/**
 * Contact (pole) resistance comparison for breakers and switches measured with a
 * low-resistance ohmmeter. A flagged pole warrants investigation, not a failure:
 * NEMA AB 4 notes millivolt-drop values vary widely and are not the sole criterion.
 */
import { requirePositive } from "./guards";

/** Fraction of the lowest value beyond which a pole is flagged (NETA: 50 %). */
export const CONTACT_DEVIATION_LIMIT = 0.5;

/** Relative slack so a reading keyed as exactly 1.5 × the lowest (e.g. 0.7 and 1.05)
 * is not flagged through binary rounding; far below any meter's resolution. */
const ROUNDING_SLACK = 1e-9;

/**
 * Indexes of poles whose resistance exceeds the lowest by more than 50 % of the lowest.
 * Formula: flag i when R_i − R_min > 0.5 · R_min (exactly 50 % is not flagged).
 * Source: NETA ATS/MTS circuit-breaker sections — investigate values that deviate from
 * adjacent poles or similar breakers by more than 50 % of the lowest value.
 * @param microOhms one reading per pole (or per similar breaker), µΩ, > 0
 * @returns ascending indexes of flagged readings; [] for fewer than 2 readings
 * @throws RangeError for a non-positive, NaN or infinite reading
 */
export function contactResistanceOutliers(microOhms: readonly number[]): number[] {
  if (!Array.isArray(microOhms)) throw new RangeError("microOhms must be an array");
  microOhms.forEach((v, i) => requirePositive(`microOhms[${i}]`, v));
  if (microOhms.length < 2) return [];
  const lowest = Math.min(...microOhms);
  const flagged: number[] = [];
  microOhms.forEach((v, i) => {
    if (v - lowest > CONTACT_DEVIATION_LIMIT * lowest * (1 + ROUNDING_SLACK)) flagged.push(i);
  });
  return flagged;
}
