import { describe, expect, it } from "vitest";
import { aggregateDemand, normaliseText, partSpecKey, sameSpec, type PartSpec } from "../../src/domain/parts";

// Merging rules are Tideline's own (no external standard). The text rule follows
// Unicode NFKC (Unicode Standard Annex #15) and ECMAScript String.prototype.toLowerCase.
const breaker: PartSpec = {
  kind: "power_breaker",
  ratingAmps: 225,
  poles: 3,
  voltageRating: 600,
  frame: "K-225",
  mounting: "Drawout",
  maker: "Northbay Electric",
  model: "NB 3",
};

describe("normaliseText", () => {
  it.each([
    ["  Northbay   Electric ", "northbay electric"], // trim + collapse + lowercase
    ["NORTHBAY\tELECTRIC", "northbay electric"], // tabs are whitespace
    ["Northbay\u00a0Electric", "northbay electric"], // no-break space (NFKC → space)
    ["ＫＡ-２２５", "ka-225"], // full-width forms fold under NFKC (UAX #15)
    ["K-225", "k-225"], // hyphen kept
    ["K 225", "k 225"],
    [null, ""],
    [undefined, ""],
  ])("%j → %j", (input, expected) => {
    expect(normaliseText(input)).toBe(expected);
  });
});

describe("sameSpec", () => {
  it.each([
    ["identical", {}, true],
    ["maker in other case and spacing", { maker: "  NORTHBAY  electric" }, true],
    ["model in other case", { model: "nb 3" }, true],
    ["frame 'K 225' vs 'K-225' (documented: punctuation matters)", { frame: "K 225" }, false],
    ["different rating", { ratingAmps: 400 }, false],
    ["different poles", { poles: 2 }, false],
    ["different voltage", { voltageRating: 250 }, false],
    ["different mounting", { mounting: "Fixed" }, false],
    ["blank maker vs named maker", { maker: null }, false],
    ["different kind", { kind: "molded_case_breaker" }, false],
  ] as Array<[string, Partial<PartSpec>, boolean]>)("%s → %s", (_label, over, same) => {
    expect(sameSpec(breaker, { ...breaker, ...over })).toBe(same);
  });

  it.each([
    // Only the must-match fields are compared when a list is given.
    [["ratingAmps", "poles"], { maker: "Other Co", frame: "X" }, true],
    [["ratingAmps", "poles"], { poles: 2 }, false],
    [["maker"], { maker: "northbay ELECTRIC", ratingAmps: 100 }, true],
  ] as Array<[string[], Partial<PartSpec>, boolean]>)("mustMatch %j with %o → %s", (mustMatch, over, same) => {
    expect(sameSpec({ ...breaker, mustMatch }, { ...breaker, ...over, mustMatch })).toBe(same);
  });

  it("needs with different must-match lists never merge", () => {
    expect(
      sameSpec({ ...breaker, mustMatch: ["ratingAmps"] }, { ...breaker, mustMatch: ["ratingAmps", "poles"] }),
    ).toBe(false);
    expect(
      sameSpec({ ...breaker, mustMatch: ["poles", "ratingAmps"] }, { ...breaker, mustMatch: ["ratingAmps", "poles"] }),
    ).toBe(true);
  });

  it("is symmetric and the key is stable (property)", () => {
    const variants: PartSpec[] = [
      breaker,
      { ...breaker, maker: "NORTHBAY electric" },
      { ...breaker, poles: 2 },
      { ...breaker, frame: null },
    ];
    for (const a of variants) for (const b of variants) expect(sameSpec(a, b)).toBe(sameSpec(b, a));
    expect(partSpecKey(breaker)).toBe(partSpecKey({ ...breaker }));
  });

  it("keeps a delimiter inside text from faking another field", () => {
    const a: PartSpec = { kind: "other", maker: "a|model=b" };
    const b: PartSpec = { kind: "other", maker: "a", model: "b" };
    expect(sameSpec(a, b)).toBe(false);
  });

  it.each([
    [{ kind: "toaster" }],
    [{ ratingAmps: 0 }],
    [{ ratingAmps: -5 }],
    [{ ratingAmps: NaN }],
    [{ poles: 2.5 }],
    [{ poles: 0 }],
    [{ voltageRating: -480 }],
    [{ mustMatch: ["colour"] }],
  ])("rejects %o", (over) => {
    expect(() => partSpecKey({ ...breaker, ...(over as Partial<PartSpec>) })).toThrow(RangeError);
  });
});

describe("aggregateDemand", () => {
  it("merges the same spec, adds quantities and collects positions once each", () => {
    const lines = aggregateDemand([
      { spec: breaker, positionId: "P1", qty: 1 },
      { spec: { ...breaker, maker: "NORTHBAY ELECTRIC" }, positionId: "P4", qty: 2 },
      { spec: { ...breaker, poles: 2 }, positionId: "P2", qty: 1 },
      { spec: breaker, positionId: "P1", qty: 1 },
      { spec: breaker, qty: 3 }, // spares, no position
    ]);
    expect(lines.map((l) => [l.qty, l.positionIds])).toEqual([
      [7, ["P1", "P4"]],
      [1, ["P2"]],
    ]);
    expect(lines[0].spec).toBe(breaker); // first-seen wording is kept
    expect(lines[0].key).toBe(partSpecKey(breaker));
  });

  it("total quantity is preserved (property)", () => {
    const items = [1, 2, 3, 4, 5, 6].map((n) => ({ spec: { ...breaker, poles: (n % 3) + 1 }, qty: n }));
    const lines = aggregateDemand(items);
    expect(lines).toHaveLength(3);
    expect(lines.reduce((s, l) => s + l.qty, 0)).toBe(21);
  });

  it("gives [] for no needs", () => {
    expect(aggregateDemand([])).toEqual([]);
  });

  it.each([[0], [-1], [1.5], [NaN]])("rejects quantity %f", (qty) => {
    expect(() => aggregateDemand([{ spec: breaker, qty }])).toThrow(RangeError);
  });
});
