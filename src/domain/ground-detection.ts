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
    return { phase: null, faultOhms: null, reason: "All three lamps read alike: no ground shown (a very high-resistance ground may not show)." };
  }
  if (sorted[1].v - sorted[0].v <= tolerance) {
    return { phase: null, faultOhms: null, reason: "Two lamps read equally low: not the single-ground pattern. Check for grounds on two phases, a failed lamp or a blown lamp fuse." };
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
    return { phase: null, reason: "All lamps dark: check the lamp supply, fuses and lamps first; this says nothing about grounds." };
  }
  if (sorted[0].rank === sorted[2].rank) {
    return { phase: null, reason: "All lamps look alike: no ground shown (a high-resistance ground may not show)." };
  }
  if (sorted[0].rank === sorted[1].rank) {
    return { phase: null, reason: "Two lamps equally dark: not the single-ground pattern. Check lamps and fuses, or grounds on two phases." };
  }
  const phase = sorted[0].p;
  const unequal = sorted[1].rank !== sorted[2].rank;
  const note = unequal ? " The other two differ, which system capacitance or a weak lamp can cause." : "";
  return { phase, reason: `Phase ${phase} lamp is darkest: ground suspected on phase ${phase}.${note}` };
}
