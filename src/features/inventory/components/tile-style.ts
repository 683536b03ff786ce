import type { CSSProperties } from "react";
import type { Custody, Disposition } from "../../../domain/vocab";

/**
 * Tideline's condition scheme for board tiles. Every state is carried three ways:
 * a colour from the night-watch palette, a word, and a shape or pattern, so it
 * reads in greyscale, in red-green colour blindness and on a dim phone.
 */

/** Grade bands grouping ASTM D610 grades for the elevation (Tideline's own grouping). */
export const GRADE_BANDS = [
  { key: "sound", label: "Sound (10–8)", min: 8, max: 10, tone: "bg-kelp-400 text-hull-950", bar: "bg-kelp-400" },
  { key: "spotted", label: "Spotted (7–5)", min: 5, max: 7, tone: "bg-brass-400 text-hull-950", bar: "bg-brass-400" },
  { key: "rusting", label: "Rusting (4–3)", min: 3, max: 4, tone: "bg-rust-400 text-hull-950", bar: "bg-rust-400" },
  { key: "heavy", label: "Heavy rust (2–0)", min: 0, max: 2, tone: "bg-flare-400 text-hull-950", bar: "bg-flare-400" },
] as const;
export type GradeBandKey = (typeof GRADE_BANDS)[number]["key"] | "ungraded";

export function gradeBand(grade: number | null | undefined): GradeBandKey {
  if (grade === null || grade === undefined) return "ungraded";
  return GRADE_BANDS.find((b) => grade >= b.min && grade <= b.max)?.key ?? "ungraded";
}
export const gradeTone = (grade: number | null | undefined) =>
  GRADE_BANDS.find((b) => b.key === gradeBand(grade))?.tone ?? "bg-hull-700 text-mist";
export const gradeBar = (grade: number | null | undefined) =>
  GRADE_BANDS.find((b) => b.key === gradeBand(grade))?.bar ?? "bg-hull-500";

/** Disposition: a word and a ring style; the colour only repeats what the word says. */
export const DISPOSITION_STYLE: Record<Disposition | "undecided", { chip: string; mark: string; bar: string }> = {
  clean: { chip: "border-kelp-400 text-kelp-300", mark: "○", bar: "bg-kelp-400" },
  rebuild: { chip: "border-tide-400 text-tide-300", mark: "◇", bar: "bg-tide-400" },
  replace: { chip: "border-flare-400 text-flare-300", mark: "✕", bar: "bg-flare-400" },
  source: { chip: "border-brass-400 text-brass-300", mark: "⌕", bar: "bg-brass-400" },
  undecided: { chip: "border-dashed border-hull-500 text-fog", mark: "·", bar: "bg-hull-500" },
};

/** Custody: out-of-place parts get a pattern over the tile, as well as their words. */
const hatch = (angle: number, colour: string, gap = 7): string =>
  `repeating-linear-gradient(${angle}deg, ${colour} 0 1.5px, transparent 1.5px ${gap}px)`;
export function custodyPattern(custody: Custody | undefined): CSSProperties {
  const line = "rgba(237, 242, 245, 0.16)";
  switch (custody) {
    case "removed":
    case "in_workshop":
      return { backgroundImage: hatch(135, line) };
    case "ready_to_refit":
      return { backgroundImage: hatch(45, line, 10) };
    case "scrapped":
      return { backgroundImage: `${hatch(45, line)}, ${hatch(135, line)}` };
    case "missing":
      return {
        backgroundImage: "radial-gradient(rgba(237,242,245,0.22) 1px, transparent 1.5px)",
        backgroundSize: "7px 7px",
      };
    default:
      return {};
  }
}
/** Short custody words on a tile (full labels are in CUSTODY_LABELS). */
export const CUSTODY_SHORT: Record<Custody, string> = {
  in_place: "in place",
  removed: "out · tagged",
  in_workshop: "workshop",
  ready_to_refit: "to refit",
  refitted: "refitted",
  scrapped: "scrapped",
  missing: "missing",
};
