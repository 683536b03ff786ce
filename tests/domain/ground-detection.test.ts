import { describe, expect, it } from "vitest";
import {
  groundLampVoltages,
  locateGround,
  suspectPhaseFromLamps,
  type LampState,
  type Phase,
} from "../../src/domain/ground-detection";

// ---- Independent reference: a tiny complex-number Millman solver ---------------------
// Millman's theorem (J. Millman, Proc. IRE 1940; in any circuits text): the voltage of a
// node joined to sources E_i through admittances Y_i is V = Σ Y_i E_i / Σ Y_i. Here the
// node is ground, the sources are the three phase EMFs about the (floating) source
// neutral, and each lamp voltage is |E_i − V_ground|. Nothing below uses the closed form
// of the implementation (no k, no √(1 + k + k²)).
type C = { re: number; im: number };
const polar = (mag: number, deg: number): C => ({
  re: mag * Math.cos((deg * Math.PI) / 180),
  im: mag * Math.sin((deg * Math.PI) / 180),
});
const add = (a: C, b: C): C => ({ re: a.re + b.re, im: a.im + b.im });
const sub = (a: C, b: C): C => ({ re: a.re - b.re, im: a.im - b.im });
const scale = (a: C, s: number): C => ({ re: a.re * s, im: a.im * s });
const abs = (a: C) => Math.hypot(a.re, a.im);

function referenceLampVolts(lineVolts: number, branchOhms: number, faultPhase: Phase | null, faultOhms: number) {
  const vPh = lineVolts / Math.sqrt(3);
  const emf: Record<Phase, C> = { A: polar(vPh, 0), B: polar(vPh, -120), C: polar(vPh, 120) };
  const phases: Phase[] = ["A", "B", "C"];
  let vGround: C;
  if (faultPhase !== null && faultOhms === 0) {
    vGround = emf[faultPhase]; // a bolted fault ties ground to that phase
  } else {
    const y = (p: Phase) => 1 / branchOhms + (p === faultPhase ? 1 / faultOhms : 0);
    const num = phases.reduce<C>((s, p) => add(s, scale(emf[p], y(p))), { re: 0, im: 0 });
    const den = phases.reduce((s, p) => s + y(p), 0);
    vGround = scale(num, 1 / den);
  }
  return { A: abs(sub(emf.A, vGround)), B: abs(sub(emf.B, vGround)), C: abs(sub(emf.C, vGround)) };
}
// ---------------------------------------------------------------------------------------

const CASES: Array<[number, number, Phase, number]> = [
  // lineVolts, branchOhms (≈ a 25 W lamp string), fault phase, fault ohms
  [450, 2000, "A", 0],
  [450, 2000, "B", 100],
  [450, 2000, "C", 500],
  [450, 2000, "A", 1000],
  [480, 2300, "B", 2300],
  [480, 2300, "C", 5000],
  [450, 2000, "A", 10000],
  [440, 1500, "B", 250],
];

describe("groundLampVoltages", () => {
  it.each([
    // Bolted ground on 450 V: faulted lamp 0 V, the others see full line voltage (common practice).
    [
      { lineVolts: 450, faultPhase: "A", faultOhms: 0, branchOhms: 2000 },
      { A: 0, B: 450, C: 450 },
    ],
    [
      { lineVolts: 450, faultPhase: "C", faultOhms: 0, branchOhms: 2000 },
      { A: 450, B: 450, C: 0 },
    ],
    // No ground: each lamp at V_line/√3 = 259.8 V (arithmetic).
    [
      { lineVolts: 450, faultPhase: null, faultOhms: 0, branchOhms: 2000 },
      { A: 259.81, B: 259.81, C: 259.81 },
    ],
    [
      { lineVolts: 480, faultPhase: null, faultOhms: 0, branchOhms: 2000 },
      { A: 277.13, B: 277.13, C: 277.13 },
    ],
    // An open-circuit "fault" is no fault.
    [
      { lineVolts: 450, faultPhase: "B", faultOhms: Infinity, branchOhms: 2000 },
      { A: 259.81, B: 259.81, C: 259.81 },
    ],
  ] as const)("%o → %o", (input, expected) => {
    const v = groundLampVoltages(input);
    expect(v.A).toBeCloseTo(expected.A, 1);
    expect(v.B).toBeCloseTo(expected.B, 1);
    expect(v.C).toBeCloseTo(expected.C, 1);
  });

  it.each(CASES)(
    "matches a complex nodal (Millman) solution: %f V, %f Ω lamps, phase %s, %f Ω fault",
    (lineVolts, branchOhms, faultPhase, faultOhms) => {
      const got = groundLampVoltages({ lineVolts, branchOhms, faultPhase, faultOhms });
      const ref = referenceLampVolts(lineVolts, branchOhms, faultPhase, faultOhms);
      expect(got.A).toBeCloseTo(ref.A, 9);
      expect(got.B).toBeCloseTo(ref.B, 9);
      expect(got.C).toBeCloseTo(ref.C, 9);
    },
  );

  it("dims the faulted lamp and brightens the others as the fault hardens (property)", () => {
    let lastFaulted = Infinity;
    let lastHealthy = 0;
    for (const faultOhms of [1e6, 1e5, 1e4, 3000, 1000, 300, 100, 10, 0]) {
      const v = groundLampVoltages({ lineVolts: 450, faultPhase: "A", faultOhms, branchOhms: 2000 });
      expect(v.A).toBeLessThanOrEqual(lastFaulted);
      expect(v.B).toBeGreaterThanOrEqual(lastHealthy);
      expect(v.B).toBeCloseTo(v.C, 12);
      expect(v.B).toBeLessThanOrEqual(450 + 1e-9); // never above line voltage in this model
      lastFaulted = v.A;
      lastHealthy = v.B;
    }
  });

  it.each([
    [{ lineVolts: 0, faultPhase: null, faultOhms: 0, branchOhms: 2000 }],
    [{ lineVolts: 450, faultPhase: null, faultOhms: 0, branchOhms: 0 }],
    [{ lineVolts: 450, faultPhase: "A", faultOhms: -1, branchOhms: 2000 }],
    [{ lineVolts: 450, faultPhase: "A", faultOhms: NaN, branchOhms: 2000 }],
    [{ lineVolts: NaN, faultPhase: "A", faultOhms: 10, branchOhms: 2000 }],
    [{ lineVolts: 450, faultPhase: "D", faultOhms: 10, branchOhms: 2000 }],
  ])("rejects %o", (input) => {
    expect(() => groundLampVoltages(input as never)).toThrow(RangeError);
  });
});

describe("locateGround", () => {
  it.each(CASES)(
    "round-trips %f V, %f Ω lamps, phase %s, %f Ω fault",
    (lineVolts, branchOhms, faultPhase, faultOhms) => {
      const v = groundLampVoltages({ lineVolts, branchOhms, faultPhase, faultOhms });
      const found = locateGround({ lineVolts, ...v, branchOhms });
      expect(found.phase).toBe(faultPhase);
      expect(found.faultOhms).toBeCloseTo(faultOhms, 6);
    },
  );

  it.each([
    [{ lineVolts: 450, A: 259.8, B: 259.8, C: 259.8 }, null, "alike"], // balanced (arithmetic)
    [{ lineVolts: 450, A: 255, B: 262, C: 264 }, null, "alike"], // spread 9 V < 5 % of 259.8 V
    [{ lineVolts: 450, A: 0, B: 450, C: 450 }, "A", "phase A"], // bolted ground (common practice)
    [{ lineVolts: 450, A: 455, B: 10, C: 452 }, "B", "phase B"], // slightly over V_line is accepted
    [{ lineVolts: 450, A: 100, B: 102, C: 400 }, null, "Two lamps"], // not one ground
    [{ lineVolts: 480, A: 300, B: 300, C: 150 }, "C", "phase C"],
  ] as const)("%o → %s", (input, phase, reasonPart) => {
    const found = locateGround(input);
    expect(found.phase).toBe(phase);
    expect(found.reason).toContain(reasonPart);
    expect(found.faultOhms).toBeNull(); // no branchOhms given
  });

  it("cannot see a ground too weak to move the lamps past the tolerance (documented limit)", () => {
    // k = 2000 / (2000 + 3·20000) ≈ 0.032: spread ≈ 4.8 % of V_ph, inside the 5 % band.
    const v = groundLampVoltages({ lineVolts: 450, faultPhase: "A", faultOhms: 20000, branchOhms: 2000 });
    expect(locateGround({ lineVolts: 450, ...v, branchOhms: 2000 }).phase).toBeNull();
  });

  it("estimates 0 Ω for a dark lamp and leaves ohms unknown without the branch resistance", () => {
    expect(locateGround({ lineVolts: 450, A: 0, B: 450, C: 450, branchOhms: 2000 }).faultOhms).toBe(0);
    expect(locateGround({ lineVolts: 450, A: 0, B: 450, C: 450 }).faultOhms).toBeNull();
  });

  it.each([
    [{ lineVolts: 450, A: -1, B: 260, C: 260 }],
    [{ lineVolts: 450, A: NaN, B: 260, C: 260 }],
    [{ lineVolts: 0, A: 1, B: 260, C: 260 }],
    [{ lineVolts: 450, A: 1, B: 260, C: 260, branchOhms: 0 }],
  ])("rejects %o", (input) => {
    expect(() => locateGround(input)).toThrow(RangeError);
  });
});

describe("suspectPhaseFromLamps", () => {
  it.each([
    // Pattern from the model above and common practice: the grounded phase's lamp goes dark.
    [{ A: "dark", B: "bright", C: "bright" }, "A", "darkest"],
    [{ A: "bright", B: "dim", C: "bright" }, "B", "darkest"],
    [{ A: "bright", B: "bright", C: "dark" }, "C", "darkest"],
    [{ A: "dark", B: "dim", C: "bright" }, "A", "differ"], // healthy pair unequal: noted
    [{ A: "dim", B: "dim", C: "dim" }, null, "alike"],
    [{ A: "bright", B: "bright", C: "bright" }, null, "alike"],
    [{ A: "dark", B: "dark", C: "dark" }, null, "fuses"],
    [{ A: "dark", B: "dark", C: "bright" }, null, "Two lamps"],
  ] as const)("%o → %s", (lamps, phase, reasonPart) => {
    const result = suspectPhaseFromLamps(lamps);
    expect(result.phase).toBe(phase);
    expect(result.reason).toContain(reasonPart);
    expect(result.reason).not.toMatch(/safe/i);
  });

  it("rejects an unknown lamp state", () => {
    expect(() => suspectPhaseFromLamps({ A: "flickering" as LampState, B: "dim", C: "dim" })).toThrow(RangeError);
  });
});
