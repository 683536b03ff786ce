import { describe, expect, it } from "vitest";
import { matchFileName, searchTargets, type MatchTarget } from "../../src/domain/photo-matching";

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
