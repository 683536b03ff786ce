/** Display helpers for readings (units always shown beside the number). */
export const sig = (n: number, digits = 3) => Number(n.toPrecision(digits)).toLocaleString("en-GB");
export const megohms = (n: number | null, qualifier?: "at_or_above" | "below" | null) =>
  n == null ? "—" : `${qualifier === "at_or_above" ? "≥ " : qualifier === "below" ? "≤ " : ""}${sig(n)} MΩ`;
/** Times as every page writes them (src/lib/clock.ts): "2026-12-05 07:18"; a chart's axis "5 Dec". */
export { stamp as when, shortDay as day } from "../../lib/clock";

/** "2026-11-20T09:30" for a datetime-local input, in the browser's time zone. */
export function localNow(d = new Date()) {
  const pad = (x: number) => String(x).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
