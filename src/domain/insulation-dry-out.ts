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

/** Recent readings the trend is fitted to: the dry-out rate changes as the board dries. */
export const DRY_OUT_WINDOW = 4;
/** Across the window, less than this relative change counts as stable (common practice: ±5 %). */
export const STABLE_FRACTION = 0.05;
/** The recent rate under this share of the earlier rate counts as levelling off (Tideline's rule). */
export const LEVELLING_RATIO = 0.25;
/** Readings counted "at the target temperature" within this many kelvin of it (Tideline's rule). */
export const TARGET_TEMPERATURE_BAND_K = 5;

export interface DryOutReading extends DryOutPoint {
  /** Equipment temperature of the reading, °C. */
  temperatureC?: number | null;
  /** Polarization index of the reading, when one was taken. */
  pi?: number | null;
}

export type DryOutState = "no_readings" | "too_few" | "rising" | "levelling_below" | "falling" | "reached" | "complete";

export interface DryOutAssessment {
  state: DryOutState;
  /** Fitted rate over the recent window, per hour (ln MΩ / h). */
  slopePerHour: number | null;
  /** Readings used for the fit (the most recent, up to DRY_OUT_WINDOW). */
  windowSize: number;
  /** Range of the estimate, hours after the last reading (rate ± one standard error); null when no estimate. */
  hoursToTarget: { low: number; central: number; high: number | null } | null;
  message: string;
}

/**
 * Where a dry-out stands, from corrected readings (already excluding those not valid for
 * judging). Rules, in order:
 * - complete: the last three readings are within ±5 % of their mean (stable), taken
 *   within 5 K of the target temperature (or of one another without a target), the last
 *   reaches the minimum and the latest PI meets its minimum (common practice for ending a
 *   dry-out: IR constant over several readings at temperature, PI acceptable — from memory
 *   of IEEE Std 43 and makers' dry-out guides);
 * - reached: the latest reading reaches the minimum (but not yet "complete");
 * - with fewer than 3 readings: too_few;
 * - the trend is fitted to the last DRY_OUT_WINDOW readings (least squares on ln MΩ);
 *   levelling_below: the change across that window is under 5 %, or its rate is under a
 *   quarter of the rate of the readings before it — "drying alone may not get there";
 * - falling: rate ≤ 0; rising: an estimate with a range from the rate ± one standard
 *   error of the slope (high is null when the slower rate is not rising).
 * An estimate is arithmetic on past readings, never a promise.
 */
export function assessDryOut(
  readings: readonly DryOutReading[],
  targetMegohms: number,
  opts: { minimumPi?: number | null; targetTemperatureC?: number | null } = {},
): DryOutAssessment {
  requirePoints(readings);
  const target = requirePositive("targetMegohms", targetMegohms);
  const pts = [...readings].sort((a, b) => a.hours - b.hours);
  const none = (
    state: DryOutState,
    message: string,
    slope: number | null = null,
    windowSize = 0,
  ): DryOutAssessment => ({ state, slopePerHour: slope, windowSize, hoursToTarget: null, message });
  if (pts.length === 0) return none("no_readings", "No readings valid for judging yet.");
  const last = pts[pts.length - 1];
  const lastThree = pts.slice(-3);
  if (last.megohms >= target) {
    const mean = lastThree.reduce((s, p) => s + p.megohms, 0) / lastThree.length;
    const stable =
      lastThree.length === 3 && lastThree.every((p) => Math.abs(p.megohms - mean) <= STABLE_FRACTION * mean);
    const temps = lastThree.map((p) => p.temperatureC).filter((t): t is number => t != null);
    const atTemp =
      temps.length === lastThree.length &&
      (opts.targetTemperatureC != null
        ? temps.every((t) => Math.abs(t - opts.targetTemperatureC!) <= TARGET_TEMPERATURE_BAND_K)
        : Math.max(...temps) - Math.min(...temps) <= TARGET_TEMPERATURE_BAND_K);
    const piOk = opts.minimumPi == null || (last.pi != null && last.pi >= opts.minimumPi);
    if (stable && atTemp && piOk)
      return none(
        "complete",
        "Dry-out criterion met: the last three corrected readings are stable within ±5 % at temperature, reach the minimum, and the PI meets its minimum. A qualified person decides what follows.",
        null,
        3,
      );
    const missing = [
      !stable && "three readings stable within ±5 %",
      !atTemp && "readings at the target temperature",
      !piOk && "a polarization index that meets its minimum",
    ]
      .filter(Boolean)
      .join(", ");
    return none("reached", `Dry-out not yet shown complete: still needs ${missing}.`, null, 0);
  }
  if (pts.length < 3) return none("too_few", "No estimate: it needs three or more readings.");
  const window = pts.slice(-DRY_OUT_WINDOW);
  const earlier = pts.slice(0, pts.length - window.length + 1);
  const fit = fitLogResistance(window);
  if (!fit) return none("too_few", "No estimate: the recent readings share one time.");
  const b = fit.slopePerHour;
  const spanH = window[window.length - 1].hours - window[0].hours;
  const earlierFit = earlier.length >= 2 ? fitLogResistance(earlier) : null;
  const flat = Math.abs(b * spanH) < Math.log(1 + STABLE_FRACTION);
  const slowing = earlierFit !== null && earlierFit.slopePerHour > 0 && b < LEVELLING_RATIO * earlierFit.slopePerHour;
  if ((b > 0 && (flat || slowing)) || (b <= 0 && flat)) {
    return none(
      "levelling_below",
      `Levelling off below the minimum: drying alone may not get there. Look for what holds the moisture (silt, a cracked part, salt residue).`,
      b,
      window.length,
    );
  }
  if (b <= 0)
    return none(
      "falling",
      "The recent readings are falling: no estimate. Look for what is wetting the insulation again.",
      b,
      window.length,
    );
  const se = slopeStandardError(window, fit);
  const gap = Math.log(target) - Math.log(last.megohms);
  const central = gap / b;
  const low = gap / (b + se);
  const high = b - se > 0 ? gap / (b - se) : null;
  return {
    state: "rising",
    slopePerHour: b,
    windowSize: window.length,
    hoursToTarget: { low, central, high },
    message: "Estimate from the recent readings, not a promise: re-test; a qualified person decides.",
  };
}

/**
 * Standard error of the least-squares slope: sqrt(Σ residual² / (n − 2) / Sxx).
 * Source: NIST/SEMATECH e-Handbook §4.1.4.1 / any regression text. 0 with two points.
 */
export function slopeStandardError(points: readonly DryOutPoint[], fit: LogResistanceFit): number {
  const n = points.length;
  if (n < 3) return 0;
  const tMean = points.reduce((s, p) => s + p.hours, 0) / n;
  let sxx = 0;
  let sse = 0;
  for (const p of points) {
    sxx += (p.hours - tMean) ** 2;
    sse += (Math.log(p.megohms) - (fit.lnMegohmsAtZero + fit.slopePerHour * p.hours)) ** 2;
  }
  return Math.sqrt(sse / (n - 2) / sxx);
}
