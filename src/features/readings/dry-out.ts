/** Turns a series of insulation readings into what the dry-out chart draws. Pure. */
import { forecastDryOut } from "../../domain/insulation";
import type { InsulationReading } from "../../schemas/readings";

const HOUR = 3_600_000;
/** Beyond this an extension says more about the fit than the board: it is not drawn. */
export const MAX_FORECAST_HOURS = 24 * 60;

export function dryOutSeries(readings: InsulationReading[]) {
  const points = readings
    .filter((r) => r.judgement.correctedMegohms != null && r.judgement.correctedMegohms > 0)
    .map((r) => ({ t: Date.parse(r.measuredAt), y: r.judgement.correctedMegohms! }))
    .sort((a, b) => a.t - b.t);
  if (points.length === 0) return null;
  const newest = [...readings].sort((a, b) => Date.parse(b.measuredAt) - Date.parse(a.measuredAt))[0];
  const minimum = newest.judgement.minimum.megohms;
  const baseC = newest.judgement.baseTemperatureC;
  const t0 = points[0].t;
  const last = points[points.length - 1];
  const forecast = forecastDryOut(points.map((p) => ({ hours: (p.t - t0) / HOUR, megohms: p.y })), minimum);
  const h = forecast.hoursToTarget;
  const extension = h != null && h > 0 && h <= MAX_FORECAST_HOURS ? [{ t: last.t, y: last.y }, { t: last.t + h * HOUR, y: minimum }] : null;
  const ys = [...points.map((p) => p.y), minimum];
  const lo = Math.pow(10, Math.floor(Math.log10(Math.min(...ys) * 0.9)));
  const hi = Math.pow(10, Math.ceil(Math.log10(Math.max(...ys) * 1.1)));
  return { points, minimum, baseC, forecast, extension, yDomain: [lo, hi] as [number, number], xDomain: [t0, extension ? extension[1].t : last.t] as [number, number], yTicks: logTicks(lo, hi) };
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
  const last = s.points[s.points.length - 1];
  const dbl = s.forecast.doublingHours;
  const rate = dbl != null ? ` (doubling about every ${span(dbl)})` : "";
  if (last.y >= s.minimum) return `The latest corrected reading reaches the ${fmt(s.minimum)} MΩ minimum${rate}.`;
  const h = s.forecast.hoursToTarget;
  if (h == null) return "No estimate: it needs three or more readings with a rising trend.";
  if (h > MAX_FORECAST_HOURS) return `Estimate, not a promise: at the fitted rate${rate} the minimum is more than 60 days away; not drawn.`;
  return `Estimate, not a promise: at the fitted rate${rate} the corrected value would reach the ${fmt(s.minimum)} MΩ minimum about ${span(h)} after the last reading. Re-test; a qualified person decides.`;
}

const fmt = (n: number) => Number(n.toPrecision(3)).toString();
// A fitted estimate supports whole hours at best, and whole days beyond two (no false precision).
export const span = (hours: number) => (hours < 48 ? `${Math.max(1, Math.round(hours))} h` : `${Math.round(hours / 24)} days`);
