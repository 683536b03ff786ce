/**
 * Breaker trip tests by primary injection: the inverse-time (overload) trip at 300 % of the
 * rating and the instantaneous pickup. A test that meets its band says only that the trip
 * behaved inside the recorded band on that day; injection testing carries shock and arc-flash
 * hazards and is done by qualified people under NFPA 70E.
 *
 * The band comes first from the breaker's own time-current curve (the manufacturer's band);
 * field manuals say to judge against it (e.g. TM 5-683 / NAVFAC MO-116 §"molded case circuit
 * breakers": "refer to the manufacturer's document… if the breaker does not trip within the
 * specified bandwidth" it should be replaced). Without one, the maximum times of
 * NETA_INVERSE_TIME_300 apply to thermal-magnetic molded-case breakers.
 */
import { requireNumber, requireOneOf, requirePositive } from "./guards";

export const TRIP_UNITS = ["thermal_magnetic", "electronic"] as const;
export type TripUnit = (typeof TRIP_UNITS)[number];
export const TRIP_UNIT_LABELS: Record<TripUnit, string> = {
  thermal_magnetic: "Thermal-magnetic",
  electronic: "Electronic trip unit",
};

/** Component kinds a crew trip-tests by primary injection (a bus tie is a breaker too). Common practice. */
export const TRIP_TESTABLE_KINDS = ["molded_case_breaker", "power_breaker", "bus_tie", "electronic_trip_unit"] as const;

export interface InverseTimeRow {
  /** Highest continuous-current rating this row covers, A. */
  maxAmps: number;
  /** Maximum trip time at 300 % of rating, seconds, at 240 V and at 480–600 V. */
  maxSeconds240: number;
  maxSeconds600: number;
}

/**
 * Maximum inverse-time trip times at 300 % of rating for thermal-magnetic molded-case
 * breakers, as in ANSI/NETA ATS Table 100.7 (after NEMA AB 4, Table 5-3). FROM MEMORY:
 * check against the edition you hold. Above 600 A the manufacturer's band is required.
 */
export const NETA_INVERSE_TIME_300: readonly InverseTimeRow[] = [
  { maxAmps: 30, maxSeconds240: 50, maxSeconds600: 70 },
  { maxAmps: 50, maxSeconds240: 80, maxSeconds600: 100 },
  { maxAmps: 100, maxSeconds240: 140, maxSeconds600: 160 },
  { maxAmps: 150, maxSeconds240: 200, maxSeconds600: 250 },
  { maxAmps: 225, maxSeconds240: 230, maxSeconds600: 275 },
  { maxAmps: 450, maxSeconds240: 300, maxSeconds600: 350 },
  { maxAmps: 600, maxSeconds240: 450, maxSeconds600: 450 },
];

export interface TripBand {
  minSeconds: number;
  maxSeconds: number;
  source: string;
}

/**
 * The band an inverse-time trip at 300 % is judged against: the manufacturer's when given,
 * else NETA Table 100.7 (0 to its maximum) for a thermal-magnetic breaker up to 600 A; null
 * when neither applies (an electronic trip unit or a larger breaker needs its own curve).
 */
export function inverseTimeBand(input: {
  ratingAmps: number;
  systemVolts: number;
  tripUnit: TripUnit;
  manufacturer?: { minSeconds: number; maxSeconds: number } | null;
}): TripBand | null {
  const amps = requirePositive("ratingAmps", input.ratingAmps);
  const volts = requirePositive("systemVolts", input.systemVolts);
  requireOneOf("tripUnit", input.tripUnit, TRIP_UNITS);
  const m = input.manufacturer;
  if (m) {
    const lo = requireNumber("minSeconds", m.minSeconds, { min: 0 });
    const hi = requireNumber("maxSeconds", m.maxSeconds, { min: lo, minExclusive: false });
    return { minSeconds: lo, maxSeconds: hi, source: "Manufacturer's time-current curve at 300 % (as recorded)" };
  }
  if (input.tripUnit !== "thermal_magnetic") return null;
  const row = NETA_INVERSE_TIME_300.find((r) => amps <= r.maxAmps);
  if (!row) return null;
  const max = volts <= 250 ? row.maxSeconds240 : row.maxSeconds600;
  return {
    minSeconds: 0,
    maxSeconds: max,
    source: `NETA ATS Table 100.7 (after NEMA AB 4), ${amps} A at ${volts <= 250 ? "240" : "480–600"} V: at most ${max} s — values from memory, check your edition`,
  };
}

export type TripVerdict = "meets" | "investigate";

/**
 * Judges an inverse-time trip. Rules: the test current should be 300 % of the rating
 * (±10 %, Tideline's tolerance for field sets) for the band to apply; a breaker that did not
 * trip (tripSeconds null) or tripped outside the band → investigate; inside → meets.
 */
export function judgeInverseTimeTrip(input: {
  ratingAmps: number;
  testAmps: number;
  tripSeconds: number | null;
  systemVolts: number;
  tripUnit: TripUnit;
  manufacturer?: { minSeconds: number; maxSeconds: number } | null;
}): { verdict: TripVerdict; percentOfRating: number; band: TripBand | null; reasons: string[] } {
  const rating = requirePositive("ratingAmps", input.ratingAmps);
  const test = requirePositive("testAmps", input.testAmps);
  const t = input.tripSeconds === null ? null : requireNumber("tripSeconds", input.tripSeconds, { min: 0 });
  const percent = (100 * test) / rating;
  const band = inverseTimeBand(input);
  const reasons: string[] = [];
  if (Math.abs(percent - 300) > 30)
    reasons.push(`Tested at ${fmt(percent)} % of rating: the 300 % band does not apply; test at ${fmt(3 * rating)} A.`);
  if (!band)
    reasons.push("No band to judge against: record the manufacturer's band from the breaker's time-current curve.");
  if (reasons.length) return { verdict: "investigate", percentOfRating: percent, band, reasons };
  if (t === null)
    return {
      verdict: "investigate",
      percentOfRating: percent,
      band,
      reasons: [`Did not trip: the band ends at ${fmt(band!.maxSeconds)} s.`],
    };
  if (t > band!.maxSeconds)
    return {
      verdict: "investigate",
      percentOfRating: percent,
      band,
      reasons: [`Tripped in ${fmt(t)} s, slower than the ${fmt(band!.maxSeconds)} s the band allows.`],
    };
  if (t < band!.minSeconds)
    return {
      verdict: "investigate",
      percentOfRating: percent,
      band,
      reasons: [`Tripped in ${fmt(t)} s, faster than the band's ${fmt(band!.minSeconds)} s: nuisance tripping likely.`],
    };
  return {
    verdict: "meets",
    percentOfRating: percent,
    band,
    reasons: [
      `Tripped in ${fmt(t)} s, inside the band (${fmt(band!.minSeconds)}–${fmt(band!.maxSeconds)} s): meets the recorded criterion.`,
    ],
  };
}

/**
 * Instantaneous pickup tolerances, as in ANSI/NETA ATS Table 100.8 (after NEMA AB 4;
 * FROM MEMORY, check your edition): electronic trip units −30 %/+30 % of the setting;
 * adjustable thermal-magnetic −30 %/+40 % of the setting; non-adjustable thermal-magnetic
 * the manufacturer's published range widened by −25 %/+25 %.
 */
export const INSTANTANEOUS_TOLERANCE = {
  electronic: { low: 0.7, high: 1.3 },
  adjustable: { low: 0.7, high: 1.4 },
  published: { low: 0.75, high: 1.25 },
} as const;

/**
 * Judges an instantaneous pickup current against its tolerance window.
 * @param input.settingAmps the dial setting in amperes (electronic or adjustable)
 * @param input.published the manufacturer's published range, A (non-adjustable)
 */
export function judgeInstantaneousTrip(input: {
  tripUnit: TripUnit;
  adjustable: boolean;
  pickupAmps: number;
  settingAmps?: number | null;
  published?: { lowAmps: number; highAmps: number } | null;
}): { verdict: TripVerdict; lowAmps: number; highAmps: number; source: string; reasons: string[] } {
  requireOneOf("tripUnit", input.tripUnit, TRIP_UNITS);
  const pickup = requirePositive("pickupAmps", input.pickupAmps);
  let low: number;
  let high: number;
  let source: string;
  if (input.tripUnit === "electronic" || input.adjustable) {
    const setting = requirePositive("settingAmps", input.settingAmps ?? NaN);
    const tol =
      input.tripUnit === "electronic" ? INSTANTANEOUS_TOLERANCE.electronic : INSTANTANEOUS_TOLERANCE.adjustable;
    low = setting * tol.low;
    high = setting * tol.high;
    source = `NETA ATS Table 100.8 (from memory): ${input.tripUnit === "electronic" ? "electronic trip, −30 %/+30 %" : "adjustable thermal-magnetic, −30 %/+40 %"} of the ${fmt(setting)} A setting`;
  } else {
    const p = input.published;
    if (!p) throw new RangeError("published range is required for a non-adjustable breaker");
    const lo = requirePositive("published.lowAmps", p.lowAmps);
    const hi = requireNumber("published.highAmps", p.highAmps, { min: lo });
    low = lo * INSTANTANEOUS_TOLERANCE.published.low;
    high = hi * INSTANTANEOUS_TOLERANCE.published.high;
    source = `NETA ATS Table 100.8 (from memory): non-adjustable, published ${fmt(lo)}–${fmt(hi)} A widened −25 %/+25 %`;
  }
  const inside = pickup >= low && pickup <= high;
  const reasons = [
    inside
      ? `Picked up at ${fmt(pickup)} A, inside ${fmt(low)}–${fmt(high)} A: meets the recorded criterion.`
      : `Picked up at ${fmt(pickup)} A, outside ${fmt(low)}–${fmt(high)} A.`,
  ];
  return { verdict: inside ? "meets" : "investigate", lowAmps: low, highAmps: high, source, reasons };
}

function fmt(n: number): string {
  return Number(n.toPrecision(4)).toString();
}
