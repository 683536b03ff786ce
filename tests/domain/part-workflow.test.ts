import { describe, expect, it } from "vitest";
import {
  budgetByBoard,
  canMovePart,
  defaultFittedHeritage,
  lineRef,
  parseLineRef,
  needKey,
  needMatchesLine,
  partTitle,
} from "../../src/domain/part-workflow";
import type { PartSpec } from "../../src/domain/parts";
import type { PartStatus } from "../../src/domain/vocab";

// Workflow and matching are Tideline's own rules, no external standard.
// Money split: proportional allocation, common practice; arithmetic checked by hand.

describe("canMovePart", () => {
  it.each([
    ["wanted", "lead_found", true],
    ["wanted", "acquired", true], // bought on sight without a recorded lead
    ["wanted", "received", false], // must be acquired first (cost and date)
    ["wanted", "fitted", false],
    ["lead_found", "wanted", true], // the lead came to nothing
    ["acquired", "received", true],
    ["received", "fitted", true],
    ["received", "acquired", true], // failed inspection on arrival, back to the seller
    ["fitted", "cancelled", false], // fitted is final: it is history
    ["fitted", "wanted", false],
    ["cancelled", "wanted", true], // reopen
    ["cancelled", "fitted", false],
    ["acquired", "cancelled", true],
  ] as Array<[PartStatus, PartStatus, boolean]>)("%s → %s: %s", (from, to, ok) => {
    expect(canMovePart(from, to)).toBe(ok);
  });

  it("throws RangeError for an unknown status", () => {
    expect(() => canMovePart("lost" as PartStatus, "wanted")).toThrow(RangeError);
  });
});

const mcb: PartSpec = {
  kind: "molded_case_breaker",
  ratingAmps: 100,
  poles: 3,
  voltageRating: 600,
  frame: "F",
  mounting: "Bolt-on",
  maker: "Acme",
  model: "Q3",
};

describe("needKey and needMatchesLine", () => {
  it.each([
    ["blank need keys like the spec alone", { need: "" }, { need: null }, true],
    ["same sub-part in other case and spacing", { need: "Arc  Chute" }, { need: "arc chute" }, true],
    ["whole component vs a sub-part", { need: "" }, { need: "arc chute" }, false],
    ["different sub-parts", { need: "arc chute" }, { need: "handle" }, false],
  ])("%s", (_label, a, b, same) => {
    expect(needKey(mcb, a.need) === needKey(mcb, b.need)).toBe(same);
  });

  it.each([
    ["a line with no must-match list takes only an identical spec", undefined, { maker: "Other" }, false],
    [
      "a line matching on rating and poles takes another maker",
      ["ratingAmps", "poles"],
      { maker: "Other", model: "Z" },
      true,
    ],
    ["a line matching on rating and poles refuses other poles", ["ratingAmps", "poles"], { poles: 2 }, false],
    ["kind always matters", ["ratingAmps"], { kind: "fuse" }, false],
  ] as Array<[string, string[] | undefined, Partial<PartSpec>, boolean]>)("%s", (_label, mustMatch, over, joins) => {
    expect(needMatchesLine({ spec: { ...mcb, ...over } }, { spec: { ...mcb, mustMatch } })).toBe(joins);
  });
});

describe("budgetByBoard", () => {
  it("multiplies unit cost by quantity per board and shares spend by quantity", () => {
    // 3 on board A, 1 on B at 40 each: A 120, B 40; 100 spent splits 75 / 25.
    const { rows, total } = budgetByBoard([{ qtyByBoard: { A: 3, B: 1 }, estimatedUnitCost: 40, spent: 100 }]);
    expect(rows).toEqual([
      { boardId: "A", estimated: 120, spent: 75, unestimatedLines: 0 },
      { boardId: "B", estimated: 40, spent: 25, unestimatedLines: 0 },
    ]);
    expect(total).toEqual({ estimated: 160, spent: 100 });
  });

  it("counts lines without an estimate and puts spend with no quantity left on no board", () => {
    const { rows, total } = budgetByBoard([
      { qtyByBoard: { A: 1 }, estimatedUnitCost: null, spent: 0 },
      { qtyByBoard: {}, estimatedUnitCost: 10, spent: 12.5 },
    ]);
    expect(rows).toEqual([
      { boardId: "A", estimated: 0, spent: 0, unestimatedLines: 1 },
      { boardId: "", estimated: 0, spent: 12.5, unestimatedLines: 0 },
    ]);
    expect(total).toEqual({ estimated: 0, spent: 12.5 });
  });

  it("rounds to cents: 10 spent over 3 boards of 1 each → 3.33 each", () => {
    const { rows } = budgetByBoard([{ qtyByBoard: { A: 1, B: 1, C: 1 }, estimatedUnitCost: 0, spent: 10 }]);
    expect(rows.map((r) => r.spent)).toEqual([3.33, 3.33, 3.33]);
  });

  it.each([
    [{ qtyByBoard: { A: -1 }, estimatedUnitCost: 1, spent: 0 }],
    [{ qtyByBoard: { A: 1 }, estimatedUnitCost: -1, spent: 0 }],
    [{ qtyByBoard: { A: 1 }, estimatedUnitCost: 1, spent: -5 }],
  ])("throws RangeError for impossible input %j", (line) => {
    expect(() => budgetByBoard([line])).toThrow(RangeError);
  });
});

describe("partTitle", () => {
  it.each([
    [mcb, "", "Molded-case breaker · 100 A · 3-pole · 600 V · frame F · Bolt-on · Acme Q3"],
    [{ kind: "ground_lamp", voltageRating: 250 } as PartSpec, "lens", "Ground-detection lamp · 250 V — lens"],
    [{ kind: "other" } as PartSpec, null, "Other"],
    // A frame typed as "50 A frame" is not doubled ("frame 50 A frame").
    [{ kind: "molded_case_breaker", frame: "50 A frame" } as PartSpec, null, "Molded-case breaker · 50 A frame"],
  ])("%j %j → %s", (spec, need, title) => {
    expect(partTitle(spec, need)).toBe(title);
  });
});

describe("defaultFittedHeritage", () => {
  // Source: common practice of heritage conservation — original fabric is the material that was there;
  // a whole replacement component is period or modern, a sub-part fitted into it leaves it original.
  it.each([
    [{ need: "", heritageRule: "original_only" }, "period"],
    [{ need: "", heritageRule: "period_ok" }, "period"],
    [{ need: "", heritageRule: "modern_ok" }, "modern"],
    [{ need: "  ", heritageRule: "modern_ok" }, "modern"],
    [{ need: "arc chute", heritageRule: "modern_ok" }, "unchanged"],
    [{ need: "Arc chute", heritageRule: "original_only" }, "unchanged"],
  ] as const)("%o → %s", (line, expected) => {
    expect(defaultFittedHeritage(line)).toBe(expected);
  });
  it("an unknown heritage rule is a RangeError", () => {
    expect(() => defaultFittedHeritage({ need: "", heritageRule: "any" as never })).toThrow(RangeError);
  });
});

describe("lineRef and parseLineRef", () => {
  // Tideline's own short numbers for wanted-list lines (W-12), per site.
  it.each([
    [1, "W-1"],
    [12, "W-12"],
    [1040, "W-1040"],
  ])("%i → %s", (n, ref) => {
    expect(lineRef(n)).toBe(ref);
    expect(parseLineRef(ref)).toBe(n);
  });
  it.each([
    ["w12", 12],
    ["W 12", 12],
    [" #12 ", 12],
    ["12", 12],
    ["W-012", 12],
    ["W-", null],
    ["W-0", null],
    ["WX-12", null],
    ["arc chute", null],
    ["99999999999", null],
  ])("typed %s → %s", (typed, n) => {
    expect(parseLineRef(typed)).toBe(n);
  });
  it("a number that is not a whole number from 1 is a RangeError", () => {
    expect(() => lineRef(0)).toThrow(RangeError);
    expect(() => lineRef(1.5)).toThrow(RangeError);
    expect(() => parseLineRef(undefined as unknown as string)).toThrow(RangeError);
  });
});
