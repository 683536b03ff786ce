/** Small statistics for `npm run bench`: every figure is printed as median [min–max] over runs. */
export const median = (xs: readonly number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

/** Nearest-rank percentile (p in 0…100). */
export const percentile = (xs: readonly number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
};

const fmt = (x: number, digits: number) => (Number.isFinite(x) ? x.toFixed(digits) : "–");

/** "12.3 [11.0–14.2]" */
export const spread = (xs: readonly number[], digits = 1) =>
  xs.length ? `${fmt(median(xs), digits)} [${fmt(Math.min(...xs), digits)}–${fmt(Math.max(...xs), digits)}]` : "–";

/** A fixed-width text table. */
export function table(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: string[]) =>
    cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join("  ");
  return [line(header), ...rows.map(line)].join("\n");
}
