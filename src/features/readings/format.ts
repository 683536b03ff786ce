/** Display helpers for readings (units always shown beside the number). */
export const sig = (n: number, digits = 3) => Number(n.toPrecision(digits)).toLocaleString("en-GB");
export const megohms = (n: number | null, qualifier?: "at_or_above" | "below" | null) =>
  n == null ? "—" : `${qualifier === "at_or_above" ? "≥ " : qualifier === "below" ? "≤ " : ""}${sig(n)} MΩ`;
/** A form's qualifier select: "" → null. */
export const qualifierOf = (v: FormDataEntryValue | null) => (v === "at_or_above" || v === "below" ? v : null);
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
export const toIso = (local: string) => (local ? new Date(local).toISOString() : "");

/** A number field's value: empty → null, otherwise a number (NaN stays NaN for zod to name). */
export function numOrNull(v: FormDataEntryValue | null): number | null {
  const s = String(v ?? "")
    .trim()
    .replace(",", ".");
  return s === "" ? null : Number(s);
}

/** zod issues → { field: message } for the form, by the first path element. */
export function fieldErrors(issues: Array<{ path: PropertyKey[]; message: string }>) {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const k = i.path.map(String).join(".") || "_";
    out[k] ??= i.message;
  }
  return out;
}
