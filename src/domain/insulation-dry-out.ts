/**
 * Dry-out trend: while a wet board is heated and ventilated, insulation resistance
 * rises roughly exponentially with time (common practice: readings are logged on
 * semi-log paper and the straightening line extrapolated). Tideline fits that line.
 * A forecast is arithmetic on past readings, not a promise: re-test before any decision.
 */
import { requireNumber, requirePositive } from "./guards";

export interface DryOutPoint {
  /** Elapsed time of the reading, hours from any fixed start, ≥ 0. */
  hours: number;
  /** Reading, MΩ, > 0 (corrected to one base temperature so readings compare). */
  megohms: number;
}

export interface LogResistanceFit {
  /** d ln(MΩ) / dt, per hour. */
  slopePerHour: number;
  /** Fitted ln(MΩ) at hours = 0. */
  lnMegohmsAtZero: number;
}

export interface DryOutForecast {
  /** Hours after the last reading until the target is reached; 0 if already met. */
  hoursToTarget: number | null;
  /** Hours for the resistance to double at the fitted rate. */
  doublingHours: number | null;
}

function requirePoints(points: readonly DryOutPoint[]): void {
  if (!Array.isArray(points)) throw new RangeError("points must be an array");
  points.forEach((p, i) => {
    requireNumber(`points[${i}].hours`, p.hours, { min: 0 });
    requirePositive(`points[${i}].megohms`, p.megohms);
  });
}

/**
 * Ordinary least-squares line through (t, ln R).
 * Formula: b = Σ(t−t̄)(y−ȳ) / Σ(t−t̄)², a = ȳ − b·t̄, y = ln(MΩ).
 * Source: least squares, any statistics text (e.g. NIST/SEMATECH e-Handbook §4.1.4.1).
 * @returns null with fewer than two points or when every reading has the same time
 * @throws RangeError for negative/NaN hours or non-positive megohms
 */
export function fitLogResistance(points: readonly DryOutPoint[]): LogResistanceFit | null {
  requirePoints(points);
  if (points.length < 2) return null;
  const n = points.length;
  const tMean = points.reduce((s, p) => s + p.hours, 0) / n;
  const yMean = points.reduce((s, p) => s + Math.log(p.megohms), 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (const p of points) {
    sxx += (p.hours - tMean) ** 2;
    sxy += (p.hours - tMean) * (Math.log(p.megohms) - yMean);
  }
  if (sxx === 0) return null;
  const slopePerHour = sxy / sxx;
  return { slopePerHour, lnMegohmsAtZero: yMean - slopePerHour * tMean };
}

/**
 * Forecast of a dry-out from timed readings.
 * Formula: with slope b from fitLogResistance, doublingHours = ln 2 / b and
 * hoursToTarget = (ln target − ln R_last) / b, projected from the latest reading
 * (the one with the greatest hours) along the fitted rate.
 * Rules: hoursToTarget is 0 when the latest reading already meets the target (a fact,
 * whatever the number of points); otherwise both values are null with fewer than
 * 3 points or when the fitted trend is flat or falling (b ≤ 0).
 * @param targetMegohms target resistance, MΩ, > 0
 * @throws RangeError for bad points or a non-positive target
 */
export function forecastDryOut(points: readonly DryOutPoint[], targetMegohms: number): DryOutForecast {
  requirePoints(points);
  const target = requirePositive("targetMegohms", targetMegohms);
  const last = points.reduce<DryOutPoint | null>((a, p) => (a === null || p.hours >= a.hours ? p : a), null);
  const fit = points.length >= 3 ? fitLogResistance(points) : null;
  const rising = fit !== null && fit.slopePerHour > 0;
  const doublingHours = rising ? Math.LN2 / fit.slopePerHour : null;
  if (last !== null && last.megohms >= target) return { hoursToTarget: 0, doublingHours };
  if (!rising || last === null) return { hoursToTarget: null, doublingHours };
  return { hoursToTarget: (Math.log(target) - Math.log(last.megohms)) / fit.slopePerHour, doublingHours };
}
