import { describe, expect, it } from "vitest";
import { int, isoDate, isoDateTime, isStorableText, text } from "../../src/schemas/common";
import { mapPgError } from "../../server/middleware/pg-errors";

describe("text() refuses what PostgreSQL's UTF-8 text cannot store", () => {
  // PostgreSQL manual, 8.3 Character Types: "the character with code zero (sometimes called NUL) cannot be stored".
  // Unicode 15, 3.9 (D91): a UTF-16 code unit sequence with an unpaired surrogate is ill-formed and has no UTF-8 form.
  it.each([
    ["plain text", "Arc chute cracked", true],
    ["emoji (a valid surrogate pair)", "lamp 💡 dim", true],
    ["accented and CJK text", "Ståle · 配電盤", true],
    ["a NUL byte", "ACB\u0000-1", false],
    ["a lone high surrogate", "x\ud800y", false],
    ["a lone low surrogate", "\udc00", false],
    ["a reversed pair", "\udc00\ud800", false],
  ])("%s → storable %s", (_label, s, ok) => {
    expect(isStorableText(s)).toBe(ok);
    expect(text().safeParse(s).success).toBe(ok);
  });

  it("keeps chaining like z.string()", () => {
    expect(text().trim().max(3).safeParse("  abc ").data).toBe("abc");
    expect(text().trim().max(3).safeParse("abcd").success).toBe(false);
  });
});

describe("int() is PostgreSQL's integer range", () => {
  // PostgreSQL manual, 8.1.1 Integer Types: integer is −2147483648 to +2147483647.
  it.each([
    [2147483647, true],
    [2147483648, false],
    [-2147483648, true],
    [-2147483649, false],
    [1.5, false],
    [Number.NaN, false],
  ])("%d → %s", (n, ok) => expect(int().safeParse(n).success).toBe(ok));
});

describe("isoDate() accepts only dates that exist", () => {
  // The Gregorian calendar (ISO 8601): 2028 is a leap year, 2026 and 1900 are not.
  it.each([
    ["2026-12-02", true],
    ["2028-02-29", true],
    ["2026-02-29", false],
    ["1900-02-29", false],
    ["2026-13-45", false],
    ["2026-04-31", false],
    ["0000-01-01", false],
    ["9999-99-99", false],
    ["9999-12-31", true],
    ["2026-1-2", false],
  ])("%s → %s", (s, ok) => expect(isoDate().safeParse(s).success).toBe(ok));

  it("checks date-times the same way", () => {
    expect(isoDateTime().safeParse("2026-12-02T06:00:00Z").success).toBe(true);
    expect(isoDateTime().safeParse("2026-12-02T06:00:00+01:00").success).toBe(true);
    expect(isoDateTime().safeParse("0000-12-02T06:00:00Z").success).toBe(false);
    expect(isoDateTime().safeParse("2026-13-02T06:00:00Z").success).toBe(false);
  });
});

describe("mapPgError: PostgreSQL's refusals become 4xx (SQLSTATE classes, PostgreSQL manual Appendix A)", () => {
  const pgErr = (code: string) => Object.assign(new Error("x"), { code, severity: "ERROR" });
  it.each([
    ["22P05", 400], // untranslatable_character
    ["22021", 400], // character_not_in_repertoire
    ["22003", 400], // numeric_value_out_of_range
    ["22008", 400], // datetime_field_overflow
    ["23505", 409], // unique_violation
    ["23P01", 409], // exclusion_violation
    ["40001", 409], // serialization_failure
  ])("%s → %d", (code, status) => expect(mapPgError(pgErr(code))?.status).toBe(status));

  it("leaves connection failures and non-database errors alone", () => {
    expect(mapPgError(pgErr("57P01"))).toBeNull();
    expect(mapPgError(Object.assign(new Error("x"), { code: "ECONNRESET" }))).toBeNull();
    expect(mapPgError(new Error("boom"))).toBeNull();
  });
});
