import { describe, expect, it } from "vitest";
import {
  kindFromFileName,
  matchFileName,
  nameTokens,
  normalizeToken,
  searchTargets,
  type MatchTarget,
} from "../../src/domain/photo-matching";

// Naming habits are common practice among survey photographers (files named after the
// painted designation or the bag's tag); the examples below are invented.
const T: MatchTarget[] = [
  { positionId: "m-2-1", boardId: "main", designation: "2-1", tagNumber: "KL-0007" },
  { positionId: "m-2-14", boardId: "main", designation: "2-14", tagNumber: "KL-0042" },
  { positionId: "m-1-1", boardId: "main", designation: "1-1", tagNumber: null },
  { positionId: "e-1-1", boardId: "emerg", designation: "1-1", tagNumber: null },
  { positionId: "e-eg", boardId: "emerg", designation: "EG", tagNumber: "KL-0100" },
];

describe("matchFileName", () => {
  it.each([
    // [file name, board filter, expected]  — source: common practice (invented examples)
    ["2-14_front.jpg", undefined, { kind: "designation", positionId: "m-2-14", matched: "2-14" }],
    ["IMG 2_14 nameplate.JPG", undefined, { kind: "designation", positionId: "m-2-14", matched: "2-14" }],
    ["2-1.jpg", undefined, { kind: "designation", positionId: "m-2-1", matched: "2-1" }],
    ["KL-0042.heic", undefined, { kind: "tag", positionId: "m-2-14", matched: "KL-0042" }],
    ["bag kl_0100 after.jpg", undefined, { kind: "tag", positionId: "e-eg", matched: "KL-0100" }],
    ["1-1.jpg", undefined, { kind: "ambiguous", candidates: ["m-1-1", "e-1-1"], matched: "1-1" }],
    ["1-1.jpg", "emerg", { kind: "designation", positionId: "e-1-1", matched: "1-1" }],
    ["IMG_2-145.jpg", undefined, { kind: "none" }],
    ["DSC01234.jpg", undefined, { kind: "none" }],
    ["12-14.jpg", undefined, { kind: "none" }],
  ])("%s (board %s) → %o", (name, board, expected) => {
    expect(matchFileName(name, T, board)).toEqual(expected);
  });

  it("a file name that is not a string is a RangeError", () => {
    expect(() => matchFileName(undefined as unknown as string, T)).toThrow(RangeError);
  });
});

describe("nameTokens", () => {
  it("gives every stretch of the name that stands alone, normalised, and nothing glued to a letter or digit", () => {
    expect(nameTokens("IMG 2_14.JPG").sort()).toEqual(["14", "2", "2-14", "img", "img-2", "img-2-14"].sort());
    expect(nameTokens("x(1-2).jpg")).toContain("1-2");
    expect(nameTokens("x(1-2).jpg")).not.toContain("-2");
    expect(nameTokens("12-14.jpg")).not.toContain("2-14");
  });

  it("holds every designation or tag matchFileName finds in the name (the server looks these up)", () => {
    const names = ["2-14_front.jpg", "IMG 2_14 nameplate.JPG", "KL-0042.heic", "eg_kl-0100 (2).png", "1-1 a.jpg"];
    for (const name of names) {
      const tokens = new Set(nameTokens(name));
      const m = matchFileName(name, T);
      if (m.kind !== "none") expect(tokens.has(normalizeToken(m.matched)), name).toBe(true);
    }
  });

  it("leaves out stretches longer than the limit", () => {
    expect(nameTokens(`${"a".repeat(30)}-${"b".repeat(30)}.jpg`, 40)).toEqual(["a".repeat(30), "b".repeat(30)]);
  });
});

describe("searchTargets", () => {
  it.each([
    ["2-14", ["m-2-14"]],
    ["2 1", ["m-2-1", "m-2-14"]],
    ["kl-01", ["e-eg"]],
    ["", []],
  ])("typing %s finds %o", (typed, ids) => {
    expect(searchTargets(typed, T).map((t) => t.positionId)).toEqual(ids);
  });
});

describe("kindFromFileName", () => {
  it.each([
    // [file name, expected kind] — source: common practice of survey photographers (invented examples)
    ["2-14_nameplate.jpg", "nameplate"],
    ["KL-0042 name plate.JPG", "nameplate"],
    ["IMG_0031_rating-plate.heic", "nameplate"],
    ["2-14_as-found.jpg", "as_found"],
    ["2-14 as found_nameplate.jpg", "nameplate"],
    ["1-3_damage.jpg", "damage"],
    ["1-3_after.jpg", "after_work"],
    ["IR_0044.jpg", "thermal"],
    ["2-14 thermal.tif", "thermal"],
    ["1-3_wip.jpg", "during_work"],
    ["template-2-14.jpg", null],
    ["DSC01234.jpg", null],
    ["2-14_front.jpg", null],
    ["nameplate.jpg", "nameplate"],
  ])("%s → %s", (name, kind) => {
    expect(kindFromFileName(name)).toBe(kind);
  });

  it("a file name that is not a string is a RangeError", () => {
    expect(() => kindFromFileName(null as unknown as string)).toThrow(RangeError);
  });
});
