import { describe, expect, it } from "vitest";
import {
  FLOOD_GUIDANCE_SOURCE,
  SUBMERGED_RULES,
  recommendDisposition,
  type FloodInput,
} from "../../src/domain/flood-guidance";
import { COMPONENT_KINDS, type ComponentKind, type Disposition } from "../../src/domain/vocab";

// All rows: from memory of NEMA GD 1 "Evaluating Water-Damaged Electrical Equipment" and
// NFPA 70B (equipment exposed to water). The per-kind submerged results were checked against
// two published summaries of the NEMA lists:
//   [ESFI] Safety+Health magazine, "Water-damaged equipment: replace or recondition?" (ESFI list)
//   [SqD]  myenum.com, Square D/Schneider flood best practices (replace / recondition lists)
const base: FloodInput = { kind: "busbar", waterType: "fresh", belowWaterLine: true, contaminants: [] };
const at = (over: Partial<FloodInput>): FloodInput => ({ ...base, ...over });

/** Every kind's submerged result, each beside its source. */
const SUBMERGED: Array<[ComponentKind, Disposition]> = [
  ["molded_case_breaker", "replace"], // [ESFI] [SqD]: molded-case breakers replaced
  ["fuse", "replace"], // [ESFI] [SqD]: fuses replaced
  ["meter", "replace"], // [SqD]: multi-metering equipment replaced
  ["relay", "replace"], // [SqD]: electromechanical relays replaced
  ["ground_lamp", "replace"], // [ESFI]: lighting replaced
  ["transformer", "replace"], // [ESFI] [SqD]: dry-type transformers replaced
  ["terminal_strip", "replace"], // Tideline reading: wiring devices [ESFI] replaced
  ["power_breaker", "rebuild"], // [ESFI] [SqD]: low-voltage power breakers reconditioned
  ["busbar", "rebuild"], // [SqD]: switchboard enclosures and certain bus structures reconditioned
  ["bus_tie", "rebuild"], // [SqD]: bus structure / power breakers reconditioned
  ["switch", "rebuild"], // [SqD]: bolted-pressure switches reconditioned (safety switches are replaced)
  ["other", "replace"], // NEMA GD 1 (memory): "in many cases, replacement will be necessary"
  ["enclosed_switch", "replace"], // [SqD]: safety switches are replaced; NEMA GD 1 (memory)
  ["electronic_trip_unit", "replace"], // NEMA GD 1 (memory): trip units, sensors and accessories replaced
];

describe("recommendDisposition — submerged, fresh water, no other damage", () => {
  it.each(SUBMERGED)("%s → %s", (kind, disposition) => {
    const r = recommendDisposition(at({ kind }));
    expect(r.disposition).toBe(disposition);
    expect(r.reasons[0]).toBe(SUBMERGED_RULES[kind].reason);
  });

  // The compiler already makes SUBMERGED_RULES name every kind; this fails when a kind is added
  // without a sourced expectation in the table above.
  it("checks every component kind against a source", () => {
    expect(SUBMERGED.map(([k]) => k).sort()).toEqual([...COMPONENT_KINDS].sort());
  });
});

describe("recommendDisposition — scenarios", () => {
  it.each([
    // [label, input, disposition, a reason must contain]
    ["dry above the line, clean", { belowWaterLine: false }, "clean", "no sign of water contact"], // NEMA GD 1 (memory)
    // Silt is evidence of water contact, which overrides the recorded line (common practice).
    [
      "above the line with silt only",
      { belowWaterLine: false, contaminants: ["silt"] },
      "rebuild",
      "overrides the recorded water line",
    ],
    ["above the line, mould", { belowWaterLine: false, contaminants: ["mould"] }, "clean", "respiratory"], // common practice
    ["above the line, salt water", { belowWaterLine: false, waterType: "salt" }, "rebuild", "corrosive and conductive"], // NEMA GD 1: salt residue corrosive and conductive
    ["above the line, sewage", { belowWaterLine: false, waterType: "sewage" }, "rebuild", "salt or sewage"],
    ["above the line, brackish", { belowWaterLine: false, waterType: "brackish" }, "rebuild", "salt or sewage"],
    [
      "above the line, salt crust",
      { belowWaterLine: false, contaminants: ["salt_crust"] },
      "rebuild",
      "salt or sewage",
    ],
    [
      "above the line but water inside an MCCB",
      { kind: "molded_case_breaker", belowWaterLine: false, contaminants: ["water_inside"] },
      "replace",
      "treated as if",
    ],
    ["submerged busbar in salt water", { waterType: "salt" }, "rebuild", "strip-down"],
    ["submerged power breaker, sewage", { kind: "power_breaker", waterType: "sewage" }, "rebuild", "strip-down"],
    ["charred busbar insulation", { insulation: "charred" }, "replace", "Charred"], // NEMA GD 1 (memory)
    ["swollen insulation", { insulation: "swollen" }, "replace", "Swollen"], // common practice
    ["tracking above the line", { belowWaterLine: false, insulation: "tracking" }, "rebuild", "Tracking"],
    ["seized power breaker", { kind: "power_breaker", mechanism: "seized" }, "replace", "seized"],
    ["stiff switch above the line", { kind: "switch", belowWaterLine: false, mechanism: "stiff" }, "rebuild", "stiff"],
    ["free mechanism changes nothing", { kind: "power_breaker", mechanism: "free" }, "rebuild", "Power (open-frame)"],
    ["rust 12 % above the line", { belowWaterLine: false, percentRusted: 12 }, "rebuild", "ASTM D610 grade 3"], // ASTM D610-08 Table 1: 12 % → grade 3
    ["rust 10 % above the line", { belowWaterLine: false, percentRusted: 10 }, "clean", "Above the water line"], // grade 4
    [
      "original MCCB submerged → source",
      { kind: "molded_case_breaker", heritage: "original" },
      "source",
      "Original fabric",
    ],
    [
      "original meter, charred → source",
      { kind: "meter", heritage: "original", insulation: "charred" },
      "source",
      "no longer made",
    ],
    [
      "original power breaker → rebuild, kept",
      { kind: "power_breaker", heritage: "original" },
      "rebuild",
      "keep it and rebuild",
    ],
    ["period MCCB stays replace", { kind: "molded_case_breaker", heritage: "period" }, "replace", "sealed"],
    ["modern fuse stays replace", { kind: "fuse", heritage: "modern" }, "replace", "fuse"],
    ["original, clean above the line", { belowWaterLine: false, heritage: "original" }, "clean", "clean and inspect"],
    ["hours submerged recorded only", { hoursSubmerged: 72 }, "rebuild", "Bus structure"],
    [
      "zero hours above the line is consistent",
      { belowWaterLine: false, hoursSubmerged: 0 },
      "clean",
      "Above the water line",
    ],
  ] as Array<[string, Partial<FloodInput>, Disposition, string]>)(
    "%s → %s",
    (_label, over, disposition, reasonPart) => {
      const r = recommendDisposition(at(over));
      expect(r.disposition).toBe(disposition);
      expect(r.reasons.some((s) => s.includes(reasonPart))).toBe(true);
    },
  );
});

describe("recommendDisposition — properties", () => {
  const kinds = COMPONENT_KINDS;
  const rank: Record<Disposition, number> = { clean: 0, rebuild: 1, replace: 2, source: 2 };

  it("salt or sewage never gives a milder result than fresh water (all kinds, both sides of the line)", () => {
    for (const kind of kinds)
      for (const belowWaterLine of [true, false])
        for (const waterType of ["salt", "sewage"] as const) {
          const fresh = recommendDisposition(at({ kind, belowWaterLine })).disposition;
          const dirty = recommendDisposition(at({ kind, belowWaterLine, waterType })).disposition;
          expect(rank[dirty]).toBeGreaterThanOrEqual(rank[fresh]);
        }
  });

  it("being below the line never gives a milder result than above it", () => {
    for (const kind of kinds) {
      const above = recommendDisposition(at({ kind, belowWaterLine: false })).disposition;
      const below = recommendDisposition(at({ kind })).disposition;
      expect(rank[below]).toBeGreaterThanOrEqual(rank[above]);
    }
  });

  it("only original fabric is ever sent to source, and every result names its source and a caution", () => {
    for (const kind of kinds)
      for (const heritage of ["original", "period", "modern", undefined] as const) {
        const r = recommendDisposition(at({ kind, heritage, insulation: "charred" }));
        expect(r.disposition).toBe(heritage === "original" ? "source" : "replace");
        expect(r.source).toBe(FLOOD_GUIDANCE_SOURCE);
        expect(r.reasons.at(-1)).toMatch(/qualified person/);
        for (const s of r.reasons) expect(s).not.toMatch(/\bsafe\b/i);
      }
  });
});

describe("recommendDisposition — errors", () => {
  it.each([
    [{ kind: "toaster" }],
    [{ waterType: "lava" }],
    [{ contaminants: ["glitter"] }],
    [{ insulation: "fine" }],
    [{ mechanism: "wobbly" }],
    [{ heritage: "antique" }],
    [{ hoursSubmerged: -1 }],
    [{ hoursSubmerged: 5, belowWaterLine: false }], // submerged yet above the line: contradictory
    [{ percentRusted: 120 }],
    [{ belowWaterLine: "yes" }],
  ])("rejects %o with RangeError", (over) => {
    expect(() => recommendDisposition(at(over as Partial<FloodInput>))).toThrow(RangeError);
  });
});
