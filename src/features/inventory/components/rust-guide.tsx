import { useMemo } from "react";
import { ASTM_D610_BANDS, iso4628RiGrade } from "../../../domain/corrosion";

const SIDE = 44;
const DOT_AREA = Math.PI * 1.5 * 1.5;
/** At least a few visible specks for the light grades, so the eye can tell them apart. */
const MIN_DOTS: Record<number, number> = { 10: 0, 9: 1, 8: 2, 7: 4, 6: 6 };

/** Deterministic pseudo-random dots (a small LCG), so every swatch looks the same each time. */
function dots(percent: number, grade: number, seed: number) {
  const n = Math.max(MIN_DOTS[grade] ?? 0, Math.round(((percent / 100) * SIDE * SIDE) / DOT_AREA));
  let s = seed;
  const rand = () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648;
  return Array.from({ length: n }, () => ({
    x: 2 + rand() * (SIDE - 4),
    y: 2 + rand() * (SIDE - 4),
    r: 1.1 + rand() * 0.9,
  }));
}

/** A painted-steel square rusted to the band's density: Tideline's own drawing, not the standard's plates. */
export function RustSwatch({ percent, grade }: { percent: number; grade: number }) {
  const ds = useMemo(() => dots(percent, grade, 7 + grade * 31), [percent, grade]);
  return (
    <svg viewBox={`0 0 ${SIDE} ${SIDE}`} className="h-11 w-11 shrink-0 rounded" aria-hidden="true">
      <rect width={SIDE} height={SIDE} className="fill-hull-600" />
      {ds.map((d, i) => (
        <circle key={i} cx={d.x} cy={d.y} r={d.r} className="fill-rust-400" />
      ))}
    </svg>
  );
}

/** Percent used when a band is tapped: its upper bound (grade 0 has none, so three quarters). */
export const bandPercent = (b: (typeof ASTM_D610_BANDS)[number]) => (b.grade === 0 ? 75 : b.maxPercent);

/** The ISO 4628-3 degrees the band spans ("Ri 3–4" when its ends fall on different degrees). */
function riRange(lower: number, b: (typeof ASTM_D610_BANDS)[number]): string {
  const lo = iso4628RiGrade(b.grade === 10 ? 0 : Math.min(100, lower + 1e-6));
  const hi = iso4628RiGrade(b.grade === 0 ? 100 : b.maxPercent);
  return lo === hi ? lo : `${lo}–${hi.replace("Ri ", "")}`;
}

/** The ASTM D610 bands as tappable swatches with the grade and the nearest ISO 4628-3 Ri beside each. */
export function RustGuide({ grade, onPick }: { grade: number | null; onPick: (percent: number) => void }) {
  return (
    <div
      role="group"
      aria-label="Visual guide: tap the square that looks like the surface"
      className="grid grid-cols-2 gap-1.5 lg:grid-cols-3"
    >
      {ASTM_D610_BANDS.map((b, i) => {
        const lower = i === 0 ? 0 : ASTM_D610_BANDS[i - 1].maxPercent;
        const shown = b.grade === 0 ? 60 : b.maxPercent;
        return (
          <button
            key={b.grade}
            type="button"
            aria-pressed={grade === b.grade}
            onClick={() => onPick(bandPercent(b))}
            className={`flex min-h-12 items-center gap-3 rounded-md p-1.5 text-left ring-1 ${grade === b.grade ? "bg-hull-700 ring-2 ring-brass-300" : "bg-hull-850 ring-hull-600"}`}
          >
            <RustSwatch percent={shown} grade={b.grade} />
            <span className="min-w-0 flex-1">
              <span className="block font-mono text-sm font-bold">
                G{b.grade} <span className="font-normal text-mist">{riRange(lower, b)}</span>
              </span>
              <span className="block text-xs text-mist">
                {b.grade === 0 ? "> 50 %" : i === 0 ? `≤ ${b.maxPercent} %` : `${lower}–${b.maxPercent} %`}
              </span>
              <span className="hidden text-xs text-fog sm:block">{b.description}</span>
            </span>
          </button>
        );
      })}
    </div>
  );
}
