/**
 * Turns a series of insulation readings into what the dry-out chart draws. Pure.
 * Readings "not valid for judging" (at or near the dew point, below freezing) are drawn
 * apart and left out of the trend; the trend is assessDryOut's (recent window, levelling,
 * a range for the estimate, complete only when stable at temperature with the PI met).
 */
import { assessDryOut } from "./insulation";
import type { InsulationReading } from "../schemas/readings";

const HOUR = 3_600_000;
/** Beyond this an extension says more about the fit than the board: it is not drawn. */
export const MAX_FORECAST_HOURS = 24 * 60;

type Point = { t: number; y: number };

export function dryOutSeries(readings: InsulationReading[]) {
  const usable = readings.filter((r) => r.judgement.correctedMegohms != null && r.judgement.correctedMegohms > 0);
  const toPoint = (r: InsulationReading): Point => ({ t: Date.parse(r.measuredAt), y: r.judgement.correctedMegohms! });
  const byTime = (a: Point, b: Point) => a.t - b.t;
  const valid = usable
    .filter((r) => r.judgement.validForJudging !== false)
    .sort((a, b) => Date.parse(a.measuredAt) - Date.parse(b.measuredAt));
  const points = valid.map(toPoint);
  const excluded = usable
    .filter((r) => r.judgement.validForJudging === false)
    .map(toPoint)
    .sort(byTime);
  const zeros = readings.filter((r) => r.judgement.correctedMegohms === 0).length;
  if (points.length === 0 && excluded.length === 0) return null;
  const newest = [...readings].sort((a, b) => Date.parse(b.measuredAt) - Date.parse(a.measuredAt))[0];
  const minimum = newest.judgement.minimum.megohms;
  const minimumPi = newest.judgement.minimumPi;
  const baseC = newest.judgement.baseTemperatureC ?? 20;
  const all = [...points, ...excluded];
  const t0 = Math.min(...all.map((p) => p.t));
  const assessment = assessDryOut(
    valid.map((r) => ({
      hours: (Date.parse(r.measuredAt) - t0) / HOUR,
      megohms: r.judgement.correctedMegohms!,
      temperatureC: r.equipmentTempC,
      pi: r.judgement.piBound === "exact" || r.judgement.piBound === "at_least" ? r.judgement.pi : null,
    })),
    minimum,
    { minimumPi },
  );
  const last = points[points.length - 1];
  const h = assessment.hoursToTarget?.central ?? null;
  const extension =
    last && h != null && h > 0 && h <= MAX_FORECAST_HOURS
      ? [
          { t: last.t, y: last.y },
          { t: last.t + h * HOUR, y: minimum },
        ]
      : null;
  const ys = [...all.map((p) => p.y), minimum];
  const lo = Math.pow(10, Math.floor(Math.log10(Math.min(...ys) * 0.9)));
  const hi = Math.pow(10, Math.ceil(Math.log10(Math.max(...ys) * 1.1)));
  const tMax = Math.max(...all.map((p) => p.t), extension ? extension[1].t : -Infinity);
  return {
    points,
    excluded,
    zeros,
    minimum,
    baseC,
    assessment,
    extension,
    yDomain: [lo, hi] as [number, number],
    xDomain: [t0, tMax] as [number, number],
    yTicks: logTicks(lo, hi),
  };
}

/** Powers of ten, with 2× and 5× when the axis spans few decades. */
export function logTicks(lo: number, hi: number) {
  const decades = Math.round(Math.log10(hi / lo));
  const ticks: number[] = [];
  for (let d = lo; d <= hi * 1.0001; d *= 10) {
    ticks.push(d);
    if (decades <= 2 && d * 10 <= hi * 1.0001) ticks.push(d * 2, d * 5);
  }
  return ticks;
}

export function forecastWords(s: NonNullable<ReturnType<typeof dryOutSeries>>) {
  const a = s.assessment;
  const skipped = s.excluded.length
    ? ` ${s.excluded.length} reading${s.excluded.length > 1 ? "s" : ""} not valid for judging (dew point or freezing) left out.`
    : "";
  const rate =
    a.slopePerHour != null && a.slopePerHour > 0 ? ` (doubling about every ${span(Math.LN2 / a.slopePerHour)})` : "";
  switch (a.state) {
    case "complete":
    case "reached":
      return `The latest corrected reading reaches the ${fmt(s.minimum)} MΩ minimum. ${a.message}${skipped}`; // "Dry-out not yet shown complete: …" or "Dry-out criterion met: …"
    case "rising": {
      const r = a.hoursToTarget!;
      if (r.central > MAX_FORECAST_HOURS)
        return `Estimate, not a promise: at the recent rate${rate} the minimum is more than 60 days away; not drawn.${skipped}`;
      const range =
        r.high == null
          ? ` (at the soonest ${span(r.low)}; no upper bound from these readings)`
          : span(r.low) === span(r.high)
            ? ""
            : ` (range ${span(r.low)} to ${span(r.high)})`;
      return `Estimate, not a promise: at the recent rate${rate} the corrected value would reach the ${fmt(s.minimum)} MΩ minimum about ${span(r.central)} after the last reading${range}. Re-test; a qualified person decides.${skipped}`;
    }
    case "too_few":
      return `No estimate: it needs three or more readings valid for judging with a rising trend.${skipped}`;
    case "no_readings":
      return `No estimate: no reading is valid for judging yet.${skipped}`;
    default:
      return `${a.state === "falling" ? "No estimate: " : ""}${a.message}${skipped}`;
  }
}

const fmt = (n: number) => Number(n.toPrecision(3)).toString();
// A fitted estimate supports whole hours at best, and whole days beyond two (no false precision).
export const span = (hours: number) =>
  hours < 48 ? `${Math.max(1, Math.round(hours))} h` : `${Math.round(hours / 24)} days`;
