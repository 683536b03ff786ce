import { describe, expect, it } from "vitest";
import {
  PARTS_AVAILABILITY,
  PRIORITY_FORMULA_TEXT,
  compareByPriority,
  effortPoints,
  priorityScore,
  rankDefects,
  type PriorityInput,
  type Rankable,
} from "../../src/domain/priority";
import { DEFECT_SEVERITIES } from "../../src/domain/vocab";

// The formula is Tideline's own (no external source); rows check it against the arithmetic
// written out in priority.ts, and the properties below are what the formula promises.
const base: PriorityInput = {
  severity: "impaired",
  safetyCritical: false,
  blocksEnergisation: false,
  originalFabric: false,
  effortHours: 0,
  partsAvailable: "wanted",
};

describe("priorityScore", () => {
  it.each([
    [{}, 45], // impaired 45, effort 0 h → 0, wanted 0
    [{ severity: "cosmetic" }, 10],
    [{ severity: "disabling", safetyCritical: true, blocksEnergisation: true }, 135], // 70 + 40 + 25
    [{ originalFabric: true, partsAvailable: "in_hand" }, 65], // 45 + 10 + 10
    [{ effortHours: 1 }, 37], // 45 − round(8·log2 2) = 45 − 8
    [{ effortHours: 3 }, 29], // 45 − 16
    [{ effortHours: 7 }, 21], // 45 − 24
    [{ effortHours: 100 }, 15], // penalty capped at 30
    [{ effortHours: null }, 20], // blank effort = 8 h: round(8·log2 9) = round(25.36) = 25
    [{ partsAvailable: "unobtainable" }, 35],
    [{ partsAvailable: "none_needed" }, 55],
  ] as Array<[Partial<PriorityInput>, number]>)("%o → %i", (over, score) => {
    expect(priorityScore({ ...base, ...over }).score).toBe(score);
  });

  const combos: PriorityInput[] = [];
  for (const severity of DEFECT_SEVERITIES)
    for (const blocksEnergisation of [false, true])
      for (const originalFabric of [false, true])
        for (const effortHours of [0, 0.5, 2, 8, 40, 400, null])
          for (const partsAvailable of PARTS_AVAILABILITY)
            combos.push({
              severity,
              safetyCritical: false,
              blocksEnergisation,
              originalFabric,
              effortHours,
              partsAvailable,
            });

  it(`a safety-critical defect never ranks below an otherwise equal one (${combos.length} combinations)`, () => {
    for (const c of combos) {
      const plain: Rankable = { id: "a", createdAt: "2026-03-01T10:00:00Z", score: priorityScore(c).score };
      const safety: Rankable = { ...plain, id: "b", score: priorityScore({ ...c, safetyCritical: true }).score };
      expect(rankDefects([plain, safety])[0].id).toBe("b");
    }
  });

  it("terms always sum to the score and are whole numbers", () => {
    for (const c of combos) {
      const { score, terms } = priorityScore(c);
      expect(terms.map((t) => t.key)).toEqual(["severity", "safety", "blocking", "heritage", "effort", "parts"]);
      expect(terms.reduce((s, t) => s + t.points, 0)).toBe(score);
      for (const t of terms) expect(Number.isInteger(t.points)).toBe(true);
    }
  });

  it("more effort never raises the score", () => {
    let last = Infinity;
    for (let h = 0; h <= 200; h += 0.25) {
      const s = priorityScore({ ...base, effortHours: h }).score;
      expect(s).toBeLessThanOrEqual(last);
      last = s;
    }
    expect(effortPoints(0)).toBe(0);
  });

  it("higher severity never lowers the score", () => {
    const scores = DEFECT_SEVERITIES.map((severity) => priorityScore({ ...base, severity }).score);
    expect([...scores].sort((a, b) => a - b)).toEqual(scores);
  });

  it.each([
    [{ effortHours: -1 }],
    [{ effortHours: NaN }],
    [{ severity: "catastrophic" }],
    [{ partsAvailable: "maybe" }],
  ])("rejects %o", (over) => {
    expect(() => priorityScore({ ...base, ...(over as Partial<PriorityInput>) })).toThrow(RangeError);
  });
});

describe("compareByPriority and rankDefects", () => {
  const d = (id: string, score: number, createdAt = "2026-03-01T10:00:00Z", pin: Rankable["pin"] = null): Rankable => ({
    id,
    score,
    createdAt,
    pin,
  });

  it.each([
    [
      [d("x", 10), d("y", 30), d("z", 20)],
      ["y", "z", "x"],
    ], // score descending
    [
      [d("new", 20, "2026-03-02T00:00:00Z"), d("old", 20, "2026-03-01T00:00:00Z")],
      ["old", "new"],
    ], // older first
    [
      [d("b", 20), d("a", 20), d("c", 20)],
      ["a", "b", "c"],
    ], // then id
    [
      [d("late", 20, "2026-03-01T12:00:00+02:00"), d("early", 20, "2026-03-01T11:00:00Z")],
      ["late", "early"],
    ], // 10:00Z vs 11:00Z
    [
      [d("x", 10, undefined, { direction: "above", relativeTo: "y" }), d("y", 30), d("z", 20)],
      ["x", "y", "z"],
    ], // pin above
    [
      [d("y", 30, undefined, { direction: "below", relativeTo: "x" }), d("x", 10), d("z", 20)],
      ["z", "x", "y"],
    ], // pin below
    [
      [d("x", 10, undefined, { direction: "above", relativeTo: "gone" }), d("y", 30)],
      ["y", "x"],
    ], // missing target ignored
    [
      [d("x", 10, undefined, { direction: "above", relativeTo: "x" }), d("y", 30)],
      ["y", "x"],
    ], // self-pin ignored
    [
      [{ ...d("done", 90), settled: true, safetyCritical: true }, d("todo", 10), { ...d("later", 5), settled: false }],
      ["todo", "later", "done"],
    ], // open work before settled, whatever the points or the hazard
    [
      [{ ...d("s1", 20), settled: true }, { ...d("s2", 40), settled: true }, d("o", 1)],
      ["o", "s2", "s1"],
    ], // settled ones keep the usual order among themselves
    [
      [{ ...d("done", 90, undefined, { direction: "above", relativeTo: "o" }), settled: true }, d("o", 1), d("p", 5)],
      ["p", "done", "o"],
    ], // a pin still places a settled defect next to its target
  ])("orders %j as %j", (items, ids) => {
    expect(rankDefects(items).map((i) => i.id)).toEqual(ids);
  });

  it("is stable: no input order changes the result (all 120 orders of five defects)", () => {
    const items = [d("c", 20), d("a", 20), d("b", 20, "2026-02-01T00:00:00Z"), d("e", 50), d("d", 5)];
    const permutations = (xs: Rankable[]): Rankable[][] =>
      xs.length <= 1
        ? [xs]
        : xs.flatMap((x, i) => permutations([...xs.slice(0, i), ...xs.slice(i + 1)]).map((rest) => [x, ...rest]));
    const all = permutations(items);
    expect(all).toHaveLength(120);
    for (const order of all) {
      expect(rankDefects(order).map((x) => x.id)).toEqual(["e", "b", "a", "c", "d"]);
      expect([...order].sort(compareByPriority).map((x) => x.id)).toEqual(["e", "b", "a", "c", "d"]);
    }
  });

  it("does not change its input", () => {
    const items = [d("x", 1), d("y", 2)];
    rankDefects(items);
    expect(items.map((i) => i.id)).toEqual(["x", "y"]);
  });

  it.each([[[d("a", 1), d("a", 2)]], [[d("a", 1, "yesterday"), d("b", 1)]]])("rejects %j", (items) => {
    expect(() => rankDefects(items)).toThrow(RangeError);
  });
});

describe("PRIORITY_FORMULA_TEXT", () => {
  it("states every constant the formula uses and never promises safety", () => {
    for (const fragment of [
      "cosmetic 10",
      "disabling 70",
      "+40",
      "+25",
      "+10",
      "unobtainable -10",
      "log₂(1 + hours)",
      "at most 30",
      "8 hours",
      "closed, deferred or accepted as is",
    ]) {
      expect(PRIORITY_FORMULA_TEXT).toContain(fragment);
    }
    expect(PRIORITY_FORMULA_TEXT).toMatch(/does not make anything safe/);
  });
});
