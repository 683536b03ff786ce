/** Display helpers for readings (units always shown beside the number). */
export const sig = (n: number, digits = 3) => Number(n.toPrecision(digits)).toLocaleString("en-GB");
export const megohms = (n: number | null, qualifier?: "at_or_above" | "below" | null) =>
  n == null ? "—" : `${qualifier === "at_or_above" ? "≥ " : qualifier === "below" ? "≤ " : ""}${sig(n)} MΩ`;
export const when = (iso: string) =>
  new Date(iso).toLocaleString("en-GB", {
    day: "numeric",
    month: "short",
    year: "numeric",
    hour: "2-digit",
    minute: "2-digit",
  });
export const day = (ms: number) => new Date(ms).toLocaleDateString("en-GB", { day: "numeric", month: "short" });

/** "2026-11-20T09:30" for a datetime-local input, in the browser's time zone. */
export function localNow(d = new Date()) {
  const pad = (x: number) => String(x).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
