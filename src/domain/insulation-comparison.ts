/**
 * Comparisons between insulation readings that catch what a single minimum misses: one
 * phase lower than its neighbours, a drop since the last test of the same circuit, and a
 * fall in resistance as the test voltage is stepped up. Flags ask for investigation;
 * none of them says equipment may be energised.
 */
import { requireNumber, requirePositive } from "./guards";

/** A phase under this share of the highest phase-to-ground reading is flagged (Tideline's rule, common practice). */
export const PHASE_RATIO_FLAG = 0.5;
/** A drop of more than this share since the previous test of the same circuit is flagged (Tideline's rule). */
export const TREND_DROP_FLAG = 0.25;
/** A fall of more than this share from the lowest test voltage's reading is flagged (common practice: about 25 %). */
export const STEP_VOLTAGE_FALL_FLAG = 0.25;

export type PhaseKey = "A" | "B" | "C";

/** Where the two comparison rules come from, for the screens that show a comparison. */
export const PHASE_COMPARISON_SOURCE = {
  table: "Phase balance and trend (Tideline's rules, common practice)",
  text: `A phase-to-ground reading under ${PHASE_RATIO_FLAG * 100} % of the highest phase of the same circuit, or a drop of more than ${TREND_DROP_FLAG * 100} % since the previous test of the same conductors (both corrected to the same base temperature), is flagged for investigation. Only readings valid for judging take part.`,
} as const;

/**
 * Phase-to-ground readings of one circuit compared with each other (same temperature
 * base). Rule: flag a phase whose value is under PHASE_RATIO_FLAG × the highest.
 * @param values corrected MΩ per phase, ≥ 0; phases not measured are left out
 */
export function comparePhases(values: Partial<Record<PhaseKey, number>>): {
  flagged: PhaseKey[];
  highest: number | null;
  reasons: string[];
} {
  const entries = (Object.entries(values) as [PhaseKey, number][])
    .filter(([, v]) => v != null)
    .map(([p, v]) => [p, requireNumber(p, v, { min: 0 })] as const);
  if (entries.length < 2) return { flagged: [], highest: null, reasons: [] };
  const highest = Math.max(...entries.map(([, v]) => v));
  const flagged = entries.filter(([, v]) => v < PHASE_RATIO_FLAG * highest).map(([p]) => p);
  const reasons = flagged.map(
    (p) =>
      `${p} to ground (${fmt(values[p]!)} MΩ) is under half the highest phase (${fmt(highest)} MΩ): look for a wet or tracked path on ${p}.`,
  );
  return { flagged, highest, reasons };
}

/**
 * A reading against the previous test of the same circuit and conductors (both corrected
 * to the same base). Rule: flag when current < (1 − TREND_DROP_FLAG) × previous.
 */
export function compareWithPrevious(
  currentMegohms: number,
  previousMegohms: number,
): { dropFraction: number; flagged: boolean; reason: string | null } {
  const cur = requireNumber("currentMegohms", currentMegohms, { min: 0 });
  const prev = requireNumber("previousMegohms", previousMegohms, { min: 0 });
  if (prev === 0) return { dropFraction: 0, flagged: false, reason: null };
  const drop = (prev - cur) / prev;
  const flagged = drop > TREND_DROP_FLAG;
  return {
    dropFraction: drop,
    flagged,
    reason: flagged
      ? `Down ${Math.round(drop * 100)} % since the previous test (${fmt(prev)} → ${fmt(cur)} MΩ, corrected): find out why before going on.`
      : null,
  };
}

export interface VoltageStep {
  testVoltsDc: number;
  megohms: number;
}

/**
 * Step-voltage test: readings of the same insulation at rising DC test voltages. Sound dry
 * insulation reads about the same at every step; moisture, dirt or cracks show as a fall as
 * the voltage rises. Rule (common practice): flag a fall of more than 25 % from the
 * reading at the lowest voltage.
 * @returns the steps in rising voltage, the largest fall as a fraction, and the verdict
 */
export function judgeStepVoltage(steps: readonly VoltageStep[]): {
  steps: VoltageStep[];
  largestFall: number;
  verdict: "meets" | "investigate";
  reasons: string[];
} {
  if (!Array.isArray(steps) || steps.length < 2) throw new RangeError("a step-voltage test needs at least two steps");
  const sorted = steps
    .map((s, i) => ({
      testVoltsDc: requirePositive(`steps[${i}].testVoltsDc`, s.testVoltsDc),
      megohms: requireNumber(`steps[${i}].megohms`, s.megohms, { min: 0 }),
    }))
    .sort((a, b) => a.testVoltsDc - b.testVoltsDc);
  const first = sorted[0];
  if (first.megohms === 0)
    return {
      steps: sorted,
      largestFall: 0,
      verdict: "investigate",
      reasons: ["0 MΩ at the lowest step: a dead short; a step test says nothing more."],
    };
  const falls = sorted.slice(1).map((s) => (first.megohms - s.megohms) / first.megohms);
  const largestFall = Math.max(0, ...falls);
  if (largestFall > STEP_VOLTAGE_FALL_FLAG) {
    const at = sorted[1 + falls.indexOf(Math.max(...falls))];
    return {
      steps: sorted,
      largestFall,
      verdict: "investigate",
      reasons: [
        `Falls ${Math.round(largestFall * 100)} % from ${fmt(first.megohms)} MΩ at ${first.testVoltsDc} V to ${fmt(at.megohms)} MΩ at ${at.testVoltsDc} V: more than 25 % points at moisture, dirt or cracks (common practice).`,
      ],
    };
  }
  return {
    steps: sorted,
    largestFall,
    verdict: "meets",
    reasons: [
      `Falls at most ${Math.round(largestFall * 100)} % as the voltage rises (25 % or less meets the recorded criterion; common practice).`,
    ],
  };
}

function fmt(n: number): string {
  return Number(n.toPrecision(3)).toString();
}
