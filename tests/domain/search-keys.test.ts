import { describe, expect, it } from "vitest";
import { looseKey } from "../../src/domain/search-keys";

// Tags are printed zero-padded and read out without the zeros, with any separator: common practice
// (invented examples).
describe("looseKey", () => {
  it.each([
    ["KL-0042", "kl42"],
    ["kl 42", "kl42"],
    ["KL0042", "kl42"],
    ["T-0100", "t100"],
    ["2-14", "214"],
    ["1001", "1001"],
    ["0", "0"],
    ["A-007/B-01", "a7b1"],
    ["%", ""],
  ])("%s → %s", (typed, key) => {
    expect(looseKey(typed)).toBe(key);
  });
  it("a key of something that is not a string is a RangeError", () => {
    expect(() => looseKey(42 as unknown as string)).toThrow(RangeError);
  });
});
