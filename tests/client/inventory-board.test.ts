import { describe, expect, it } from "vitest";
import type { TileRow } from "../../src/schemas/inventory";
import { neighbour } from "../../src/features/inventory/components/board-elevation";
import { NO_FILTERS, tileMatches } from "../../src/features/inventory/components/elevation-filters";
import { gradeBand } from "../../src/features/inventory/components/tile-style";
import { suggestDefect } from "../../src/features/inventory/defect-link";
import { tileRow } from "../helpers/board-fixtures";

const tile = (id: string, gridRow: number, gridCol: number, extra: Partial<TileRow> = {}): TileRow =>
  tileRow(id, { gridRow, gridCol, ...extra });

describe("arrow-key neighbour on the elevation grid", () => {
  //  a b c
  //  d [e e]   (e spans two columns)
  const a = tile("a", 1, 1),
    b = tile("b", 1, 2),
    c = tile("c", 1, 3),
    d = tile("d", 2, 1),
    e = tile("e", 2, 2, { colSpan: 2 });
  const all = [a, b, c, d, e];
  it.each([
    [a, "ArrowRight", b],
    [b, "ArrowRight", c],
    [a, "ArrowDown", d],
    [c, "ArrowDown", e],
    [b, "ArrowDown", e],
    [e, "ArrowLeft", d],
    [d, "ArrowUp", a],
  ])("from %s, %s lands on the nearest tile that way", (from, key, to) => {
    expect(neighbour(all, from, key)?.id).toBe(to.id);
  });
  it("at the edge there is nowhere to go, and other keys do nothing", () => {
    expect(neighbour(all, c, "ArrowRight")).toBeUndefined();
    expect(neighbour(all, a, "Tab")).toBeUndefined();
  });
});

describe("filters", () => {
  const graded = tile("g", 1, 1, {
    latest: { astmGrade: 3, isoRi: "Ri 4", percentRusted: 12, inspectedAt: "", belowWaterLine: true },
  });
  it("a tile matches no filters, and is dimmed by a filter it does not meet", () => {
    expect(tileMatches(graded, NO_FILTERS)).toBe(true);
    expect(tileMatches(graded, { ...NO_FILTERS, band: "rusting" })).toBe(true);
    expect(tileMatches(graded, { ...NO_FILTERS, band: "sound" })).toBe(false);
    expect(tileMatches(graded, { ...NO_FILTERS, disposition: "undecided" })).toBe(true);
    expect(tileMatches(graded, { ...NO_FILTERS, kind: "meter" })).toBe(false);
  });
  // Tideline's own grouping of ASTM D610 grades (10–8, 7–5, 4–3, 2–0) — not from the standard.
  it.each([
    [10, "sound"],
    [8, "sound"],
    [7, "spotted"],
    [5, "spotted"],
    [4, "rusting"],
    [3, "rusting"],
    [2, "heavy"],
    [0, "heavy"],
    [null, "ungraded"],
  ] as const)("grade %s is in the %s band", (g, band) => expect(gradeBand(g)).toBe(band));
});

describe("defect prefill from a finding (Tideline's own rule)", () => {
  it.each([
    [{ astmGrade: 9, mechanism: "seized", insulation: null }, "mechanical"],
    [{ astmGrade: 9, mechanism: null, insulation: "charred" }, "insulation"],
    [{ astmGrade: 9, mechanism: null, insulation: "tracking" }, "insulation"],
    [{ astmGrade: 4, mechanism: "free", insulation: "intact" }, "corrosion"],
    [{ astmGrade: 5, mechanism: "free", insulation: "intact" }, null],
  ] as const)("%o suggests %s", (i, category) => {
    expect(suggestDefect(i)?.category ?? null).toBe(category);
  });
});
