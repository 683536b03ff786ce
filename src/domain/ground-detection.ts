/**
 * Ground-detection lamps on an ungrounded three-phase board: one lamp branch from each
 * phase to ground, all three alike. A ground on one phase pulls that lamp dark and the
 * other two brighter. Model: balanced phase voltages, three equal resistive lamp
 * branches, one resistive fault on at most one phase, system capacitance neglected,
 * lamps treated as fixed resistors (a real filament's resistance rises with voltage,
 * so figures are estimates). Readings are for tracing a fault; they say nothing about
 * whether a board may be energised or worked on — see NFPA 70E.
 *
 * Derivation (Millman's theorem: J. Millman, "A Useful Network Theorem", Proc. IRE 28,
 * 1940, restated in most circuits texts; citation from memory): with phase
 * EMFs E_A, E_B, E_C about the source neutral, branch conductance G = 1/R_branch on each
 * phase and F = 1/R_fault added on the faulted phase A, the ground node sits at
 *   V_G = Σ Y_i E_i / Σ Y_i = F·E_A / (3G + F)          (since E_A + E_B + E_C = 0)
 * so with k = F/(3G + F) = R_branch/(R_branch + 3·R_fault) and V_ph = V_line/√3:
 *   faulted lamp  |E_A − k E_A| = V_ph (1 − k)
 *   healthy lamps |E_B − k E_A| = V_ph √(1 + k + k²)
 */
import { requireNumber, requireOneOf, requirePositive } from "./guards";

export type Phase = "A" | "B" | "C";
export const PHASES: readonly Phase[] = ["A", "B", "C"];
export type LampVoltages = Record<Phase, number>;

/** Readings within this fraction of V_ph of one another count as balanced (no ground shown). */
export const BALANCE_TOLERANCE = 0.05;

export interface GroundLampInput {
  /** Line-to-line voltage, V rms, > 0 (e.g. 450 or 480). */
  lineVolts: number;
  faultPhase: Phase | null;
  /** Fault resistance phase-to-ground, Ω, ≥ 0 (Infinity = no fault). Ignored with no fault. */
  faultOhms: number;
  /** Resistance of each lamp branch, Ω, > 0. */
  branchOhms: number;
}

/**
 * Lamp voltages for a board with (at most) one resistive ground.
 * Formula: k = R_branch/(R_branch + 3·R_fault); faulted V_ph(1 − k); healthy V_ph√(1 + k + k²).
 * Source: Millman's theorem (see module comment). Bolted fault on 450 V: 0 V and 450 V;
 * no fault: 259.8 V on all three.
 * @returns lamp voltages, V rms
 * @throws RangeError for non-positive voltage or branch resistance, negative fault ohms
 */
export function groundLampVoltages(input: GroundLampInput): LampVoltages {
  const vPh = requirePositive("lineVolts", input.lineVolts) / Math.sqrt(3);
  const rBranch = requirePositive("branchOhms", input.branchOhms);
  if (input.faultPhase === null) return { A: vPh, B: vPh, C: vPh };
  requireOneOf("faultPhase", input.faultPhase, PHASES);
  const rFault = requireNumber("faultOhms", input.faultOhms, { min: 0, allowInfinity: true });
  const k = rFault === Infinity ? 0 : rBranch / (rBranch + 3 * rFault);
  const healthy = vPh * Math.sqrt(1 + k + k * k);
  const out: LampVoltages = { A: healthy, B: healthy, C: healthy };
  out[input.faultPhase] = vPh * (1 - k);
  return out;
}

export interface GroundLocation {
  phase: Phase | null;
  /** Estimated fault resistance, Ω; null when no phase or branchOhms is unknown. */
  faultOhms: number | null;
  reason: string;
}

/**
 * Inverse of groundLampVoltages: which phase is suspected and, with the lamp branch
 * resistance known, roughly how hard the ground is.
 * Rules: spread (max − min) ≤ 5 % of V_ph → balanced, no phase. Otherwise the lowest
 * lamp is the suspected phase, unless the two lowest agree within that tolerance (not
 * the single-ground pattern: two grounds, or a lamp or fuse out) → no phase.
 * Fault resistance: k = 1 − V_f/V_ph (clamped to 0…1), R_fault = R_branch(1 − k)/(3k).
 * Readings above V_line are accepted: intermittent arcing grounds can over-volt an
 * ungrounded system.
 * @throws RangeError for non-positive lineVolts/branchOhms or negative/NaN readings
 */
export function locateGround(input: {
  lineVolts: number;
  A: number;
  B: number;
  C: number;
  branchOhms?: number;
}): GroundLocation {
  const vPh = requirePositive("lineVolts", input.lineVolts) / Math.sqrt(3);
  const rBranch = input.branchOhms === undefined ? null : requirePositive("branchOhms", input.branchOhms);
  const readings = PHASES.map((p) => ({ p, v: requireNumber(p, input[p], { min: 0 }) }));
  const sorted = [...readings].sort((x, y) => x.v - y.v);
  const tolerance = BALANCE_TOLERANCE * vPh;
  if (sorted[2].v - sorted[0].v <= tolerance) {
    return {
      phase: null,
      faultOhms: null,
      reason: "All three lamps read alike: no ground shown (a very high-resistance ground may not show).",
    };
  }
  if (sorted[1].v - sorted[0].v <= tolerance) {
    return {
      phase: null,
      faultOhms: null,
      reason:
        "Two lamps read equally low: not the single-ground pattern. Check for grounds on two phases, a failed lamp or a blown lamp fuse.",
    };
  }
  const phase = sorted[0].p;
  const k = Math.min(1, Math.max(0, 1 - sorted[0].v / vPh));
  const faultOhms = rBranch === null || k === 0 ? null : (rBranch * (1 - k)) / (3 * k);
  return { phase, faultOhms, reason: `Phase ${phase} lamp reads lowest: ground suspected on phase ${phase}.` };
}

export type LampState = "bright" | "dim" | "dark";
const LAMP_RANK: Record<LampState, number> = { dark: 0, dim: 1, bright: 2 };

/**
 * Suspected phase from how the lamps look, for crews without a voltmeter on the lamps.
 * Rules (from the model above; common practice): the one lamp darker than both others
 * marks the suspected phase; all alike, all dark, or two equally darkest → none.
 * @throws RangeError for an unknown lamp state
 */
export function suspectPhaseFromLamps(lamps: Record<Phase, LampState>): { phase: Phase | null; reason: string } {
  const states = PHASES.map((p) => ({ p, rank: LAMP_RANK[requireOneOf(p, lamps[p], ["bright", "dim", "dark"])] }));
  const sorted = [...states].sort((x, y) => x.rank - y.rank);
  if (sorted[2].rank === 0) {
    return {
      phase: null,
      reason: "All lamps dark: check the lamp supply, fuses and lamps first; this says nothing about grounds.",
    };
  }
  if (sorted[0].rank === sorted[2].rank) {
    return { phase: null, reason: "All lamps look alike: no ground shown (a high-resistance ground may not show)." };
  }
  if (sorted[0].rank === sorted[1].rank) {
    return {
      phase: null,
      reason: "Two lamps equally dark: not the single-ground pattern. Check lamps and fuses, or grounds on two phases.",
    };
  }
  const phase = sorted[0].p;
  const unequal = sorted[1].rank !== sorted[2].rank;
  const note = unequal ? " The other two differ, which system capacitance or a weak lamp can cause." : "";
  return { phase, reason: `Phase ${phase} lamp is darkest: ground suspected on phase ${phase}.${note}` };
}

/**
 * Fault resistance from the faulted lamp's voltage when the system's capacitance to ground
 * is known. Model: each phase to ground has admittance Y = G + jωC (lamp branch G = 1/R_branch
 * in parallel with the phase's capacitance C); the fault F = 1/R_fault is on one phase.
 * Millman: V_G = F·E_f/(3Y + F), so the faulted lamp reads V_f = V_ph·|3Y| / |3Y + F|.
 * Solving for a real F: (3G + F)² + (3ωC)² = (3|Y|·V_ph/V_f)²
 *   → F = √((3|Y|·V_ph/V_f)² − (3ωC)²) − 3G,  R_fault = 1/F.
 * With C = 0 this is the resistive formula of locateGround. Neglecting C on a system with
 * real capacitance overstates R_fault (about 49 % high with 2 kΩ lamp branches, a 2 kΩ
 * fault and 1 µF per phase at 60 Hz — tests/domain/ground-detection.test.ts).
 * @returns R_fault, Ω; 0 for a dead ground (V_f = 0); null when the reading shows no fault
 *   (V_f at or above what the capacitance alone gives)
 */
export function faultOhmsWithCapacitance(input: {
  lineVolts: number;
  faultedVolts: number;
  branchOhms: number;
  capacitanceMicroF: number;
  frequencyHz: number;
}): number | null {
  const vPh = requirePositive("lineVolts", input.lineVolts) / Math.sqrt(3);
  const vf = requireNumber("faultedVolts", input.faultedVolts, { min: 0 });
  const g = 1 / requirePositive("branchOhms", input.branchOhms);
  const wc =
    2 *
    Math.PI *
    requirePositive("frequencyHz", input.frequencyHz) *
    requireNumber("capacitanceMicroF", input.capacitanceMicroF, { min: 0 }) *
    1e-6;
  if (vf === 0) return 0;
  const yAbs = Math.hypot(g, wc);
  const inside = (3 * yAbs * (vPh / vf)) ** 2 - (3 * wc) ** 2;
  const f = Math.sqrt(Math.max(0, inside)) - 3 * g;
  return f <= 0 ? null : 1 / f;
}

/** The crew's capacitance figure is itself an estimate: the range uses it ± this share (Tideline's choice). */
export const CAPACITANCE_UNCERTAINTY = 0.25;

/**
 * Fault-resistance estimate as a range, from the faulted lamp's volts. With the phase
 * capacitance entered: central at C, low at C·(1 + 25 %), high at C·(1 − 25 %). Without
 * it: the resistive estimate is only an upper bound (capacitance always lowers it), so the
 * range is [null, resistive] and says so.
 */
export function faultEstimateRange(input: {
  lineVolts: number;
  faultedVolts: number;
  branchOhms: number;
  capacitanceMicroF?: number | null;
  frequencyHz: number;
}): { lowOhms: number | null; centralOhms: number | null; highOhms: number | null; capacitanceNeglected: boolean } {
  const base = {
    lineVolts: input.lineVolts,
    faultedVolts: input.faultedVolts,
    branchOhms: input.branchOhms,
    frequencyHz: input.frequencyHz,
  };
  const resistive = faultOhmsWithCapacitance({ ...base, capacitanceMicroF: 0 });
  if (input.capacitanceMicroF == null || input.capacitanceMicroF === 0) {
    return { lowOhms: null, centralOhms: null, highOhms: resistive, capacitanceNeglected: true };
  }
  const c = input.capacitanceMicroF;
  return {
    lowOhms: faultOhmsWithCapacitance({ ...base, capacitanceMicroF: c * (1 + CAPACITANCE_UNCERTAINTY) }),
    centralOhms: faultOhmsWithCapacitance({ ...base, capacitanceMicroF: c }),
    highOhms: faultOhmsWithCapacitance({ ...base, capacitanceMicroF: c * (1 - CAPACITANCE_UNCERTAINTY) }),
    capacitanceNeglected: false,
  };
}

export interface GroundHuntStep {
  /** The feeder or circuit opened (or closed again) at this step. */
  feeder: string;
  action: "opened" | "closed";
  lamps: Record<Phase, LampState>;
}

/**
 * Reads a ground hunt log: feeders opened one at a time while the lamps are watched.
 * Rule (common practice): the step at which the lamps go from showing a ground to all
 * alike (balanced, not dark) points at the feeder just opened. Returns that feeder, or
 * null while no opening has cleared the ground.
 */
export const GROUND_HUNT_SOURCE = {
  table: "Ground hunt by opening feeders one at a time (common practice)",
  text: "With the ground showing on the lamps, open one feeder at a time and watch them: the opening after which all three lamps look alike again points at that feeder or what it feeds. Confirm with an insulation test before closing it again.",
} as const;

export function groundHuntFinding(steps: readonly GroundHuntStep[]): { feeder: string | null; words: string } {
  let showing = true;
  for (const s of steps) {
    requireOneOf("action", s.action, ["opened", "closed"]);
    const balanced =
      suspectPhaseFromLamps(s.lamps).phase === null &&
      PHASES.some((p) => s.lamps[p] !== "dark") &&
      PHASES.every((p) => s.lamps[p] === s.lamps.A);
    if (showing && balanced && s.action === "opened") {
      return {
        feeder: s.feeder,
        words: `The lamps went back to alike when ${s.feeder} was opened: the ground is most likely on ${s.feeder} or what it feeds. Confirm with an insulation test before closing it again.`,
      };
    }
    showing = !balanced;
  }
  return {
    feeder: null,
    words: steps.length ? "No opening so far has cleared the ground indication." : "No steps logged yet.",
  };
}
